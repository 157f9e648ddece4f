/**
 * The words that travel with every number: what was assumed, and the caution
 * that detailed-balance results are limits, not device predictions.
 */
import { engineering } from './numbers.js';
import type { Spectrum } from '../light/spectrum.js';
import type { Coupling, StackSpec, AbsorptanceModel } from '../stack/model.js';

/** The caution every result carries: detailed-balance limits, no substitute for certified measurement, engineering sign-off, local codes or licensed practice. */
export const CAUTION =
  'These are detailed-balance limits under the stated assumptions, not predictions of a real device. ' +
  'They are no substitute for certified measurement, engineering sign-off, local codes or licensed professional practice.';

export const EMISSION_CONVENTION = 'radiative emission through the front surface only, into air (solid angle π); no rear emission';

/** The emission convention in force under a coupling model. */
export function emissionConvention(c: Coupling): string {
  return c.model === 'radiative'
    ? `radiative emission through the front surface into air (solid angle π) and, from every upper cell, down into the cell below (index n = ${indexText(c)}, n² times the front share)`
    : EMISSION_CONVENTION;
}

/** The radiative-coupling index as stated: one value, or each upper film's own. */
const indexText = (c: Extract<Coupling, { model: 'radiative' }>): string => (c.refractiveIndex !== undefined ? String(c.refractiveIndex) : "each upper film's own index");

export function describeCoupling(c: Coupling): string {
  switch (c.model) {
    case 'none':
      return 'isolated subcells (no luminescent coupling)';
    case 'empirical':
      return `empirical luminescent coupling η = ${c.eta.join(', ')} per interface (J0 unchanged)`;
    case 'radiative':
      return `radiative-limit coupling, index n = ${indexText(c)}: downward share n²/(1+n²) of radiative recombination, upper-cell J0 × (1+n²); here ERE is the radiative fraction of recombination`;
  }
}

export function describeAbsorptance(a: AbsorptanceModel): string {
  switch (a.kind) {
    case 'step':
      return a.value === 1 ? 'ideal step' : `step, absorptance ${Number(a.value.toPrecision(4))}`;
    case 'beer-lambert':
      return `Beer–Lambert ${a.passes === 2 ? 'double' : 'single'} pass, ${a.thicknessNm} nm`;
    case 'lambertian':
      return `Lambertian trapping (n = ${a.refractiveIndex}), ${a.thicknessNm} nm`;
    case 'absorptance-table':
      return `measured absorptance of the isolated film${a.source ? ` (${a.source})` : ''}, ${a.energyEv[0].toFixed(3)}–${a.energyEv[a.energyEv.length - 1].toFixed(3)} eV`;
    case 'eqe-table':
      return `EQE measured in the stack${a.source ? ` (${a.source})` : ''}, ${a.energyEv[0].toFixed(3)}–${a.energyEv[a.energyEv.length - 1].toFixed(3)} eV; J0 from the same curve by reciprocity`;
  }
}

/** Assumption lines for a stack under a spectrum. */
export function assumptionLines(spec: StackSpec, spectrum: Spectrum): string[] {
  const eres = spec.subcells.map((c) => c.ere);
  const optics = spec.subcells.map((c, i) => `${i + 1}: ${describeAbsorptance(c.absorptance)}`).join('; ');
  return [
    `spectrum: ${spectrum.name}, P_in = ${engineering(spectrum.pinWm2, 2)} W/m², SHA-256 ${spectrum.sha256.slice(0, 16)}…`,
    `cell temperature: ${spec.tempK} K${spec.tempK === 300 ? ' (the detailed-balance convention)' : ''}`,
    `emission: ${emissionConvention(spec.coupling)}`,
    `ERE: ${eres.every((e) => e === 1) ? '1 (fully radiative)' : eres.join(', ')}`,
    `optics: ${optics}; front reflectance ${typeof spec.frontReflectance === 'number' ? spec.frontReflectance : 'tabulated'}`,
    `coupling: ${describeCoupling(spec.coupling)}`,
    ...(spec.subcells.some((c) => (c.rsOhmCm2 ?? 0) > 0)
      ? [`series resistance: ${spec.subcells.map((c, i) => `${i + 1}: ${c.rsOhmCm2 ?? 0} Ω·cm²`).join('; ')} (V = V_diode − J·R_s)`]
      : []),
  ];
}

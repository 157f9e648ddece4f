/**
 * Assumption lines a report adds for real films and devices: series
 * resistance, per-wiring optics (transparent contacts, own coupling) and a top
 * absorptance chosen by the search.
 */
import type { Design } from '../design/index.js';
import { describeCoupling } from './assumptions.js';

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

/** Lines for the assumptions list; empty when the design uses none of these. */
export function filmAssumptionLines(design: Design): string[] {
  const lines: string[] = [];
  const first = design.wirings[0].template;
  for (const w of design.wirings) {
    const t = w.template;
    const rs = t.subcells.map((c) => c.rsOhmCm2 ?? 0);
    if (rs.some((r) => r > 0)) lines.push(`Series resistance, ${w.key}: ${rs.map((r, i) => `${i + 1}: ${r} Ω·cm²`).join('; ')} (V = V_diode − J·R_s per subcell).`);
    if (w !== design.wirings[0] && !same(t.interlayerTransmittance, first.interlayerTransmittance)) {
      lines.push(`Optics between subcells, ${w.key}: transmittance ${t.interlayerTransmittance.map((v) => (typeof v === 'number' ? v.toFixed(4) : 'tabulated')).join(', ')} (interlayers times this wiring's transparent contacts).`);
    }
    if (w !== design.wirings[0] && !same(t.coupling, first.coupling)) lines.push(`Coupling, ${w.key}: ${describeCoupling(t.coupling)}.`);
    if (w.freeTopAbsorptance) lines.push(`Top absorptance, ${w.key}: a constant chosen by the search (absorptance: best), the rest of the top band passing down.`);
  }
  return lines;
}

/**
 * `gapstack materials`: list absorber families, show one, map a gap to its
 * compositions or a composition to its gap. Returns the text to print; the
 * argument parsing lives with the command-line entry point.
 */
import { UserError } from '../errors.js';
import { parseNumber } from './options.js';
import {
  type AbsorberFamily,
  type GapModel,
  describeGap,
  gapFromComposition,
  getFamily,
  isInWindow,
  listFamilies,
} from '../materials/index.js';

export interface MaterialsOptions {
  /** Family id; without it, every family is listed. */
  readonly id?: string;
  /** Gap to map back to compositions [eV]. */
  readonly gap?: number;
  /** Composition to map to a gap [-]. */
  readonly composition?: number;
  /** Print JSON instead of a table. */
  readonly json: boolean;
}

const CAUTION =
  'Caution: gap models are approximate room-temperature (300 K) fits; check them against measured films before fixing a composition.';

function modelJson(model: GapModel): Record<string, unknown> {
  switch (model.form) {
    case 'bowing':
      return { form: 'bowing', ea_ev: model.eaEv, eb_ev: model.ebEv, bowing_ev: model.bowingEv };
    case 'polynomial':
      return { form: 'polynomial', coefficients_ev: [...model.coefficientsEv] };
    case 'fixed':
      return { form: 'fixed', gap_ev: model.gapEv };
  }
}

function familyJson(f: AbsorberFamily): Record<string, unknown> {
  return {
    id: f.id,
    name: f.name,
    kind: f.kind,
    variable: f.variable === null ? null : { symbol: f.variable.symbol, meaning: f.variable.meaning },
    window: [...f.window.gapEv],
    ...(f.window.composition === undefined ? {} : { composition_window: [...f.window.composition] }),
    range: [...f.gapSpanEv],
    composition_range: [...f.compositionRange],
    window_reason: f.window.reason,
    dEg_dT_ev_per_k: f.dEgDtEvPerK,
    refractive_index: f.refractiveIndex,
    source: f.citation,
    sources: { ...f.sources },
  };
}

function modelText(model: GapModel, symbol: string): string {
  switch (model.form) {
    case 'bowing':
      return `Eg(${symbol}) = (1−${symbol})·${model.eaEv.toFixed(4)} + ${symbol}·${model.ebEv.toFixed(4)} − ${model.bowingEv.toFixed(3)}·${symbol}(1−${symbol}) eV`;
    case 'polynomial':
      return `Eg(${symbol}) = ${model.coefficientsEv
        .map((c, k) => (k === 0 ? c.toFixed(4) : `${c < 0 ? '− ' : '+ '}${Math.abs(c).toFixed(4)}·${symbol}${k > 1 ? `^${k}` : ''}`))
        .join(' ')} eV`;
    case 'fixed':
      return `Eg = ${model.gapEv.toFixed(3)} eV (fixed)`;
  }
}

function pad(rows: string[][]): string {
  const widths = rows[0]!.map((_, c) => Math.max(...rows.map((r) => r[c]!.length)));
  return rows.map((r) => r.map((cell, c) => cell.padEnd(widths[c]!)).join('  ').trimEnd()).join('\n');
}

function range2(pair: readonly [number, number], digits: number): string {
  return pair[0] === pair[1] ? pair[0].toFixed(digits) : `${pair[0].toFixed(digits)}–${pair[1].toFixed(digits)}`;
}

function listText(families: readonly AbsorberFamily[]): string {
  const rows = [
    ['id', 'kind', 'gap span [eV]', 'window [eV]', 'dEg/dT [eV/K]', 'composition'],
    ...families.map((f) => [
      f.id,
      f.kind,
      range2(f.gapSpanEv, 2),
      range2(f.window.gapEv, 2),
      f.dEgDtEvPerK.toExponential(1),
      f.variable === null ? '—' : `${f.variable.symbol}: ${f.variable.meaning}`,
    ]),
  ];
  return `${pad(rows)}\n\nGaps at 300 K. ${CAUTION}\n`;
}

function detailText(f: AbsorberFamily): string {
  const sym = f.variable?.symbol ?? 'x';
  const lines = [
    `${f.name} (${f.id}, ${f.kind})`,
    ...(f.variable === null ? [] : [`  composition     ${sym} = ${f.variable.meaning}, range ${range2(f.compositionRange, 2)}`]),
    `  gap model       ${modelText(f.model, sym)}`,
    `  gap span        ${range2(f.gapSpanEv, 3)} eV at 300 K`,
    `  window          ${range2(f.window.gapEv, 2)} eV${f.window.composition === undefined ? '' : ` with ${sym} in ${range2(f.window.composition, 2)}`}`,
    `  window reason   ${f.window.reason}`,
    `  dEg/dT          ${f.dEgDtEvPerK.toExponential(2)} eV/K (linear about 300 K)`,
    `  refractive idx  ${f.refractiveIndex}`,
    `  source          ${f.citation}`,
    '  sources:',
    ...Object.entries(f.sources).map(([k, v]) => `    ${k}: ${v}`),
    '',
    CAUTION,
  ];
  return `${lines.join('\n')}\n`;
}

/** `gapstack materials [id]` from the parsed command line: --gap and --composition read as numbers. */
export function materialsCommandFromArgs(a: { id?: unknown; gap?: unknown; composition?: unknown; json?: unknown }): string {
  return materialsCommand({
    id: a.id as string | undefined,
    gap: a.gap === undefined ? undefined : parseNumber('gap', a.gap),
    composition: a.composition === undefined ? undefined : parseNumber('composition', a.composition),
    json: Boolean(a.json),
  });
}

/**
 * Text (or JSON) for the materials command.
 * @throws UserError on an unknown family, a gap or composition without a
 * family, both gap and composition, or values out of range
 */
export function materialsCommand(opts: MaterialsOptions): string {
  const { id, gap, composition, json } = opts;
  if (gap !== undefined && composition !== undefined) {
    throw new UserError('give either --gap or --composition, not both');
  }
  if (id === undefined) {
    if (gap !== undefined || composition !== undefined) {
      throw new UserError(`--${gap !== undefined ? 'gap' : 'composition'} needs a family id; run "gapstack materials" to list them`);
    }
    const families = listFamilies();
    return json ? `${JSON.stringify({ families: families.map(familyJson) }, null, 2)}\n` : listText(families);
  }
  const family = getFamily(id);
  const sym = family.variable?.symbol ?? 'x';

  if (gap !== undefined) {
    const d = describeGap(family, gap);
    if (json) {
      const out = {
        family: family.id,
        gap_ev: d.gapEv,
        compositions: d.compositions.map((c) => ({ x: c.x, in_window: c.inWindow })),
        reachable: d.reachable,
        in_window: d.inWindow,
        note: d.note,
      };
      return `${JSON.stringify(out, null, 2)}\n`;
    }
    const lines = [`${family.name} (${family.id}) at a gap of ${gap.toFixed(3)} eV (300 K):`];
    for (const c of family.kind === 'fixed' ? [] : d.compositions) {
      lines.push(`  ${sym} = ${c.x.toFixed(4)}  ${c.inWindow ? 'in window' : 'outside window'}`);
    }
    if (!d.reachable) lines.push(`  not reachable with ${family.id}`);
    lines.push(`  ${d.note}`, '', CAUTION);
    return `${lines.join('\n')}\n`;
  }

  if (composition !== undefined) {
    const gapEv = gapFromComposition(family, composition);
    const inWindow = isInWindow(family, composition, gapEv);
    if (json) {
      return `${JSON.stringify({ family: family.id, composition, gap_ev: gapEv, in_window: inWindow }, null, 2)}\n`;
    }
    const lines = [
      `${family.name} (${family.id}) at ${sym} = ${composition}: gap ${gapEv.toFixed(3)} eV at 300 K, ${inWindow ? 'inside' : 'outside'} the practical window ${range2(family.window.gapEv, 2)} eV`,
      ...(inWindow ? [] : [`  ${family.window.reason}`]),
      '',
      CAUTION,
    ];
    return `${lines.join('\n')}\n`;
  }

  if (json) return `${JSON.stringify({ family: { ...familyJson(family), model: modelJson(family.model) } }, null, 2)}\n`;
  return detailText(family);
}

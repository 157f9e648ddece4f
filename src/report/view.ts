/**
 * The words and numbers of a report, formatted once: the question, the
 * answer table, per-wiring detail, assumptions and provenance. The page
 * template and the JSON summary both read from here, so they cannot drift.
 */
import { basename, dirname, resolve, sep } from 'node:path';
import { HC_EV_NM, toMaCm2 } from '../physics/constants.js';
import { isSeriesString } from '../stack/model.js';
import type { Design, DesignSubcell } from '../design/index.js';
import { constraintRangeEv } from '../design/index.js';
import { CAUTION, describeAbsorptance, describeCoupling, emissionConvention } from './assumptions.js';
import type { MapOutcome, ReportData, WiringOutcome } from './compute.js';
import type { EnsembleComparison, WiringComparison } from './ensemble-compare.js';
import { filmAssumptionLines } from './film-assumptions.js';

export const fx = (x: number | null | undefined, d: number): string => (x === null || x === undefined || !Number.isFinite(x) ? '–' : x.toFixed(d));
export const pc = (x: number, d = 2): string => `${(x * 100).toFixed(d)} %`;
const mA = (jAm2: number) => fx(toMaCm2(jAm2), 2);

/** A person's name for a wiring key. */
export function wiringTitle(key: string): string {
  if (key === 'series') return 'Series (2T, current-matched)';
  if (key === 'independent') return 'Independent (4T)';
  if (key === '3t') return 'Three-terminal (3T, independent loads)';
  const m = /^vm:(\d+):(\d+)$/.exec(key);
  if (m) return `Voltage-matched strings ${m[1]}:${m[2]} (3T)`;
  return key;
}

function constraintPhrase(s: DesignSubcell, design: Design): string {
  const who = s.labelled ? `subcell ${s.index} (${s.label}):` : `subcell ${s.index}:`;
  const c = s.constraint;
  const [lo, hi] = constraintRangeEv(c, design.tempK, design.spanEv);
  switch (c.kind) {
    case 'free':
      return `${who} free within ${design.spanEv[0]}–${design.spanEv[1]} eV`;
    case 'range':
      return `${who} within ${lo}–${hi} eV`;
    case 'fixed':
      return `${who} fixed at ${fx(lo, 3)} eV`;
    case 'material':
      if (c.family.kind === 'fixed') return `${who} ${c.family.name}, ${fx(lo, 3)} eV at ${design.tempK} K`;
      return `${who} ${c.family.name} ${c.fullRange ? 'anywhere in its composition range' : 'within its practical window'}, ${fx(lo, 3)}–${fx(hi, 3)} eV at ${design.tempK} K`;
  }
}

function lightPhrase(design: Design): string {
  const l = design.light;
  if (l.kind === 'ensemble') return `the spectral ensemble ${l.name} (${design.spectra.length} spectra, yield-weighted)`;
  const entry = design.file.spectrum;
  const suns = typeof entry === 'object' ? entry.suns : undefined;
  const conc = suns === undefined ? '' : suns === 'max' ? ' at maximum concentration' : ` at ${suns} ${suns === 1 ? 'sun' : 'suns'}`;
  return `${l.spectrum.name}${conc} (${fx(l.spectrum.pinWm2, 1)} W/m²)`;
}

/** The ensemble's cell temperatures, "282–326 K" or "300 K". */
function ensembleTemps(design: Design): string {
  const ts = design.spectra.map((s) => s.tempK);
  const lo = Math.min(...ts), hi = Math.max(...ts);
  const k = (t: number) => (Number.isInteger(t) ? String(t) : fx(t, 1));
  return lo === hi ? `${k(lo)} K` : `${k(lo)}–${k(hi)} K`;
}

/**
 * How temperature enters the question: one cell temperature, or one per
 * ensemble member; material-bound gaps are stated at 300 K and move with each
 * member's temperature by their family's dE_g/dT (docs/PHYSICS.md §10), other gaps are held.
 */
function temperaturePhrase(design: Design): string {
  if (design.light.kind !== 'ensemble') return `at ${design.tempK} K`;
  const bound = design.subcells.filter((c) => c.constraint.kind === 'material').map((c) => c.index);
  const held = design.subcells.length - bound.length;
  const moving = bound.length === 0 ? '' : `the gaps of subcell${bound.length > 1 ? 's' : ''} ${joinWords(bound.map(String))} stated at 300 K and moving with each spectrum's cell temperature by their material's dE_g/dT`;
  const fixed = held === 0 ? '' : `${bound.length === 0 ? 'the gaps' : 'the other gaps'} held at their ${design.tempK} K design values`;
  return `with each spectrum at its own cell temperature (${ensembleTemps(design)})${bound.length === 0 ? ' and' : ','} ${[moving, fixed].filter(Boolean).join(' and ')}`;
}

const joinWords = (xs: string[]) => (xs.length <= 1 ? xs.join('') : `${xs.slice(0, -1).join(', ')} and ${xs[xs.length - 1]}`);

/** The design question in one paragraph. */
export function questionText(design: Design): string {
  const n = design.subcells.length;
  const objective = design.spectra.length > 1 ? 'yield-weighted efficiency' : 'efficiency';
  const wirings = design.wirings.map((w) => wiringTitle(w.key).split(' (')[0].toLowerCase());
  const compare = wirings.length > 1 ? `, and how do ${joinWords(wirings)} wiring compare` : ` with ${wirings[0]} wiring`;
  return (
    `Which band gaps give a ${n}-subcell stack (top first) — ${design.subcells.map((s) => constraintPhrase(s, design)).join('; ')} — the highest detailed-balance ${objective} ` +
    `under ${lightPhrase(design)} ${temperaturePhrase(design)}${compare}? How far may each gap stray before the ${objective} falls by more than ${fx(design.loss * 100, 1)} % (relative)?` +
    (design.sites ? ` And at each site the design names (${design.sites.files.length} weather files), under its weather year: which gaps win there, and what does the AM1.5G answer give up (the Sites section)?` : '')
  );
}

export interface AnswerCell {
  /** Lines in the cell's main style. */
  lines: string[];
  /** Smaller explanatory lines under them. */
  sub: string[];
}
export interface AnswerRow {
  label: string;
  cells: AnswerCell[];
  emphasis?: boolean;
}

function compositionLines(design: Design, o: WiringOutcome, i: number): string[] {
  const c = o.search.compositions.find((x) => x.subcell === i);
  const k = design.subcells[i].constraint;
  if (!c || k.kind !== 'material') return [];
  if (k.family.kind === 'fixed') return [c.familyName];
  if (c.compositions.length === 0) return [c.note];
  const sym = k.family.variable?.symbol ?? 'x';
  const xs = c.compositions.map((x) => `${sym} = ${fx(x.x, 3)}${x.inWindow ? '' : ' (outside the practical window)'}`).join(' or ');
  return [`${c.familyName}: ${xs}`, `${sym} = ${k.family.variable?.meaning ?? 'composition'}`];
}

function perSubcell(o: WiringOutcome, f: (i: number) => string): AnswerCell {
  return { lines: o.detail.subcells.map((_, i) => `${i + 1}: ${f(i)}`), sub: [] };
}

function isSeries(o: WiringOutcome): boolean {
  return isSeriesString(o.wiring.wiring);
}

/** Tolerance window text of subcell i, or "fixed". */
export function toleranceText(o: WiringOutcome, i: number): string {
  const t = o.search.result.tolerance.intervals.find((x) => x.subcell === i);
  if (!t) return 'fixed by the design';
  const open = t.openLow && t.openHigh ? ' (both ends at the allowed range)' : t.openLow ? ' (low end at the allowed range)' : t.openHigh ? ' (high end at the allowed range)' : '';
  const c = o.search.compositionTolerance?.find((x) => x.subcell === i);
  return `${fx(t.lowEv, 3)}–${fx(t.highEv, 3)} eV${open}${c ? `; x = ${fx(c.lowX, 3)}–${fx(c.highX, 3)}` : ''}`;
}

/** The answer table: one column per wiring. */
export function answerRows(data: ReportData): AnswerRow[] {
  const { design, outcomes } = data;
  const ens = design.spectra.length > 1;
  const under = ens ? ` (under ${design.reference.label})` : '';
  const twin = threeTerminalTwin(outcomes);
  const rows: AnswerRow[] = [
    {
      label: ens ? 'yield-weighted η' : 'η',
      emphasis: true,
      cells: outcomes.map((o) => ({ lines: [pc(o.search.result.best.value, 2)], sub: twin && o === twin.three ? ['= the 4T limit (independent loads)'] : [] })),
    },
  ];
  design.subcells.forEach((s, i) => {
    rows.push({
      label: `gap of subcell ${s.index}${s.labelled ? ` (${s.label})` : ''}`,
      emphasis: true,
      // What the composition variable means is said once, in the first column.
      cells: outcomes.map((o, k) => ({ lines: [`${fx(o.search.result.best.gapsEv[i], 3)} eV`], sub: compositionLines(design, o, i).slice(0, k === 0 ? undefined : 1) })),
    });
  });
  design.subcells.forEach((s, i) => {
    rows.push({ label: `tolerance window, subcell ${s.index}`, cells: outcomes.map((o) => ({ lines: [toleranceText(o, i)], sub: [] })) });
  });
  rows.push({
    label: `Jsc [mA/cm²]${under}`,
    cells: outcomes.map((o) => (isSeries(o) && o.detail.stackJscAm2 !== null ? { lines: [mA(o.detail.stackJscAm2)], sub: ['at the terminals'] } : perSubcell(o, (i) => mA(o.detail.subcells[i].jphAm2)))),
  });
  rows.push({
    label: `Voc [V]${under}`,
    cells: outcomes.map((o) => (isSeries(o) && o.detail.stackVocV !== null ? { lines: [fx(o.detail.stackVocV, 3)], sub: ['at the terminals'] } : perSubcell(o, (i) => fx(o.detail.subcells[i].vocV, 3)))),
  });
  rows.push({
    label: `FF${under}`,
    cells: outcomes.map((o) => (isSeries(o) && o.stackFf !== null ? { lines: [fx(o.stackFf, 4)], sub: ['at the terminals'] } : perSubcell(o, (i) => fx(o.detail.subcells[i].ff, 4)))),
  });
  rows.push({
    label: `operating point${under}`,
    cells: outcomes.map((o) =>
      isSeries(o) && o.jv.stackMpp ? { lines: [`${fx(o.jv.stackMpp.vV, 3)} V at ${mA(o.jv.stackMpp.jAm2)} mA/cm²`], sub: [] } : perSubcell(o, (i) => `${fx(o.detail.subcells[i].vOpV, 3)} V at ${mA(o.detail.subcells[i].jOpAm2)} mA/cm²`),
    ),
  });
  rows.push({
    label: 'runner-up basin',
    cells: outcomes.map((o) => {
      const b = o.search.result.basins[0];
      return { lines: [b ? `${pc(b.value, 2)} at ${b.gapsEv.map((g) => fx(g, 3)).join(' / ')} eV` : 'none distinct'], sub: [] };
    }),
  });
  return rows;
}

/** Differences in efficiency below this many percentage points are not narrated as differences. */
export const RESOLUTION_PP = 0.01;

/** A difference in efficiency [-] too small to report at RESOLUTION_PP. */
export const belowResolution = (d: number): boolean => Math.abs(d * 100) < RESOLUTION_PP;

const NO_DIFFERENCE = `no difference at this resolution (${RESOLUTION_PP} percentage points)`;

/** A wiring's short name, e.g. "Series". */
const shortTitle = (key: string) => wiringTitle(key).split(' (')[0];

/**
 * The 3T wiring with independent loads when the design also has the 4T one
 * and the two agree within the resolution: for two subcells each with its own
 * load, 3T is the 4T limit, so the report says so once and does not repeat it.
 */
export function threeTerminalTwin(outcomes: WiringOutcome[]): { three: WiringOutcome; four: WiringOutcome } | null {
  const three = outcomes.find((o) => o.wiring.key === '3t');
  const four = outcomes.find((o) => o.wiring.key === 'independent');
  if (!three || !four || !belowResolution(three.search.result.best.value - four.search.result.best.value)) return null;
  return { three, four };
}

/** The sentence that replaces the 3T wiring's repeated results. */
export function threeTerminalSentence(t: { three: WiringOutcome; four: WiringOutcome }): string {
  return `Three-terminal with independent loads runs each subcell at its own maximum power point, so it equals the four-terminal limit (${pc(t.four.search.result.best.value, 2)}); its maps and detail are those of Independent (4T) and are not repeated.`;
}

/** Subcells of a wiring's optimum that sit on an edge of their material window or allowed range. */
export function windowEdges(design: Design, gapsEv: number[]): { subcell: number; edge: 'low' | 'high'; what: string; gapEv: number }[] {
  const out: { subcell: number; edge: 'low' | 'high'; what: string; gapEv: number }[] = [];
  design.subcells.forEach((s, i) => {
    const c = s.constraint;
    if (c.kind !== 'range' && !(c.kind === 'material' && c.family.kind !== 'fixed')) return;
    const [lo, hi] = constraintRangeEv(c, design.tempK, design.spanEv);
    const what = c.kind === 'range' ? `allowed range ${fx(lo, 3)}–${fx(hi, 3)} eV` : `${c.family.name} ${c.fullRange ? 'composition range' : 'practical window'} (${fx(lo, 3)}–${fx(hi, 3)} eV)`;
    const g = gapsEv[i];
    if (Math.abs(g - lo) < 5e-4) out.push({ subcell: i + 1, edge: 'low', what, gapEv: g });
    else if (Math.abs(g - hi) < 5e-4) out.push({ subcell: i + 1, edge: 'high', what, gapEv: g });
  });
  return out;
}

/** "subcell 1 (1.800 eV) sits on the high edge of the … window" for each edge, or '' when none. */
function edgeWords(edges: ReturnType<typeof windowEdges>): string {
  return joinWords(edges.map((e) => `subcell ${e.subcell} (${fx(e.gapEv, 3)} eV) sits on the ${e.edge} edge of its ${e.what}`));
}

/** Sentence naming an optimum on a window edge, with the unconstrained optimum beside it; '' when no gap is on an edge. */
export function edgeSentence(design: Design, o: WiringOutcome): string {
  const edges = windowEdges(design, o.search.result.best.gapsEv);
  if (edges.length === 0) return '';
  const u = o.search.unconstrained;
  const free = u ? ` Without the windows the best is ${pc(u.best.value, 2)} at ${u.best.gapsEv.map((g) => fx(g, 3)).join(' / ')} eV.` : '';
  return `${shortTitle(o.wiring.key)}: the optimum is on a window edge — ${edgeWords(edges)}; ${edges.length > 1 ? 'the windows, not the physics, set those gaps' : 'the window, not the physics, sets that gap'}.${free}`;
}

/** One or two sentences: which wiring wins and by how much; ties within the resolution said as such (window edges: `edgeNotes`). */
export function verdict(data: ReportData): string {
  const twin = threeTerminalTwin(data.outcomes);
  const shown = data.outcomes.filter((o) => !twin || o !== twin.three);
  const o = [...shown].sort((a, b) => b.search.result.best.value - a.search.result.best.value);
  const top = o[0];
  const gaps = top.search.result.best.gapsEv.map((g) => fx(g, 3)).join(' / ');
  let s = `Highest: ${wiringTitle(top.wiring.key)} at ${pc(top.search.result.best.value, 2)} with gaps ${gaps} eV (top first).`;
  for (const x of o.slice(1)) {
    const d = top.search.result.best.value - x.search.result.best.value;
    const at = `${pc(x.search.result.best.value, 2)} at ${x.search.result.best.gapsEv.map((g) => fx(g, 3)).join(' / ')} eV`;
    s += belowResolution(d) ? ` ${shortTitle(x.wiring.key)}: ${NO_DIFFERENCE} (${at}).` : ` ${shortTitle(x.wiring.key)} gives up ${fx(d * 100, 2)} percentage points (${at}).`;
  }
  if (twin) s += ` ${threeTerminalSentence(twin)}`;
  return s;
}

/** The verdict's companions under the answer table: every shown wiring whose optimum sits on a window edge, with its unconstrained optimum. */
export function edgeNotes(data: ReportData): string[] {
  const twin = threeTerminalTwin(data.outcomes);
  return data.outcomes.filter((o) => !twin || o !== twin.three).flatMap((o) => {
    const e = edgeSentence(data.design, o);
    return e ? [e] : [];
  });
}

/** Per-subcell detail table of one wiring. */
export function subcellTable(data: ReportData, o: WiringOutcome): { head: string[]; rows: string[][] } {
  const head = ['subcell', 'gap [eV]', 'J_gen [mA/cm²]', 'J_ph [mA/cm²]', 'Voc [V]', 'FF', 'V op [V]', 'J op [mA/cm²]', 'tolerance window'];
  const rows = o.detail.subcells.map((c, i) => [
    `${i + 1}: ${data.design.subcells[i].label}`,
    fx(c.gapEv, 4),
    mA(c.jgenAm2),
    mA(c.jphAm2),
    fx(c.vocV, 4),
    fx(c.ff, 4),
    fx(c.vOpV, 4),
    mA(c.jOpAm2),
    toleranceText(o, i),
  ]);
  return { head, rows };
}

/** A provenance text with the design file's folder dropped from paths, so reports do not depend on where the files sit. */
export function relativeSource(design: Design, text: string): string {
  return text.split(`${dirname(resolve(design.path))}${sep}`).join('');
}

/** Assumption lines shared by every wiring, then per-wiring search lines. */
export function assumptionList(data: ReportData): string[] {
  const { design } = data;
  const t = design.wirings[0].template;
  const lines: string[] = [];
  const l = design.light;
  if (l.kind === 'spectrum') {
    const s = l.spectrum;
    const wl = s.wavelengthNm;
    lines.push(`Spectrum: ${s.name}; integral P_in = ${fx(s.pinWm2, 2)} W/m² over ${fx(wl[0], 0)}–${fx(wl[wl.length - 1], 0)} nm${s.scale !== 1 ? ` (scaled ×${fx(s.scale, 4)})` : ''}; SHA-256 ${s.sha256}; source: ${relativeSource(design, s.source)}.`);
  } else {
    lines.push(`Spectral ensemble: ${l.name}; SHA-256 ${l.sha256}; source: ${relativeSource(design, l.source)}.`);
    for (const x of l.summaryLines) lines.push(`Ensemble: ${x}.`);
    lines.push(`Objective: yield-weighted efficiency Σ w·P_max / Σ w·P_in, each configuration re-solved under every spectrum at its cell temperature; per-subcell detail (J–V, bands) under "${design.reference.label}", the member with the largest energy share.`);
  }
  if (l.kind === 'ensemble') {
    lines.push(
      `Cell temperature: each spectrum is solved at its own cell temperature (${ensembleTemps(design)}); members without one take the ensemble's default temperature, else ${design.tempK} K. ` +
        (design.subcells.some((c) => c.constraint.kind === 'material')
          ? `Material-bound gaps (and their practical windows) are stated at 300 K and move with each member's cell temperature by the family's dE_g/dT (docs/PHYSICS.md §10); other gaps are held at their ${design.tempK} K design values.`
          : `Gaps are held at their ${design.tempK} K design values for every member (no dE_g/dT shift per spectrum: no subcell is bound to a material with a known dE_g/dT).`),
    );
  } else lines.push(`Cell temperature: ${design.tempK} K${design.tempK === 300 ? ' (the detailed-balance convention)' : ''}.`);
  lines.push(`Emission: ${emissionConvention(t.coupling)}.`);
  lines.push(
    `ERE: ${design.subcells.every((s) => s.ere === 1) ? '1 for every subcell (fully radiative)' : design.subcells.map((s) => `${s.index}: ${s.ere.toPrecision(4)}${s.vocLossV !== undefined ? ` (from a non-radiative Voc loss of ${s.vocLossV} V)` : ''}`).join('; ')}.`,
  );
  const refl = typeof t.frontReflectance === 'number' ? t.frontReflectance : 'tabulated';
  const inter = t.interlayerTransmittance.length === 0 ? 'none' : t.interlayerTransmittance.map((v) => (typeof v === 'number' ? String(v) : 'tabulated')).join(', ');
  lines.push(`Optics: ${t.subcells.map((c, i) => `${i + 1}: ${describeAbsorptance(c.absorptance)}`).join('; ')}; front reflectance ${refl}; interlayer transmittance ${inter}.`);
  lines.push(`Coupling: ${describeCoupling(t.coupling)}.`);
  lines.push(...filmAssumptionLines(design));
  const fams = design.subcells.flatMap((s) => (s.constraint.kind === 'material' ? [s.constraint.family] : []));
  for (const f of fams) {
    lines.push(`Material ${f.name} (${f.id}): ${f.citation}; practical window ${f.window.gapEv[0]}–${f.window.gapEv[1]} eV at 300 K (${f.window.reason}); dE_g/dT = ${f.dEgDtEvPerK.toExponential(1)} eV/K applied from 300 K.`);
  }
  lines.push(`Search: gaps within ${design.spanEv[0]}–${design.spanEv[1]} eV, ordered top to bottom; coarse grid plus the spectrum's band-edge gaps, best distinct candidates refined below 1 meV.`);
  for (const o of data.outcomes) {
    const st = o.search.result.stats;
    lines.push(`Search grid, ${o.wiring.key}: ${fx(st.stepEv * 1000, 1)} meV coarse step, ${st.axisPoints} axis points (${st.edgePoints} band edges), ${st.leaves} gap combination${st.leaves === 1 ? '' : 's'}, ${st.seeds} seed${st.seeds === 1 ? '' : 's'} refined.`);
  }
  // Each wiring has its own maps (the default step depends on its search): one line per pair where every wiring's grid agrees, one per wiring where they differ.
  const mapLine = (m: MapOutcome): string => {
    const mm = m.map;
    const prof = m.profiled.length === 0 ? '' : `; ${m.profiled.length === 1 ? 'subcell' : 'subcells'} ${m.profiled.map((c) => c + 1).join(', ')} maximised at every point (profile)`;
    return `${fx(m.stepEv * 1000, 1)} meV grid, ${fx(mm.x[0], 3)}–${fx(mm.x[mm.x.length - 1], 3)} × ${fx(mm.y[0], 3)}–${fx(mm.y[mm.y.length - 1], 3)} eV (${mm.x.length} × ${mm.y.length} points)${prof}; mapped gaps vary beyond their constraints, which are drawn as bands and lines.`;
  };
  const pairCount = Math.max(0, ...data.outcomes.map((o) => o.maps.length));
  for (let j = 0; j < pairCount; j++) {
    const per = data.outcomes.filter((o) => o.maps[j] !== undefined).map((o) => ({ key: o.wiring.key, m: o.maps[j], text: mapLine(o.maps[j]) }));
    if (per.length === 0) continue;
    const head = `Map of subcells ${per[0].m.pair.xCell + 1} and ${per[0].m.pair.yCell + 1}`;
    if (per.every((p) => p.text === per[0].text)) lines.push(`${head}: ${per[0].text}`);
    else for (const p of per) lines.push(`${head}, ${p.key}: ${p.text}`);
  }
  lines.push(`Tolerance: the region where the ${design.spectra.length > 1 ? 'yield-weighted efficiency' : 'efficiency'} stays ≥ (1 − ${design.loss})·best; the table's windows move one gap at a time with the others at the optimum, the map outline is the two-gap region.`);
  const lowest = Math.min(...data.outcomes.map((o) => Math.min(...o.search.result.best.gapsEv)));
  if (l.kind === 'spectrum' && HC_EV_NM / lowest > l.spectrum.wavelengthNm[l.spectrum.wavelengthNm.length - 1]) {
    lines.push(`Note: the lowest recommended gap (${fx(lowest, 3)} eV, ${fx(HC_EV_NM / lowest, 0)} nm) lies beyond the spectrum's table; photons past its end count as zero.`);
  }
  return lines;
}

/** Provenance lines (deterministic), then the one date line. */
export function provenanceList(design: Design, version: string): string[] {
  return [`Tool: gapstack ${version}.`, `Design file: ${basename(design.path)}, SHA-256 ${design.sha256}.`, `Schema: schema/design.schema.json (JSON Schema draft 2020-12).`];
}

/** The only line allowed to differ between two runs of the same design. */
export function generatedLine(date: Date): string {
  return `Generated ${date.toISOString()}`;
}

export { CAUTION };

// ---------------------------------------------------------------------------
// Your spectra versus AM1.5G

/** A signed number with fixed decimals; a value that rounds to zero is written 0 (no sign). */
function signed(x: number, d: number): string {
  const t = x.toFixed(d);
  if (Number(t) === 0) return (0).toFixed(d);
  return x > 0 ? `+${t}` : t;
}

/** Whose the ensemble is, where it came from, and a note when its name marks it as synthetic. */
export function ensembleIdentity(design: Design, c: EnsembleComparison): { name: string; source: string; note: string } {
  const note = c.synthetic
    ? `The ensemble's name ("${c.name}") marks it as invented: its spectra were made up to show the method; they are not measurements of any site, so nothing below says what a real site would yield.`
    : `These are your spectra as supplied; the comparison holds only as far as they represent the site and period you design for.`;
  return { name: c.name, source: relativeSource(design, c.source), note };
}

/** The opening paragraph of the section. */
export function comparisonIntro(design: Design, c: EnsembleComparison): string {
  const r = c.referenceSpectrum;
  return (
    `The design question above was answered over your ensemble (${c.summary.count} spectra, yield-weighted). Here the same question — the same constraints, search and wirings — is answered again under ${r.name} alone (${fx(r.pinWm2, 1)} W/m², cells at ${design.tempK} K), ` +
    `and each optimum is valued under the other light. The two maps of a wiring share their axes and one colour scale, so a colour stands for the same efficiency in both.`
  );
}

/** The shift table of one wiring: both optima with gaps and both efficiencies, then the shift. */
export function shiftTable(design: Design, w: WiringComparison): { head: string[]; rows: { cells: string[]; emphasis: boolean }[] } {
  const gapHead = design.subcells.map((s) => `gap ${s.index}${s.labelled ? ` (${s.label})` : ''} [eV]`);
  const head = ['design', ...gapHead, 'η under AM1.5G', 'yield-weighted η'];
  const point = (label: string, p: WiringComparison['referenceOptimal']) => ({ cells: [label, ...p.gapsEv.map((g) => fx(g, 4)), pc(p.referenceEfficiency, 3), pc(p.yieldEfficiency, 3)], emphasis: false });
  const a = w.referenceOptimal;
  const b = w.ensembleOptimal;
  return {
    head,
    rows: [
      point('AM1.5G optimum', a),
      point('ensemble optimum', b),
      {
        cells: ['shift, ensemble − AM1.5G', ...w.shiftEv.map((d) => `${signed(d * 1000, 1)} meV`), `${signed((b.referenceEfficiency - a.referenceEfficiency) * 100, 3)} pp`, `${signed((b.yieldEfficiency - a.yieldEfficiency) * 100, 3)} pp`],
        emphasis: true,
      },
    ],
  };
}

/** What the AM1.5G-optimised design gives up under the ensemble, in words: below the resolution said as such, an optimum held by a window edge named. */
export function lossText(design: Design, w: WiringComparison): string {
  const a = w.referenceOptimal;
  const b = w.ensembleOptimal;
  const same = w.shiftEv.every((d) => Math.abs(d) < 5e-7);
  const drop = a.referenceEfficiency - a.yieldEfficiency;
  const edgesA = windowEdges(design, a.gapsEv);
  const edgesB = windowEdges(design, b.gapsEv);
  const held = same && edgesA.length > 0 && edgesB.length > 0;
  let s: string;
  if (held) {
    const ua = w.reference.unconstrained;
    const ub = w.outcome.search.unconstrained;
    const free =
      ua && ub
        ? ` Without the windows the optima differ: ${ua.best.gapsEv.map((g) => fx(g, 3)).join(' / ')} eV under AM1.5G (${pc(ua.best.value, 2)}), ${ub.best.gapsEv.map((g) => fx(g, 3)).join(' / ')} eV over the ensemble (${pc(ub.best.value, 2)} yield-weighted).`
        : '';
    s = `Both optima are the same gaps (${a.gapsEv.map((g) => fx(g, 3)).join(' / ')} eV) because both sit on a window edge: ${edgeWords(edgesA)}. That the AM1.5G design matches the ensemble optimum here is set by the window, not a finding about the light.${free} At these gaps the stack yields ${pc(b.yieldEfficiency, 3)} over the ensemble.`;
  } else if (same) {
    s = `The AM1.5G optimum and the ensemble optimum are the same gaps (${a.gapsEv.map((g) => fx(g, 3)).join(' / ')} eV): built to the AM1.5G optimum, this stack yields ${pc(b.yieldEfficiency, 3)} over the ensemble, the ensemble optimum itself.`;
  } else if (belowResolution(w.lossAbs)) {
    s = `Built to the AM1.5G optimum, this stack yields ${pc(a.yieldEfficiency, 3)} over the ensemble, against ${pc(b.yieldEfficiency, 3)} at the ensemble optimum: ${NO_DIFFERENCE}.`;
  } else {
    s = `Built to the AM1.5G optimum, this stack yields ${pc(a.yieldEfficiency, 3)} over the ensemble, against ${pc(b.yieldEfficiency, 3)} at the ensemble optimum: ${fx(w.lossAbs * 100, 3)} percentage points lower, ${fx(w.lossRel * 100, 3)} % (relative).`;
    if (edgesA.length > 0 || edgesB.length > 0) s += ` On a window edge: ${edgeWords(edgesA.length > 0 ? edgesA : edgesB)} (${edgesA.length > 0 ? 'AM1.5G' : 'ensemble'} optimum).`;
  }
  s += ` Its yield-weighted η is ${fx(drop * 100, 2)} percentage points below its η under AM1.5G (${pc(a.referenceEfficiency, 3)}).`;
  const m = w.mismatch;
  if (m) {
    s += ` At the AM1.5G-optimal gaps the subcells' photocurrents differ by ${fx(m.reference * 100, 2)} % under AM1.5G and by ${fx(m.min * 100, 2)}–${fx(m.max * 100, 2)} % across the ensemble's spectra (${fx(m.energyWeightedMean * 100, 2)} % averaged by energy received; largest over smallest J_gen).`;
  }
  return s;
}

/** The 2T-versus-4T sentence: the usual pattern in words, then only what these numbers show. */
export function wiringPatternText(c: EnsembleComparison): string {
  const find = (key: string) => c.wirings.find((w) => w.outcome.wiring.key === key);
  const two = find('series');
  const four = find('independent');
  const pp = (w: WiringComparison) => `${fx(w.lossAbs * 100, 3)} percentage points (${fx(w.lossRel * 100, 3)} % relative)`;
  const general = 'Series (2T) stacks usually lose more than independent (4T) ones when the light departs from the reference, because a 2T stack is current-matched for one spectrum and the match drifts as the spectrum changes, while a 4T stack runs every subcell at its own maximum power point.';
  const rest = c.wirings.filter((w) => w !== two && w !== four).map((w) => `${wiringTitle(w.outcome.wiring.key).split(' (')[0]} loses ${pp(w)}.`);
  if (!two || !four) {
    const one = c.wirings.map((w) => `${wiringTitle(w.outcome.wiring.key).split(' (')[0]}: the AM1.5G-optimised design loses ${pp(w)}.`);
    return [general, 'This design does not compare 2T with 4T.', ...one].join(' ');
  }
  const d = two.lossAbs - four.lossAbs;
  const here =
    belowResolution(d)
      ? `Here, against each wiring's ensemble optimum, the losses show ${NO_DIFFERENCE}: 2T ${pp(two)}, 4T ${pp(four)}.`
      : d > 0
        ? `Here, against each wiring's ensemble optimum, the 2T stack loses more: ${pp(two)} against ${pp(four)} for 4T.`
        : `Here, against each wiring's ensemble optimum, the 4T stack loses more, against the usual pattern: ${pp(four)} against ${pp(two)} for 2T.`;
  const drop = (w: WiringComparison) => w.referenceOptimal.referenceEfficiency - w.referenceOptimal.yieldEfficiency;
  const fall = `From η under AM1.5G to yield-weighted η over the ensemble at the same AM1.5G-optimal gaps, the 2T stack falls ${fx(drop(two) * 100, 2)} percentage points and the 4T stack ${fx(drop(four) * 100, 2)}.`;
  return [general, here, fall, ...rest].join(' ');
}

/** The ensemble's light in a few rows: irradiance distribution, APE, temperatures, each beside AM1.5G. */
export function lightSummaryRows(design: Design, c: EnsembleComparison): string[][] {
  const s = c.summary;
  const r = c.referenceSpectrum;
  const hours = s.weightUnit === 'hours';
  const apes = s.ape.perMember.flatMap((p) => (p.apeEv !== null && Number.isFinite(p.apeEv) ? [p.apeEv] : []));
  const rows: string[][] = [
    ['spectra', `${s.count}, total weight ${fx(s.totalWeight, hours ? 1 : 3)}${hours ? ' h' : ' (relative energy shares)'}`, '1'],
    ['irradiance, smallest [W/m²]', fx(s.irradianceWm2.min, 1), fx(r.pinWm2, 1)],
    ['irradiance, weighted median [W/m²]', fx(s.irradianceWm2.median, 1), fx(r.pinWm2, 1)],
    ['irradiance, weighted mean [W/m²]', fx(s.weightedMeanIrradianceWm2, 1), fx(r.pinWm2, 1)],
    ['irradiance, largest [W/m²]', fx(s.irradianceWm2.max, 1), fx(r.pinWm2, 1)],
  ];
  if (hours) rows.push(['energy received, Σ w·P_in [kWh/m²]', fx((s.weightedMeanIrradianceWm2 * s.totalWeight) / 1000, 1), '–']);
  rows.push([
    `average photon energy, ${s.ape.windowNm[0]}–${s.ape.windowNm[1]} nm [eV]`,
    s.ape.weightedMeanEv === null ? 'not available' : `${fx(s.ape.weightedMeanEv, 4)} weighted mean${apes.length > 0 ? ` (members ${fx(Math.min(...apes), 3)}–${fx(Math.max(...apes), 3)})` : ''}`,
    fx(c.referenceApeEv, 4),
  ]);
  rows.push(['cell temperature [K]', s.tempK.min === s.tempK.max ? fx(s.tempK.min, 1) : `${fx(s.tempK.min, 1)}–${fx(s.tempK.max, 1)}`, fx(design.tempK, 1)]);
  return rows;
}

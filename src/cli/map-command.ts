/** `gapstack map`: efficiency over two gaps, as CSV or JSON for reports and slides. */
import { UserError } from '../errors.js';
import { writeFileAtomic } from '../io/atomic-write.js';
import { buildObjective } from '../stack/objectives.js';
import { computeMap, mapToCsvBytes, uniformAxis, type GapMap } from '../search/map.js';
import { subcellBounds } from '../search/optimize.js';
import { constraintBounds } from '../search/design-search.js';
import { CAUTION, describeCoupling } from '../report/assumptions.js';
import { round } from './format.js';
import { startProgress } from './progress.js';
import { checkWorkSize, mapStacks } from './work-size.js';
import { parseNumber, parseNumberList, parseRange, stackFromArgs, type StackArgs } from './options.js';
import { cellsFromArgs, constraintsFromArgs, familyIndices, requireMeasuredFixed, spanFromArgs, type ConstraintArgs } from './search-options.js';
import { spectraFromArgs, type SpectraArgs, CLI_EXTEND_HINT } from './spectra-options.js';
import { finiteJson } from './guards.js';
import { toolVersion } from '../io/version.js';
import { createHash } from 'node:crypto';
import { coverageWarnings } from '../light/coverage.js';
import { assertNotAnInput, forgetInputs } from '../io/inputs.js';
import { clockSeconds } from '../io/clock.js';

export interface MapArgs extends StackArgs, ConstraintArgs, SpectraArgs {
  /** Run even when the size check estimates hours of work. */
  acceptLarge?: boolean;
  cells?: unknown;
  axes?: unknown;
  x?: unknown;
  y?: unknown;
  step?: unknown;
  span?: unknown;
  out?: string;
  json?: boolean;
}

export function mapJson(m: GapMap, meta: Record<string, unknown>): Record<string, unknown> {
  const nx = m.x.length;
  const rows = Array.from({ length: m.y.length }, (_, iy) => Array.from({ length: nx }, (_, ix) => {
    const v = m.values[iy * nx + ix];
    return Number.isNaN(v) ? null : round(v, 8);
  }));
  return {
    ...meta,
    x_subcell: m.xCell + 1,
    y_subcell: m.yCell + 1,
    x_ev: Array.from(m.x),
    y_ev: Array.from(m.y),
    efficiency: rows,
    profile: m.profile,
    best: { x_ev: m.best.x, y_ev: m.best.y, efficiency: round(m.best.value, 10) },
    layout: 'efficiency[iy][ix] is the value at (x_ev[ix], y_ev[iy]); null where the upper gap is not above the lower',
    caution: CAUTION,
  };
}

export async function mapCommand(a: MapArgs): Promise<string> {
  const cells = cellsFromArgs(a.cells);
  if (cells < 2) throw new UserError('a map needs at least 2 subcells (--cells 2 or more)');
  const axes = a.axes === undefined ? [1, 2] : parseNumberList('axes', a.axes);
  if (axes.length !== 2 || !axes.every((v) => Number.isInteger(v) && v >= 1 && v <= cells) || !(axes[0] < axes[1])) {
    throw new UserError(`--axes takes two subcells "i,j" with 1 ≤ i < j ≤ ${cells} (upper first), got "${String(a.axes)}"`);
  }
  if (a.x === undefined || a.y === undefined || a.step === undefined) throw new UserError('--x, --y and --step are required, e.g. --x 1.5:2.0 --y 0.9:1.3 --step 0.005 (eV)');
  const [x0, x1] = parseRange('x', a.x);
  const [y0, y1] = parseRange('y', a.y);
  const step = parseNumber('step', a.step);
  if (!(step >= 1e-4 && step <= 0.5)) throw new UserError(`--step must be within 0.0001–0.5 eV, got ${String(a.step)}`);
  if (!(x0 > 0 && y0 > 0)) throw new UserError('--x and --y must be positive gaps in eV');
  const out = a.out;
  if (out !== undefined && !/\.(csv|json)$/i.test(out)) throw new UserError(`--out must end in .csv or .json, got "${out}"`);
  const constraints = constraintsFromArgs(a, cells, spanFromArgs(a.span));
  const spec = stackFromArgs(Array.from({ length: cells }, (_, i) => 2.5 - 0.3 * i), a, familyIndices(constraints));
  requireMeasuredFixed(spec, constraints);
  const xCell = axes[0] - 1;
  const yCell = axes[1] - 1;
  for (const i of [xCell, yCell]) if (constraints[i].kind !== 'free') throw new UserError(`subcell ${i + 1} is mapped; it cannot also be fixed, ranged or bound`);
  const allowed = constraints.map((c) => constraintBounds(c, spec.tempK));
  const fixed = allowed.map((b) => b.fixed);
  const bounds = subcellBounds({ cells, spanEv: spanFromArgs(a.span), ranges: allowed.map((b) => b.range), fixed, loss: 0.01 });
  forgetInputs();
  const members = await spectraFromArgs(a, spec.tempK);
  // The light is read now: an --out that would replace one of its files is refused before the work.
  if (out !== undefined) assertNotAnInput(out, '--out');
  const xAxis = uniformAxis(x0, x1, step);
  const yAxis = uniformAxis(y0, y1, step);
  const profiled = fixed.some((g, i) => g === undefined && i !== xCell && i !== yCell);
  checkWorkSize('map', mapStacks(xAxis.length, yAxis.length, profiled), members.length, Boolean(a.acceptLarge));
  const obj = buildObjective(spec, members);
  const t0 = clockSeconds();
  const bar = a.json ? null : await startProgress('mapping');
  let m: GapMap;
  try {
    m = computeMap(obj, { x: xAxis, y: yAxis, xCell, yCell, fixed, bounds, progress: bar?.update });
  } finally {
    bar?.stop();
  }
  const seconds = clockSeconds() - t0;
  const meta = {
    wiring: spec.wiring.label,
    cells,
    temp_k: spec.tempK,
    coupling: describeCoupling(spec.coupling),
    step_ev: step,
    fixed_ev: fixed.map((f) => f ?? null),
    spectra: members.map((s) => ({ label: s.label, sha256: s.spectrum.sha256, pin_w_m2: round(s.spectrum.pinWm2) })),
  };
  const free = Array.from({ length: cells }, (_, i) => i).filter((i) => i !== xCell && i !== yCell && fixed[i] === undefined);
  // The lowest gap the map uses: its axes' low ends, fixed gaps, and the span where other subcells are maximised.
  const lowestGapEv = Math.min(x0, y0, ...fixed.filter((g): g is number => g !== undefined), ...(free.length > 0 ? [spanFromArgs(a.span)[0]] : []));
  const warnings = members.length === 1 ? coverageWarnings(members[0].spectrum, lowestGapEv, CLI_EXTEND_HINT) : [];
  const metaLines = [
    `tool: gapstack ${toolVersion()}`,
    `wiring: ${spec.wiring.label}; subcells: ${cells}; cell temperature: ${spec.tempK} K; coupling: ${meta.coupling}`,
    ...(members.length <= 3
      ? members.map((s) => `light: ${s.label}, P_in ${round(s.spectrum.pinWm2)} W/m², SHA-256 ${s.spectrum.sha256}`)
      : [`light: ensemble of ${members.length} spectra, SHA-256 of their SHA-256s in order ${createHash('sha256').update(members.map((s) => s.spectrum.sha256).join('\n')).digest('hex')}`]),
    'units: gaps [eV], efficiency [%]',
  ];
  const csv = () => withCsvWarnings(mapToCsvBytes(m, free, metaLines), warnings);
  if (out) writeFileAtomic(out, /\.json$/i.test(out) ? finiteJson(mapJson(m, { ...meta, warnings })) : csv(), '--out');
  const points = m.points;
  const summary = {
    out: out ?? null,
    points,
    seconds: round(seconds, 4),
    best: { x_ev: m.best.x, y_ev: m.best.y, efficiency: round(m.best.value, 10) },
    profile: m.profile,
    warnings,
    caution: CAUTION,
  };
  if (a.json) return finiteJson(out ? summary : mapJson(m, { ...meta, warnings }), null, 2);
  if (!out) return new TextDecoder().decode(csv()).trimEnd();
  return [
    `Wrote ${points} points to ${out} (${seconds.toFixed(3)} s).`,
    `Best on the map: ${(m.best.value * 100).toFixed(3)} % at subcell ${xCell + 1} = ${m.best.x.toFixed(4)} eV, subcell ${yCell + 1} = ${m.best.y.toFixed(4)} eV${m.profile ? ' (other gaps maximised per point)' : ''}.`,
    ...warnings.map((w) => `Warning: ${w}`),
    CAUTION,
  ].join('\n');
}

/** Warnings as `# Warning:` comment lines after the CSV's first comment line (bytes, as mapToCsvBytes writes them). */
function withCsvWarnings(csv: Uint8Array, warnings: string[]): Uint8Array {
  if (warnings.length === 0) return csv;
  const cut = csv.indexOf(10) + 1;
  const lines = Buffer.from(warnings.map((w) => `# Warning: ${w}\n`).join(''), 'utf8');
  return Buffer.concat([csv.subarray(0, cut), lines, csv.subarray(cut)]);
}

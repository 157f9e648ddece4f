/**
 * `gapstack materials fit FILE`: fit a composition ↔ gap model to measured
 * (composition, gap) points and, on request, write a family definition a
 * design file can use under `materials:`. ml-matrix (and, to check the written
 * formula, mathjs) load only here.
 */
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { UserError, fileError } from '../errors.js';
import { writeFileAtomic } from '../io/atomic-write.js';
import { splitTableRows } from '../light/table-file.js';
import { parseNumber } from './options.js';

export interface MaterialsFitArgs {
  file?: string;
  model?: string;
  write?: string;
  familyId?: string;
  name?: string;
  variable?: string;
  dedt?: unknown;
  index?: unknown;
  json?: boolean;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** (composition, gap [eV]) points from a table with a header such as "composition,gap_eV". */
export function gapPointsFromText(file: string, text: string): { x: number; gapEv: number }[] {
  const rows = splitTableRows(file, text);
  if (rows.length === 0) throw fileError(file, undefined, 'holds no data rows');
  const head = rows[0];
  if (head.cells.length !== 2 || NUMBER.test(head.cells[0])) throw fileError(file, head.line, 'needs a header naming two columns, e.g. "composition,gap_eV"');
  if (!/ev/i.test(head.cells[1])) throw fileError(file, head.line, `header column "${head.cells[1]}" must name the gap in eV, e.g. "gap_eV"`);
  return rows.slice(1).map(({ line, cells }) => {
    if (cells.length !== 2) throw fileError(file, line, `expected 2 columns, found ${cells.length}`);
    for (const c of cells) if (!NUMBER.test(c)) throw fileError(file, line, `"${c}" is not a finite number`);
    const x = Number(cells[0]);
    const g = Number(cells[1]);
    if (!(x >= 0 && x <= 1)) throw fileError(file, line, `composition ${cells[0]} must lie within [0, 1] (a fraction, not percent)`);
    if (!(g > 0 && g < 10)) throw fileError(file, line, `gap ${cells[1]} must be a positive number of eV below 10`);
    return { x, gapEv: g };
  });
}

/** --model: "bowing" (default) or "poly:N". */
function formOf(model: string | undefined): import('../materials/fit.js').FitForm {
  const m = (model ?? 'bowing').trim().toLowerCase();
  if (m === 'bowing') return { kind: 'bowing' };
  const p = /^poly(?:nomial)?:(\d)$/.exec(m);
  if (p) return { kind: 'polynomial', degree: Number(p[1]) };
  throw new UserError(`--model must be "bowing" or "poly:N" with N from 1 to 6, got "${model}"`);
}

const f6 = (v: number) => Number(v.toPrecision(6));

export async function materialsFitCommand(a: MaterialsFitArgs): Promise<string> {
  if (!a.file) throw new UserError('name a file of measured points: gapstack materials fit FILE (header e.g. "composition,gap_eV")');
  let text: string;
  try {
    text = readFileSync(a.file, 'utf8');
  } catch (err) {
    throw new UserError(`${a.file}: cannot open (${(err as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  const points = gapPointsFromText(a.file, text);
  const form = formOf(a.model);
  const { fitGapModel, formulaOf } = await import('../materials/fit.js');
  const fit = fitGapModel(points, form);
  const coeffs = fit.coefficients;
  const polynomial = form.kind === 'bowing' ? [coeffs[0], coeffs[1] - coeffs[0] - coeffs[2], coeffs[2]] : coeffs;
  const gapAt = (x: number) => polynomial.reduceRight((s, c) => s * x + c, 0);
  const xs = points.map((p) => p.x);
  const range: [number, number] = [Math.min(...xs), Math.max(...xs)];
  let family: Record<string, unknown> | undefined;
  if (a.write !== undefined) {
    if (a.dedt === undefined || a.index === undefined) throw new UserError('--write needs --dedt (dE_g/dT [eV/K]) and --index (refractive index): a family definition states them, and a fit cannot know them');
    const gaps = Array.from({ length: 101 }, (_, k) => gapAt(range[0] + ((range[1] - range[0]) * k) / 100));
    family = {
      id: a.familyId ?? (basename(a.file).replace(/\.[^.]*$/, '').toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '') || 'my-films'),
      name: a.name ?? `Fitted films (${basename(a.file)})`,
      variable: a.variable ?? 'composition x as in the measured points',
      ...(form.kind === 'bowing' ? { ea_ev: f6(coeffs[0]), eb_ev: f6(coeffs[1]), bowing_ev: f6(coeffs[2]) } : { gap_formula: formulaOf(coeffs) }),
      window_ev: [f6(Math.min(...gaps)), f6(Math.max(...gaps))],
      window_reason: `the compositions measured (x = ${range[0]}–${range[1]}); outside them the fit is an extrapolation`,
      range: range[0] < range[1] ? range : [0, 1],
      dEg_dT_ev_per_k: parseNumber('dedt', a.dedt),
      refractive_index: parseNumber('index', a.index),
      source: `least-squares fit to ${points.length} measured points in ${basename(a.file)} (rms residual ${(fit.rmsEv * 1000).toFixed(1)} meV)`,
    };
    // The written family must load as a design file would read it.
    const { familyFromEntry } = await import('../materials/user-family.js');
    const { polynomialFromFormula } = await import('../materials/formula.js');
    const f = family as unknown as import('../materials/user-family.js').UserFamilyEntry;
    familyFromEntry(f, '--write', f.gap_formula !== undefined ? polynomialFromFormula(f.gap_formula, 'gap_formula') : undefined);
    const { stringify } = await import('yaml');
    writeFileAtomic(a.write, `# Family definition from gapstack materials fit; paste under materials: in a design file.\n${stringify([family])}`);
  }
  if (a.json) {
    return JSON.stringify(
      {
        model: form.kind === 'bowing' ? 'bowing' : `poly:${form.degree}`,
        points: points.length,
        coefficients: fit.names.map((n, k) => ({ name: n, value_ev: coeffs[k], standard_error_ev: fit.standardErrors[k] })),
        residuals_ev: points.map((p, k) => ({ x: p.x, gap_ev: p.gapEv, residual_ev: fit.residualsEv[k] })),
        rms_ev: fit.rmsEv,
        dof: fit.dof,
        ...(form.kind === 'polynomial' ? { formula: formulaOf(coeffs) } : {}),
        written: a.write ?? null,
      },
      null,
      2,
    );
  }
  const lines = [
    `Least-squares fit of ${form.kind === 'bowing' ? 'E_g = (1 − x)·ea + x·eb − b·x(1 − x)' : `a degree-${form.degree} polynomial in x`} to ${points.length} points (${fit.dof} degrees of freedom):`,
    ...fit.names.map((n, k) => `  ${n.padEnd(10)} ${coeffs[k].toFixed(5)} ± ${fit.standardErrors[k].toFixed(5)} eV`),
    ...(form.kind === 'polynomial' ? [`  formula    ${formulaOf(coeffs)}`] : []),
    `rms residual ${(fit.rmsEv * 1000).toFixed(2)} meV; residuals [meV] by composition:`,
    ...points.map((p, k) => `  x = ${p.x.toFixed(4)}  E_g = ${p.gapEv.toFixed(4)} eV  residual ${(fit.residualsEv[k] * 1000).toFixed(2)}`),
    ...(a.write !== undefined ? [`Wrote the family definition to ${a.write}.`] : []),
    'Caution: a fit describes only the compositions measured; standard errors assume independent, equal errors on the gaps.',
  ];
  return lines.join('\n');
}

/**
 * Fitting a composition ↔ gap model to measured (x, E_g) points by linear
 * least squares (ml-matrix): the bowing form E_g = (1 − x)·E_A + x·E_B − b·x(1 − x)
 * or a polynomial Σ c_k x^k of a stated degree. Both are linear in their
 * parameters, so β = argmin ‖Aβ − y‖², with covariance s²(AᵀA)⁻¹,
 * s² = RSS/(n − p) (ordinary least squares; e.g. Draper & Smith, Applied
 * Regression Analysis, 3rd ed. (1998), ch. 5). Loaded only by `materials fit`.
 */
import { Matrix, inverse, solve } from 'ml-matrix';
import { UserError } from '../errors.js';

export type FitForm = { kind: 'bowing' } | { kind: 'polynomial'; degree: number };

export interface GapPoint {
  /** Composition [-]. */
  x: number;
  /** Measured gap [eV]. */
  gapEv: number;
}

export interface GapFit {
  form: FitForm;
  /** Parameter names: ea_ev, eb_ev, bowing_ev, or c0 … c_d. */
  names: string[];
  /** Fitted parameters [eV]. */
  coefficients: number[];
  /** Standard error of each parameter [eV]. */
  standardErrors: number[];
  /** Measured − fitted gap per point [eV]. */
  residualsEv: number[];
  /** Root-mean-square residual [eV] and degrees of freedom n − p. */
  rmsEv: number;
  dof: number;
}

/** Design-matrix row of one composition. */
function basis(form: FitForm, x: number): number[] {
  if (form.kind === 'bowing') return [1 - x, x, -x * (1 - x)];
  return Array.from({ length: form.degree + 1 }, (_, k) => x ** k);
}

/**
 * Least-squares fit of a gap model to points.
 * @throws UserError when there are not more points than parameters, or the compositions cannot separate them
 */
export function fitGapModel(points: readonly GapPoint[], form: FitForm): GapFit {
  const p = form.kind === 'bowing' ? 3 : form.degree + 1;
  if (form.kind === 'polynomial' && !(Number.isInteger(form.degree) && form.degree >= 1 && form.degree <= 6)) throw new UserError(`a polynomial fit takes a degree from 1 to 6, got ${form.degree}`);
  if (points.length <= p) throw new UserError(`${points.length} points cannot fit ${p} parameters with standard errors; give at least ${p + 1}`);
  const distinct = new Set(points.map((q) => q.x)).size;
  if (distinct < p) throw new UserError(`${distinct} distinct compositions cannot separate ${p} parameters; measure more compositions`);
  const a = new Matrix(points.map((q) => basis(form, q.x)));
  const y = Matrix.columnVector(points.map((q) => q.gapEv));
  const beta = solve(a, y, true);
  const fitted = a.mmul(beta);
  const residualsEv = points.map((q, i) => q.gapEv - fitted.get(i, 0));
  const rss = residualsEv.reduce((s, r) => s + r * r, 0);
  const dof = points.length - p;
  const cov = inverse(a.transpose().mmul(a)).mul(rss / dof);
  const names = form.kind === 'bowing' ? ['ea_ev', 'eb_ev', 'bowing_ev'] : Array.from({ length: p }, (_, k) => `c${k}`);
  return {
    form,
    names,
    coefficients: beta.getColumn(0),
    standardErrors: Array.from({ length: p }, (_, k) => Math.sqrt(Math.max(0, cov.get(k, k)))),
    residualsEv,
    rmsEv: Math.sqrt(rss / points.length),
    dof,
  };
}

/** The fitted polynomial as a formula string a design file can hold (gap_formula). */
export function formulaOf(coefficientsEv: readonly number[]): string {
  return coefficientsEv
    .map((c, k) => {
      const v = Number(c.toPrecision(6));
      const term = k === 0 ? `${Math.abs(v)}` : k === 1 ? `${Math.abs(v)}*x` : `${Math.abs(v)}*x^${k}`;
      return { sign: v < 0 ? '-' : '+', term };
    })
    .map((t, k) => (k === 0 ? `${t.sign === '-' ? '-' : ''}${t.term}` : ` ${t.sign} ${t.term}`))
    .join('');
}

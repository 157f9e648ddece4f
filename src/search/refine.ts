/**
 * Local refinement of a candidate: Nelder–Mead simplex (Nelder & Mead,
 * Comput. J. 7 (1965) 308) on the free gaps, inside per-subcell boxes, with
 * the ordering E_1 > E_2 > … enforced by the objective (out of order scores 0).
 */

export interface Box {
  lo: number[];
  hi: number[];
}

/** Maximise f over x in the box by Nelder–Mead; returns the best point and value. */
export function nelderMeadMax(f: (x: number[]) => number, x0: number[], step: number, box: Box, tol = 1e-6, maxEvals = 4000): { x: number[]; value: number; evals: number } {
  const d = x0.length;
  const clamp = (x: number[]) => x.map((v, i) => Math.min(box.hi[i], Math.max(box.lo[i], v)));
  let evals = 0;
  const F = (x: number[]) => {
    evals++;
    return f(x);
  };
  if (d === 0) return { x: [], value: F([]), evals };
  let simplex: { x: number[]; v: number }[] = [];
  const start = clamp(x0);
  simplex.push({ x: start, v: F(start) });
  for (let i = 0; i < d; i++) {
    const x = start.slice();
    x[i] = x[i] + step <= box.hi[i] ? x[i] + step : x[i] - step;
    const c = clamp(x);
    simplex.push({ x: c, v: F(c) });
  }
  while (evals < maxEvals) {
    simplex.sort((a, b) => b.v - a.v);
    const bestV = simplex[0].v;
    const worst = simplex[d];
    let size = 0;
    for (let k = 1; k <= d; k++) for (let i = 0; i < d; i++) size = Math.max(size, Math.abs(simplex[k].x[i] - simplex[0].x[i]));
    if (size < tol) break;
    const centroid = new Array<number>(d).fill(0);
    for (let k = 0; k < d; k++) for (let i = 0; i < d; i++) centroid[i] += simplex[k].x[i] / d;
    const along = (t: number) => clamp(centroid.map((c, i) => c + t * (worst.x[i] - c)));
    const xr = along(-1);
    const vr = F(xr);
    if (vr > bestV) {
      const xe = along(-2);
      const ve = F(xe);
      simplex[d] = ve > vr ? { x: xe, v: ve } : { x: xr, v: vr };
    } else if (vr > simplex[d - 1].v) {
      simplex[d] = { x: xr, v: vr };
    } else {
      const outside = vr > worst.v;
      const xc = along(outside ? -0.5 : 0.5);
      const vc = F(xc);
      if (vc > (outside ? vr : worst.v)) simplex[d] = { x: xc, v: vc };
      else {
        const b = simplex[0].x;
        simplex = simplex.map((p, k) => {
          if (k === 0) return p;
          const x = clamp(p.x.map((v, i) => b[i] + 0.5 * (v - b[i])));
          return { x, v: F(x) };
        });
      }
    }
  }
  simplex.sort((a, b) => b.v - a.v);
  return { x: simplex[0].x, value: simplex[0].v, evals };
}

/**
 * Polish by a compass search on a fine lattice: single-coordinate moves and,
 * for series ridges, moves of neighbouring pairs together.
 */
export function compassMax(f: (x: number[]) => number, x0: number[], step: number, box: Box, minStep = 1e-5): { x: number[]; value: number } {
  const d = x0.length;
  let x = x0.slice();
  let v = f(x);
  const dirs: number[][] = [];
  for (let i = 0; i < d; i++) {
    const e = new Array<number>(d).fill(0);
    e[i] = 1;
    dirs.push(e, e.map((c) => -c));
  }
  for (let i = 0; i + 1 < d; i++) {
    const e = new Array<number>(d).fill(0);
    e[i] = 1;
    e[i + 1] = 1;
    dirs.push(e, e.map((c) => -c));
  }
  let h = step;
  while (h >= minStep) {
    let improved = false;
    for (const dir of dirs) {
      const y = x.map((c, i) => c + h * dir[i]);
      if (y.some((c, i) => c < box.lo[i] || c > box.hi[i])) continue;
      const vy = f(y);
      if (vy > v) {
        x = y;
        v = vy;
        improved = true;
      }
    }
    if (!improved) h /= 2;
  }
  return { x, value: v };
}

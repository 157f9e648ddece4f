/**
 * Golden-section search for the maximum of a unimodal function on [lo, hi]
 * (Kiefer, Proc. Am. Math. Soc. 4 (1953) 502). Returns the maximising argument.
 */
export function goldenSectionMax(f: (x: number) => number, lo: number, hi: number, tol: number): number {
  const g = (Math.sqrt(5) - 1) / 2;
  let x1 = hi - g * (hi - lo);
  let x2 = lo + g * (hi - lo);
  let f1 = f(x1);
  let f2 = f(x2);
  while (hi - lo > tol) {
    if (f1 < f2) {
      lo = x1;
      x1 = x2;
      f1 = f2;
      x2 = lo + g * (hi - lo);
      f2 = f(x2);
    } else {
      hi = x2;
      x2 = x1;
      f2 = f1;
      x1 = hi - g * (hi - lo);
      f1 = f(x1);
    }
  }
  return 0.5 * (lo + hi);
}

/** Golden-section maximum of a function on [a, b] after a coarse scan; returns the argument. */
export function maximiseScan(f: (x: number) => number, a: number, b: number, scan = 48, tol = 1e-12): number {
  let best = a;
  let bestF = -Infinity;
  for (let k = 0; k <= scan; k++) {
    const x = a + ((b - a) * k) / scan;
    const fx = f(x);
    if (fx > bestF) {
      bestF = fx;
      best = x;
    }
  }
  const h = (b - a) / scan;
  return goldenSectionMax(f, Math.max(a, best - h), Math.min(b, best + h), tol * Math.max(1, Math.abs(b)));
}

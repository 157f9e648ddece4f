/**
 * Principal branch W₀ of the Lambert W function for x ≥ 0, by Halley's
 * iteration (Corless et al., Adv. Comput. Math. 5 (1996) 329). Written here so
 * the hot path does not load a general math library.
 */
export function lambertW0(x: number): number {
  if (!(x >= 0)) return NaN;
  if (x === 0) return 0;
  if (!Number.isFinite(x)) return Infinity;
  // Starting point: log asymptote for large x, series near zero.
  let w: number;
  if (x < 1) w = x * (1 - x);
  else {
    const l1 = Math.log(x);
    const l2 = Math.log(l1 > 1 ? l1 : 1);
    w = l1 - l2 + (l1 > 1 ? l2 / l1 : 0);
    if (w <= 0) w = 0.5;
  }
  for (let k = 0; k < 50; k++) {
    const ew = Math.exp(w);
    const f = w * ew - x;
    const wp1 = w + 1;
    const step = f / (ew * wp1 - ((w + 2) * f) / (2 * wp1));
    w -= step;
    if (Math.abs(step) <= 1e-15 * (1 + Math.abs(w))) break;
  }
  return w;
}

/**
 * W₀(e^y) for large y without overflow (y = ln x), by Newton on w + ln w = y.
 */
export function lambertW0OfExp(y: number): number {
  if (y < 700) return lambertW0(Math.exp(y));
  let w = y - Math.log(y);
  for (let k = 0; k < 50; k++) {
    const step = (w + Math.log(w) - y) / (1 + 1 / w);
    w -= step;
    if (Math.abs(step) <= 1e-15 * w) break;
  }
  return w;
}

/** Numbers for people, shared by the report and the command line. */

/** Fixed decimals with no "-0". */
export function fixed(x: number | null | undefined, digits: number): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '–';
  const s = x.toFixed(digits);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}

/**
 * Fixed `digits` decimals below 1e5 in magnitude, engineering notation above
 * (exponent a multiple of 3, four significant digits): a concentrated current
 * reads 1.987e6 rather than 1986932.12.
 */
export function engineering(x: number | null | undefined, digits: number): string {
  if (x === null || x === undefined || !Number.isFinite(x) || Math.abs(x) < 1e5) return fixed(x, digits);
  const e3 = Math.floor(Math.log10(Math.abs(x)) / 3) * 3;
  const m = x / 10 ** e3;
  return `${m.toFixed(Math.max(0, 3 - Math.floor(Math.log10(Math.abs(m)))))}e${e3}`;
}

/**
 * Composition all the way through: a gap interval of a subcell bound to an
 * alloy family, read in the family's composition units on the branch of the
 * optimum's composition (a gap with two compositions, as in tin–lead
 * perovskites, keeps the branch the optimum lies on).
 */
import { compositionsForGap, gapAtReference, gapFromComposition, type AbsorberFamily } from '../materials/index.js';

export interface CompositionInterval {
  /** Subcell, 0-based from the top. */
  subcell: number;
  family: string;
  /** What x means (the family's variable). */
  variable: string;
  /** Composition at the optimum and the interval's ends [-]; an end the model cannot reach is the range end, flagged. */
  x: number;
  lowX: number;
  highX: number;
  /** True where the gap interval ran past the family's composition range. */
  clipped: boolean;
}

/**
 * Compositions [-] of a gap interval [eV at tempK] around an optimum gap, on the optimum's branch.
 * @returns undefined when the family is a fixed compound or the optimum gap is out of its reach
 */
export function compositionInterval(family: AbsorberFamily, subcell: number, optimumEv: number, lowEv: number, highEv: number, tempK: number): CompositionInterval | undefined {
  if (family.kind !== 'alloy' || !family.variable) return undefined;
  const roots = (g: number) => compositionsForGap(family, gapAtReference(family, g, tempK));
  const at = roots(optimumEv);
  if (at.length === 0) return undefined;
  const x = at[0];
  const gx = gapFromComposition(family, x);
  const nearest = (g: number): { x: number; clipped: boolean } => {
    const r = roots(g);
    if (r.length === 0) {
      // Past the model's reach: the range end towards which the gap moves the same way.
      const [e0, e1] = family.compositionRange;
      const towards = (e: number) => Math.sign(gapFromComposition(family, e) - gx) === Math.sign(gapAtReference(family, g, tempK) - gx);
      return { x: towards(e1) ? e1 : e0, clipped: true };
    }
    return { x: r.reduce((b, c) => (Math.abs(c - x) < Math.abs(b - x) ? c : b), r[0]), clipped: false };
  };
  const a = nearest(lowEv);
  const b = nearest(highEv);
  return { subcell, family: family.id, variable: family.variable.meaning, x, lowX: Math.min(a.x, b.x), highX: Math.max(a.x, b.x), clipped: a.clipped || b.clipped };
}

/** One tick of a secondary composition axis: the gap [eV at tempK] where the composition is x. */
export interface CompositionTick {
  gapEv: number;
  x: number;
}

/** A secondary axis in composition units for a gap axis of a bound subcell. */
export interface CompositionAxis {
  subcell: number;
  family: string;
  /** Axis title, e.g. "x: Br fraction … (perovskite-i-br)". */
  label: string;
  ticks: CompositionTick[];
}

/**
 * Ticks every `stepX` of composition whose gap (at tempK) lies on a gap axis [loEv, hiEv], on the
 * branch of the family's practical window (the lower-composition branch where a gap has two).
 * @returns undefined for fixed compounds or when fewer than two ticks fall on the axis
 */
export function compositionAxis(family: AbsorberFamily, subcell: number, loEv: number, hiEv: number, tempK: number, stepX = 0.05): CompositionAxis | undefined {
  if (family.kind !== 'alloy' || !family.variable) return undefined;
  const [x0, x1] = family.compositionRange;
  const window = family.window.composition ?? [x0, x1];
  const ticks: CompositionTick[] = [];
  for (let k = Math.ceil(x0 / stepX - 1e-9); k * stepX <= x1 + 1e-9; k++) {
    const x = Number((k * stepX).toFixed(10));
    if (x < window[0] - 1e-9 || x > window[1] + 1e-9) continue;
    // The gap at tempK: the reference gap moved by dE_g/dT (inverse of gapAtReference).
    const g = gapFromComposition(family, x) + (gapAtReference(family, 0, 300) - gapAtReference(family, 0, tempK));
    if (g >= loEv - 1e-9 && g <= hiEv + 1e-9) ticks.push({ gapEv: g, x });
  }
  if (ticks.length < 2) return undefined;
  return { subcell, family: family.id, label: `x: ${family.variable.meaning} (${family.id})`, ticks };
}

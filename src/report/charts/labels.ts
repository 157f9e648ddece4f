/**
 * Label placement without collisions. Every chart that writes text inside a
 * plot (isolines, markers, windows, fixed absorbers, the maximum power point)
 * places it through one board: the board knows the plot's edges and every box
 * already taken (markers, earlier labels), tries a label's candidate places in
 * order, then shorter forms of its text (the full text goes in a tooltip), and
 * reports failure so the caller can drop an optional label (an isoline's).
 *
 * Text boxes are estimated from DejaVu Sans advance widths (the charts' first
 * font); a small margin covers the other fonts of the stack.
 */

/** An axis-aligned box in the plot's pixels. */
export interface Box {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}

export type Anchor = 'start' | 'middle' | 'end';

/** A place to try: the text's anchor point (x, baseline y) and its anchor. */
export interface Candidate {
  x: number;
  y: number;
  anchor: Anchor;
}

/** A label the board accepted. */
export interface Placed extends Candidate {
  text: string;
  /** The uncut text when `text` was shortened (for a tooltip). */
  full?: string;
  box: Box;
}

export interface TextStyle {
  /** Font size [px]. */
  size: number;
  bold?: boolean;
}

// Advance widths of DejaVu Sans [em] (its hmtx table at 2048 units/em), grouped.
const NARROW = new Set([...'iljI.,:;|!\'']);
const SLIM = new Set([...' ()[]/\\tfr-']);
const WIDE = new Set([...'mwMW%']);
const UPPER = /[A-ZΓΔΘΛΞΠΣΦΨΩ]/;

/** Estimated advance of one character [em] in DejaVu Sans. */
function charEm(ch: string): number {
  if (NARROW.has(ch)) return 0.3;
  if (SLIM.has(ch)) return 0.4;
  if (WIDE.has(ch)) return 0.97;
  if (ch === '−' || ch === '≥' || ch === '≤') return 0.84;
  if (UPPER.test(ch)) return 0.74;
  return 0.64;
}

/** Estimated width of `text` [px] at `style` (bold DejaVu is about 10 % wider). */
export function textWidthPx(text: string, style: TextStyle): number {
  let em = 0;
  for (const ch of text) em += charEm(ch);
  return em * style.size * (style.bold ? 1.1 : 1) * 1.03;
}

/** The box of `text` drawn at a candidate (baseline y): ascent 0.8 em above, descent 0.25 em below. */
export function textBox(c: Candidate, text: string, style: TextStyle): Box {
  const w = textWidthPx(text, style);
  const x0 = c.anchor === 'start' ? c.x : c.anchor === 'end' ? c.x - w : c.x - w / 2;
  return { x0, y0: c.y - 0.8 * style.size, x1: x0 + w, y1: c.y + 0.25 * style.size };
}

/** Whether two boxes overlap, each grown by `pad` [px]. */
export function boxesOverlap(a: Box, b: Box, pad = 0): boolean {
  return a.x0 - pad < b.x1 && b.x0 - pad < a.x1 && a.y0 - pad < b.y1 && b.y0 - pad < a.y1;
}

/** A box around a point, `r` [px] each way. */
export function pointBox(x: number, y: number, r: number): Box {
  return { x0: x - r, y0: y - r, x1: x + r, y1: y + r };
}

/** `text` cut to `chars` characters, ending in "…". */
function cut(text: string, chars: number): string {
  const cs = [...text];
  return cs.length <= chars ? text : `${cs.slice(0, chars - 1).join('').trimEnd()}…`;
}

export class LabelBoard {
  private readonly taken: Box[] = [];

  /**
   * @param bounds the area labels must stay inside [px]
   * @param gap clearance kept between a label and anything else [px]
   */
  constructor(
    readonly bounds: Box,
    readonly gap = 2,
  ) {}

  /** Mark a box as taken (a marker, a label drawn elsewhere). */
  reserve(b: Box): void {
    this.taken.push(b);
  }

  /** Whether a box lies inside the bounds and clear of everything taken. */
  fits(b: Box): boolean {
    const B = this.bounds;
    if (b.x0 < B.x0 || b.y0 < B.y0 || b.x1 > B.x1 || b.y1 > B.y1) return false;
    return this.taken.every((t) => !boxesOverlap(b, t, this.gap));
  }

  /** The first candidate where the whole text fits; the label is reserved. */
  place(cands: Candidate[], text: string, style: TextStyle): Placed | null {
    for (const c of cands) {
      const box = textBox(c, text, style);
      if (this.fits(box)) {
        this.reserve(box);
        return { ...c, text, box };
      }
    }
    return null;
  }

  /**
   * The first of `variants` (longest, most informative first) that fits at
   * any candidate; a variant after the first keeps the first as its full text.
   */
  placeVariant(cands: Candidate[], variants: string[], style: TextStyle): Placed | null {
    for (let k = 0; k < variants.length; k++) {
      const p = this.place(cands, variants[k], style);
      if (p) return k === 0 ? p : { ...p, full: variants[0] };
    }
    return null;
  }

  /**
   * The whole text at the first candidate that takes it; failing that, the
   * longest cut (down to `minChars` characters) that fits anywhere, with the
   * full text kept for a tooltip.
   */
  placeOrShorten(cands: Candidate[], text: string, style: TextStyle, minChars = 6): Placed | null {
    const whole = this.place(cands, text, style);
    if (whole) return whole;
    for (let n = [...text].length - 1; n >= minChars; n--) {
      const p = this.place(cands, cut(text, n), style);
      if (p) return { ...p, full: text };
    }
    return null;
  }
}

/**
 * SVG as text, built from data with d3 on a server-side DOM (d3-node). One
 * DOM serves every chart of a report: each chart appends its <svg>, is
 * serialised and removed. Text goes in through text nodes only, so the
 * serialiser escapes whatever a user wrote; user text never goes into
 * attributes.
 */
import { D3Node } from 'd3-node';

/** The slice of a d3 selection the charts use. */
export interface Sel {
  append(name: string): Sel;
  attr(name: string, value: string | number | null): Sel;
  text(value: string): Sel;
  call(fn: (s: Sel) => void): Sel;
  selectAll(selector: string): Sel;
  remove(): Sel;
  node(): Element | null;
}

/** A d3 axis generator, configured fluently. */
export interface AxisGen {
  (s: Sel): void;
  ticks(count: number, format?: string): AxisGen;
  tickFormat(f: (v: number) => string): AxisGen;
  tickSizeOuter(n: number): AxisGen;
  tickSizeInner(n: number): AxisGen;
  tickValues(v: number[]): AxisGen;
}

interface D3Module {
  axisBottom(scale: unknown): AxisGen;
  axisLeft(scale: unknown): AxisGen;
  axisRight(scale: unknown): AxisGen;
}

/** Font stack for every chart; resvg resolves the first installed family. */
export const FONT_FAMILY = 'DejaVu Sans, Liberation Sans, Arial, Helvetica, sans-serif';

let shared: D3Node | undefined;

function dom(): D3Node {
  shared ??= new D3Node();
  return shared;
}

/** The d3 bundled with d3-node (axes). */
export function d3(): D3Module {
  return dom().d3 as D3Module;
}

/** Build one SVG: `draw` gets the root selection; returns the serialised markup. */
export function buildSvg(width: number, height: number, attrs: Record<string, string | number>, draw: (svg: Sel) => void): string {
  const n = dom();
  const svg = n.createSVG(width, height, { viewBox: `0 0 ${width} ${height}`, 'font-family': FONT_FAMILY, 'font-size': 12, ...attrs }) as Sel;
  try {
    draw(svg);
    return n.svgString();
  } finally {
    svg.remove();
  }
}

/** Text safe for SVG/XML text nodes: no control characters, no no-break spaces (the HTML serialiser writes &nbsp;). */
export function svgText(s: string): string {
  // eslint-disable-next-line no-control-regex
  return s.replace(/[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/g, '').replace(/\u00A0/g, ' ');
}

/** A number for an attribute: fixed decimals, no "-0". */
export function num(x: number, digits = 2): string {
  const s = x.toFixed(digits);
  // "-0", "-0.00": a negative that rounds to zero loses its sign (a number test, not a pattern: maps format thousands).
  return s.charCodeAt(0) === 45 && Number(s) === 0 ? s.slice(1) : s;
}

/** Path data through points, breaking the line at nulls. */
export function linePath(points: ([number, number] | null)[], digits = 2): string {
  let d = '';
  let pen = false;
  for (const p of points) {
    if (!p) {
      pen = false;
      continue;
    }
    d += `${pen ? 'L' : 'M'}${num(p[0], digits)},${num(p[1], digits)}`;
    pen = true;
  }
  return d;
}

/** Restyle an axis group d3 drew: the chart font, slightly larger ticks. */
export function styleAxis(g: Sel): void {
  g.attr('font-family', FONT_FAMILY).attr('font-size', 11);
}

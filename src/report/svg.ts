/**
 * SVG as text, built from data with d3 on a server-side DOM (d3-node, on the
 * linkedom window every build gives it: src/report/dom/). One DOM serves
 * every chart of a report: each chart appends its <svg>, is serialised and
 * removed. Text goes in through text nodes only, so the serialiser escapes
 * whatever a user wrote; user text never goes into attributes, and the
 * serialiser escapes attributes too.
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
    const root = svg.node();
    if (!root) throw new Error('buildSvg: the chart has no <svg> element');
    return svgMarkup(root);
  } finally {
    svg.remove();
  }
}

const ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', '\u00A0': '&#160;', '\t': '&#9;', '\n': '&#10;', '\r': '&#13;' };
const escapeText = (s: string): string => s.replace(/[&<>\u00A0]/g, (c) => ESCAPES[c]);
// Tabs and line breaks as references too: an XML reader turns them into spaces in attribute values.
const escapeAttribute = (s: string): string => s.replace(/[&<"\u00A0\t\n\r]/g, (c) => ESCAPES[c]);

/**
 * An element and its subtree as XML, which an HTML page also reads as inline
 * SVG: names as created (clipPath keeps its capital), every element closed
 * with an end tag, text escaped (& < >) and attribute values escaped (& < "
 * and tab, line feed, carriage return). Attributes come in the order the
 * chart set them, whichever order the DOM lists them in (linkedom lists them
 * newest first, by design). Only elements and text are written: charts hold
 * no comments or CDATA. (linkedom also tidies a class list as it is set:
 * repeated names and extra spaces go; charts set tidy ones.)
 */
export function svgMarkup(el: Element): string {
  return markup(el, el.ownerDocument ? listsNewestFirst(el.ownerDocument) : false);
}

function markup(el: Element, newestFirst: boolean): string {
  let out = `<${el.localName}`;
  const attrs = el.attributes;
  const n = attrs.length;
  for (let k = 0; k < n; k++) {
    const a = attrs[newestFirst ? n - 1 - k : k];
    out += ` ${a.name}="${escapeAttribute(a.value)}"`;
  }
  out += '>';
  // Sibling links, not childNodes: linkedom builds a fresh list for each childNodes read.
  for (let child = el.firstChild; child; child = child.nextSibling) {
    if (child.nodeType === 1) out += markup(child as Element, newestFirst);
    else if (child.nodeType === 3) out += escapeText((child as Text).data);
  }
  return `${out}</${el.localName}>`;
}

const newestFirstByDocument = new WeakMap<Document, boolean>();

/** Whether a document's DOM lists an element's attributes newest first: asked once, of a probe element. */
function listsNewestFirst(doc: Document): boolean {
  let answer = newestFirstByDocument.get(doc);
  if (answer === undefined) {
    const probe = doc.createElementNS('http://www.w3.org/2000/svg', 'g');
    probe.setAttribute('a', '');
    probe.setAttribute('b', '');
    answer = probe.attributes[0].name === 'b';
    newestFirstByDocument.set(doc, answer);
  }
  return answer;
}

/** Text safe for SVG/XML text nodes: no control characters, no no-break spaces (a chart's text is plain spaces and printable characters). */
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

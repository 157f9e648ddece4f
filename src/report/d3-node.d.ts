/** The parts of d3-node (server-side d3 on a DOM), d3-selection and d3-axis the report uses; they ship no types. */
declare module 'd3-node' {
  export class D3Node {
    constructor(options?: { selector?: string; container?: string; styles?: string });
    /** The d3 module d3-node bundles (selection, axes). */
    readonly d3: unknown;
    readonly document: Document;
    createSVG(width?: number, height?: number, attrs?: Record<string, string | number>): unknown;
  }
}

/** The parts of d3's selection and axis modules src/report/dom/d3-parts.ts re-exports; they ship no types. */
declare module 'd3-selection' {
  export function select(node: unknown): unknown;
}
declare module 'd3-axis' {
  export function axisBottom(scale: unknown): unknown;
  export function axisLeft(scale: unknown): unknown;
  export function axisRight(scale: unknown): unknown;
  export function axisTop(scale: unknown): unknown;
}

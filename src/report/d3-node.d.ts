/** The part of d3-node (server-side d3 on jsdom) the report uses; it ships no types. */
declare module 'd3-node' {
  export class D3Node {
    constructor(options?: { selector?: string; container?: string; styles?: string });
    /** The d3 module d3-node bundles (selection, axes). */
    readonly d3: unknown;
    readonly document: Document;
    createSVG(width?: number, height?: number, attrs?: Record<string, string | number>): unknown;
    svgString(): string;
  }
}

/**
 * Stands in for cssomnom's CSS parser, which linkedom calls only to give a
 * <style> element its `sheet`. No chart reads a style sheet, and the parser is
 * a quarter of a megabyte of code to load on every report; every build
 * resolves linkedom's `cssomnom/parse` here (scripts/report-dom.mjs), so a
 * future use fails loudly instead of quietly parsing nothing.
 */
export function parse(): never {
  throw new Error('gapstack builds without a CSS parser: a chart read a <style> element\'s sheet (see src/report/dom/no-style-sheets.ts)');
}

/**
 * The d3 d3-node hands the charts: selection and axes, the parts the report
 * draws with. d3-node imports all of d3 (about 300 kB of modules, forces,
 * zoom, transitions…); every build resolves its `d3` to this module
 * (scripts/report-dom.mjs) so only these load.
 */
export { select } from 'd3-selection';
export { axisBottom, axisLeft, axisRight, axisTop } from 'd3-axis';

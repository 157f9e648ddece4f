/**
 * The command modules, each loaded when its command runs. Every entry
 * imports `./<name>-command.js` for its own name and nothing else: the bundle
 * build (scripts/bundle-cli.mjs) relies on that when it replaces this table
 * with one that loads each command's own bundle.
 */
export const commandModules = {
  evaluate: () => import('./evaluate-command.js'),
  spectrum: () => import('./spectrum-command.js'),
  optimize: () => import('./optimize-command.js'),
  map: () => import('./map-command.js'),
  yield: () => import('./yield-command.js'),
  report: () => import('./report-command.js'),
  sky: () => import('./sky-command.js'),
  figure: () => import('./figure-command.js'),
  materials: () => import('./materials-command.js'),
  'materials-fit': () => import('./materials-fit-command.js'),
  sites: () => import('./sites-command.js'),
};

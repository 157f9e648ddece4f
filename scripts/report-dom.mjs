/**
 * Where the report's DOM comes from, for every build: the command-line and
 * library bundles (scripts/bundle-cli.mjs) and the test runner
 * (vitest.config.ts). d3-node asks for `jsdom` and the whole of `d3`; the
 * report gets a linkedom window and d3's selection and axes instead
 * (src/report/dom/). linkedom's CSS parser, used only for a <style>
 * element's sheet, is replaced by one that throws. Only imports made from
 * inside those two packages are redirected.
 */
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('..', import.meta.url));

/** [package the import is made from, specifier, module in src/report/dom/] */
const REDIRECTS = [
  ['d3-node', 'jsdom', 'linkedom-window'],
  ['d3-node', 'd3', 'd3-parts'],
  ['linkedom', 'cssomnom/parse', 'no-style-sheets'],
];

/**
 * The file a redirected import resolves to, or undefined. `from` is 'dist'
 * (compiled modules, for the bundles) or 'src' (TypeScript, for the tests).
 */
export function reportDomFile(specifier, importer, from) {
  if (!importer) return undefined;
  const at = importer.replace(/\\/g, '/');
  for (const [pkg, spec, file] of REDIRECTS) {
    if (specifier === spec && at.includes(`/node_modules/${pkg}/`)) {
      return join(root, from, 'report', 'dom', `${file}.${from === 'src' ? 'ts' : 'js'}`);
    }
  }
  return undefined;
}

/** The redirects as an esbuild plugin (bundles of dist/). */
export const reportDomEsbuild = {
  name: 'report-dom',
  setup(build) {
    build.onResolve({ filter: /^(jsdom|d3|cssomnom\/parse)$/ }, (args) => {
      const path = reportDomFile(args.path, args.importer, 'dist');
      return path ? { path } : undefined;
    });
  },
};

/** The redirects as a Vite plugin (the test runner, on src/). */
export const reportDomVite = {
  name: 'report-dom',
  enforce: 'pre',
  resolveId(specifier, importer) {
    return reportDomFile(specifier, importer, 'src') ?? null;
  },
};

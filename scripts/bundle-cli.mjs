#!/usr/bin/env node
/**
 * Build step: bundle the command line (dist/cli/main.js, compiled by tsc)
 * and the library entry (dist/index.js) into dist/bundle/, which
 * bin/gapstack.js and the package's exports load. Node 20's ES-module loader
 * pays for every file it resolves and links (yargs alone is about 40 files and
 * 90 ms); one bundle with a chunk per lazily loaded command cuts that to a
 * few files. yargs, yaml (design files and manifests; about 60 CommonJS
 * files, 40 ms to load from node_modules) and d3-node are bundled, d3-node
 * with the report's DOM (linkedom and d3's selection and axes, by the
 * redirects of scripts/report-dom.mjs, which the tests use too). Other
 * packages stay outside, loaded from node_modules only by the commands that
 * use them, and every lazily loaded command is its own chunk, so heavy ones
 * (report, figures, maps) cost nothing on the engine commands' path.
 *
 * The bundle sits one folder below dist/, like every compiled module, so the
 * paths the modules build from import.meta.url ('../../spectra/…') resolve
 * the same from it.
 *
 * string-width (yargs measures its help layout with it on every call, shown
 * or not) builds Unicode property regexes and an Intl.Segmenter when it is
 * loaded and on first use, 17–26 ms on every call. In the bundle it answers
 * printable ASCII itself (one column per character, as string-width does)
 * and loads the real module on the first other string.
 */
import { readFileSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';
import * as esbuild from 'esbuild';
import { reportDomEsbuild } from './report-dom.mjs';

const root = fileURLToPath(new URL('..', import.meta.url));
const pkg = JSON.parse(readFileSync(`${root}package.json`, 'utf8'));
const bundled = new Set(['yargs', 'd3-node', 'linkedom', 'd3-selection', 'd3-axis', 'yaml']);
const external = [...Object.keys(pkg.dependencies ?? {}), ...Object.keys(pkg.devDependencies ?? {}), 'canvas'].filter((d) => !bundled.has(d));

/** string-width, loaded on the first string that is not printable ASCII. */
const deferStringWidth = (name = 'string-width') => ({
  name: 'defer-string-width',
  setup(build) {
    build.onResolve({ filter: new RegExp(`^${name}$`) }, (args) => {
      if (args.namespace === 'deferred') return undefined;
      const real = createRequire(args.importer).resolve(name);
      return { path: real, namespace: 'deferred' };
    });
    build.onLoad({ filter: /.*/, namespace: 'deferred' }, (args) => ({
      contents: [
        'let real;',
        'export default function stringWidth(text, options) {',
        "  if (typeof text === 'string' && /^[\\x20-\\x7e]*$/.test(text)) return text.length;",
        `  real ??= require(${JSON.stringify(args.path)}).default;`,
        '  return real(text, options);',
        '}',
        '',
      ].join('\n'),
      loader: 'js',
      resolveDir: root,
    }));
  },
});

const outdir = `${root}dist/bundle`;
rmSync(outdir, { recursive: true, force: true });
await esbuild.build({
  entryPoints: { main: `${root}dist/cli/main.js`, index: `${root}dist/index.js` },
  bundle: true,
  splitting: true,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  outdir,
  external,
  plugins: [deferStringWidth(), reportDomEsbuild],
  logLevel: 'warning',
  // Bundled CommonJS code calls require() for Node's own modules.
  // Made on first use: createRequire costs milliseconds, and most chunks never call it.
  banner: {
    js: [
      "import { createRequire as gapstackCreateRequire } from 'node:module';",
      'let gapstackRequire;',
      'const gapstackLoad = () => (gapstackRequire ??= gapstackCreateRequire(import.meta.url));',
      'const require = Object.assign((id) => gapstackLoad()(id), { resolve: (id, options) => gapstackLoad().resolve(id, options) });',
    ].join(' '),
  },
  legalComments: 'inline',
  // Whitespace and syntax are minified (V8 parses every byte of a chunk it loads);
  // identifiers are not, so functions and classes keep their names (stack traces under
  // --debug) without keepNames, whose call per function defined cost the report's
  // bundled DOM library about a tenth of the command's time.
  minifyWhitespace: true,
  minifySyntax: true,
});

#!/usr/bin/env node
/**
 * Build step: bundle the command line and the library entry into dist/bundle/.
 *
 * The command line is CommonJS, one bundle for the front (dist/cli/main.js:
 * yargs and the command table, `cli.cjs`) and one per command
 * (`<name>-command.cjs`, each with everything its command imports), loaded by
 * bin/load-bundle.cjs with the V8 code caches that
 * scripts/prime-code-cache.mjs writes beside them. Node 20's ES-module
 * loader pays for every file it resolves and links and has no code cache; a
 * quick command here reads two files and compiles little. The command table
 * (dist/cli/commands.js, each name importing ./<name>-command.js) is
 * replaced in the front by one that loads each command's bundle. The
 * library entry (dist/index.js) stays an ES module with a chunk per lazily
 * loaded part (`index.js`, which package.json exports).
 *
 * yargs, yaml (design files and manifests; about 60 CommonJS files, 40 ms to
 * load from node_modules) and d3-node are bundled, d3-node with the report's
 * DOM (linkedom and d3's selection and axes, by the redirects of
 * scripts/report-dom.mjs, which the tests use too). Other packages stay
 * outside, loaded from node_modules only by the commands that use them.
 *
 * Every bundle sits one folder below dist/, like every compiled module, so
 * the paths the modules build from import.meta.url ('../../spectra/…')
 * resolve the same from it; in the CommonJS bundles import.meta.url is the
 * bundle's own URL, which the loader passes in as gapstackBundleUrl.
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

/** Whitespace and syntax are minified (V8 parses every byte it loads); identifiers are not,
 * so functions and classes keep their names (stack traces under --debug) without keepNames,
 * whose call per function defined cost the report's bundled DOM library about a tenth of the
 * command's time. */
const shared = { bundle: true, platform: 'node', target: 'node20', external, legalComments: 'inline', minifyWhitespace: true, minifySyntax: true, logLevel: 'warning' };

// The library entry: an ES module with chunks.
await esbuild.build({
  ...shared,
  entryPoints: { index: `${root}dist/index.js` },
  splitting: true,
  format: 'esm',
  outdir,
  plugins: [reportDomEsbuild],
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
});

/** The command table's entries, checked against the pattern the replacement relies on. */
const tableFile = `${root}dist/cli/commands.js`;
const tableText = readFileSync(tableFile, 'utf8');
const commands = [...tableText.matchAll(/["']?([a-z-]+)["']?: \(\) => import\(["']\.\/([a-z-]+)-command\.js["']\)/g)].map((m) => {
  if (m[1] !== m[2]) throw new Error(`dist/cli/commands.js: "${m[1]}" loads ${m[2]}-command.js; each name must load <name>-command.js`);
  return m[1];
});
if (commands.length === 0 || commands.length !== (tableText.match(/=> import\(/g) ?? []).length) {
  throw new Error('dist/cli/commands.js: every entry must read name: () => import(\'./<name>-command.js\')');
}

/** The front's command table: each command from its own bundle, through the loader. */
const commandBundles = {
  name: 'command-bundles',
  setup(build) {
    build.onLoad({ filter: /[\\/]dist[\\/]cli[\\/]commands\.js$/ }, () => ({
      contents: `export const commandModules = {\n${commands.map((c) => `  ${JSON.stringify(c)}: async () => gapstackLoadBundle(${JSON.stringify(`${c}-command`)}),`).join('\n')}\n};\n`,
      loader: 'js',
    }));
  },
};

// The command line: CommonJS, the front and one self-contained bundle per command.
await esbuild.build({
  ...shared,
  entryPoints: { cli: `${root}dist/cli/main.js`, ...Object.fromEntries(commands.map((c) => [`${c}-command`, `${root}dist/cli/${c}-command.js`])) },
  format: 'cjs',
  outdir,
  outExtension: { '.js': '.cjs' },
  plugins: [deferStringWidth(), commandBundles, reportDomEsbuild],
  define: { 'import.meta.url': 'gapstackBundleUrl' },
  // import() of a package becomes require() (Node 20.19 requires ES modules too): a script
  // compiled by the loader would need an experimental dynamic-import hook, which V8 drops
  // from functions it takes from a code cache.
  supported: { 'dynamic-import': false },
});

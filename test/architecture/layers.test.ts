/**
 * Layers point down only, and no import chain comes back to its start
 * (DEVELOPERS.md, "Layers"). The first two tests check src/; the others check
 * the checker on small invented file sets, so a silent checker cannot pass.
 */
import { describe, expect, it } from 'vitest';
import { importCycles, importEdges, layerOf, layerViolations, MAY_IMPORT, packagesLoadedBy, readSources, SRC_DIR, type SourceFile } from './layer-rule.js';

describe('the layer rule of src/', () => {
  const files = readSources(SRC_DIR);

  it('holds: no file imports a layer above its own', () => {
    expect(files.length).toBeGreaterThan(50);
    expect(importEdges(files).length).toBeGreaterThan(100);
    expect(layerViolations(files)).toEqual([]);
  });

  it('has no import cycle between files', () => {
    expect(importCycles(files)).toEqual([]);
  });

  it('loads no heavy package when the library or the command line is imported (they load where used)', () => {
    // DEVELOPERS.md conventions: templating, charts, matrices and browsers load dynamically.
    const heavy = /^(d3-node|mathjs|ml-matrix|playwright|playwright-core|jsdom|@resvg\/resvg-js|handlebars)(\/.*)?$/;
    for (const entry of ['index.ts', 'cli/main.ts']) {
      const loaded = [...packagesLoadedBy(files, entry)];
      expect(loaded.length, entry).toBeGreaterThan(0);
      expect(loaded.filter((p) => heavy.test(p)), entry).toEqual([]);
    }
    // The check sees through to a heavy import when one is there.
    expect([...packagesLoadedBy(files, 'report/build.ts')].filter((p) => heavy.test(p))).toEqual(expect.arrayContaining(['handlebars/runtime.js', 'd3-node']));
  });

  it('is a partial order: no layer may import a layer that may import it', () => {
    for (const [a, allowed] of Object.entries(MAY_IMPORT)) {
      for (const b of allowed) expect(MAY_IMPORT[b]?.includes(a) ?? false, `${a} ↔ ${b}`).toBe(false);
    }
  });
});

describe('the checker', () => {
  const f = (path: string, text: string): SourceFile => ({ path, text });

  it('names files by their layer', () => {
    expect(layerOf('light/spectrum.ts')).toBe('light');
    expect(layerOf('errors.ts')).toBe('errors');
    expect(layerOf('index.ts')).toBe('index');
    expect(layerOf('report/charts/frame.ts')).toBe('report');
  });

  it('reports an upward import, static, type-only, re-exported or dynamic', () => {
    const files = [
      f('light/a.ts', "import { x } from '../search/b.js';"),
      f('light/c.ts', "import type { X } from '../stack/model.js';"),
      f('junction/d.ts', "export { y } from '../report/e.js';"),
      f('stack/f.ts', "const m = await import('../cli/main.js');"),
      f('search/b.ts', ''),
      f('stack/model.ts', ''),
      f('report/e.ts', ''),
      f('cli/main.ts', ''),
    ];
    const v = layerViolations(files);
    expect(v).toHaveLength(4);
    expect(v[0]).toBe('src/light/a.ts imports src/search/b.ts: light/ may not import search/ (light/ may import errors, physics, numerics, io)');
    expect(v.join('\n')).toContain('src/light/c.ts imports src/stack/model.ts');
    expect(v.join('\n')).toContain('src/junction/d.ts imports src/report/e.ts');
    expect(v.join('\n')).toContain('src/stack/f.ts imports src/cli/main.ts');
  });

  it('allows downward and same-layer imports and ignores packages', () => {
    const files = [
      f('cli/a.ts', "import { r } from '../report/r.js';\nimport yargs from 'yargs';\nimport { readFileSync } from 'node:fs';"),
      f('report/r.ts', "import { s } from './s.js';\nimport { p } from '../physics/constants.js';"),
      f('report/s.ts', ''),
      f('physics/constants.ts', ''),
    ];
    expect(layerViolations(files)).toEqual([]);
    expect(importEdges(files)).toHaveLength(3);
  });

  it('reports a folder the layer table does not place', () => {
    expect(layerViolations([f('widgets/w.ts', '')])).toEqual([
      "src/widgets/w.ts: layer 'widgets' is not in the layer table; place it there and in DEVELOPERS.md",
    ]);
  });

  it('finds a cycle, also through a folder index and type-only imports', () => {
    const files = [
      f('report/compute.ts', "import { c } from './compare.js';"),
      f('report/compare.ts', "import type { O } from './compute.js';"),
      f('design/index.ts', "export * from './types.js';"),
      f('design/types.ts', "import type { D } from '../design';"),
      f('light/ok.ts', "import { q } from '../physics/constants.js';"),
      f('physics/constants.ts', ''),
    ];
    expect(importCycles(files).sort()).toEqual([
      'src/design/index.ts → src/design/types.ts → src/design/index.ts',
      'src/report/compare.ts → src/report/compute.ts → src/report/compare.ts',
    ]);
  });
});

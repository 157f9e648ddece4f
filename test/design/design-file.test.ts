/**
 * Design files: the schema, YAML and JSON parsing, errors that name the field
 * and (for YAML) the line, and the constraints no schema can express.
 */
import { copyFileSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { DESIGN_SCHEMA_PATH, loadDesign, loadDesignText, loadScenarioSet } from '../../src/design/index.js';
import { UserError } from '../../src/errors.js';

const ROOT = new URL('../..', import.meta.url).pathname;
const EXAMPLE = join(ROOT, 'examples/perovskite-silicon.yaml');
const dir = mkdtempSync(join(tmpdir(), 'gapstack-design-'));

function file(name: string, text: string): string {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}

/** The UserError message a design raises. */
async function failure(name: string, text: string): Promise<string> {
  try {
    await loadDesign(file(name, text));
  } catch (err) {
    expect(err).toBeInstanceOf(UserError);
    return (err as Error).message;
  }
  throw new Error(`${name} loaded without error`);
}

const TWO_CELLS = `name: test
subcells:
  - material: perovskite-i-br
  - gap: 1.12
`;

describe('the schema', () => {
  test('is a valid draft 2020-12 schema that ajv compiles in strict mode', () => {
    const schema = JSON.parse(readFileSync(DESIGN_SCHEMA_PATH, 'utf8'));
    expect(schema.$schema).toBe('https://json-schema.org/draft/2020-12/schema');
    expect(() => new Ajv2020({ strict: true }).compile(schema)).not.toThrow();
  });

  test('every example design validates and resolves', async () => {
    const examples = readdirSync(join(ROOT, 'examples')).filter((f) => /\.(ya?ml|json)$/.test(f));
    expect(examples.length).toBeGreaterThanOrEqual(1);
    for (const f of examples) {
      const text = readFileSync(join(ROOT, 'examples', f), 'utf8');
      expect(text, f).toMatch(/illustrative/i);
      const set = await loadScenarioSet(join(ROOT, 'examples', f));
      expect(set.scenarios.length, f).toBeGreaterThanOrEqual(1);
    }
    const d = await loadDesign(EXAMPLE);
    expect(d.name).toMatch(/illustrative/);
    expect(d.subcells.map((s) => s.constraint.kind)).toEqual(['material', 'material']);
    expect(d.wirings.map((w) => w.key)).toEqual(['series', 'independent']);
    expect(d.pairs).toEqual([{ xCell: 0, yCell: 1, xRangeEv: [1.45, 2.25], yRangeEv: [0.8, 1.45] }]);
    expect(d.light.kind).toBe('spectrum');
    expect(d.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  test('defaults: AM1.5G, 300 K, series and independent, 1 % loss, span 0.5–2.6 eV', async () => {
    const d = await loadDesign(file('defaults.yaml', TWO_CELLS));
    expect(d.tempK).toBe(300);
    expect(d.loss).toBe(0.01);
    expect(d.spanEv).toEqual([0.5, 2.6]);
    expect(d.wirings.map((w) => w.key)).toEqual(['series', 'independent']);
    expect(d.reference.spectrum.name).toMatch(/AM1\.5G/);
    expect(d.pairs).toEqual([{ xCell: 0, yCell: 1, xRangeEv: undefined, yRangeEv: undefined }]);
  });
});

describe('YAML errors name the field and the line', () => {
  test('an unknown key, at its own line', async () => {
    const msg = await failure('unknown.yaml', `name: x\nsubcells:\n  - gap: 1.7\n  - gap: 1.1\n    colour: red\n`);
    expect(msg).toMatch(/unknown\.yaml:5: subcells\[1\]\.colour: unknown key "colour"; allowed here: label, free, range, gap, material/);
  });

  test('an unknown top-level key', async () => {
    const msg = await failure('top.yaml', `name: x\nsubcells:\n  - gap: 1.1\nwiring: series\n`);
    expect(msg).toMatch(/top\.yaml:4: wiring: unknown key "wiring"/);
  });

  test('a number out of range, with the allowed bound', async () => {
    const msg = await failure('temp.yaml', `name: x\ntemperature: 100\nsubcells:\n  - gap: 1.1\n`);
    expect(msg).toMatch(/temp\.yaml:2: temperature: must be ≥ 150 \(got 100\)/);
  });

  test('a wrong type deep in a list', async () => {
    const msg = await failure('type.yaml', `name: x\nsubcells:\n  - gap: 1.7\n  - range: [0.9, high]\n`);
    expect(msg).toMatch(/type\.yaml:4: subcells\[1\]\.range\[1\]: must be a number \(got "high"\)/);
  });

  test('a wiring that does not exist, with the allowed forms', async () => {
    const msg = await failure('wiring.yaml', `name: x\nsubcells:\n  - gap: 1.7\n  - gap: 1.1\nwirings:\n  - series\n  - parallel\n`);
    expect(msg).toMatch(/wiring\.yaml:7: wirings\[1\]: "parallel" is not allowed; expected series \(or 2t\), independent \(or 4t\), 3t, vm:M:N .*groups:1\+2\/3/);
  });

  test('several problems: all listed, the first line the first problem', async () => {
    const msg = await failure('many.yaml', `name: x\ntemperature: 900\nsubcells:\n  - gap: 1.7\n    ere: 2\noptics:\n  lc: radiative:abc\n`);
    const lines = msg.split('\n');
    expect(lines[0]).toMatch(/many\.yaml:2: temperature: .*\(and 2 more problems, listed below\)/);
    expect(lines[1]).toMatch(/many\.yaml:5: subcells\[0\]\.ere: must be ≤ 1/);
    expect(lines[2]).toMatch(/many\.yaml:7: optics\.lc: "radiative:abc" is not allowed; expected luminescent coupling/);
  });

  test('a missing required key names its parent', async () => {
    const msg = await failure('missing.yaml', `subcells:\n  - gap: 1.1\n`);
    expect(msg).toMatch(/missing\.yaml:1: \(top level\): missing required key "name"/);
  });

  test('broken YAML syntax gives the line', async () => {
    const msg = await failure('syntax.yaml', `name: x\nsubcells:\n  - gap: 1.1\n  gap: [1.2\n`);
    expect(msg).toMatch(/syntax\.yaml:\d+: not valid YAML/);
  });

  test('a duplicated key is an error', async () => {
    const msg = await failure('dup.yaml', `name: x\nname: y\nsubcells:\n  - gap: 1.1\n`);
    expect(msg).toMatch(/dup\.yaml:2: not valid YAML: .*unique/i);
  });
});

describe('JSON design files', () => {
  test('a valid JSON design loads', async () => {
    const d = await loadDesign(file('ok.json', JSON.stringify({ name: 'json', subcells: [{ gap: 1.7 }, { gap: 1.1 }], wirings: ['series'] })));
    expect(d.subcells.map((s) => s.constraint)).toEqual([
      { kind: 'fixed', gapEv: 1.7 },
      { kind: 'fixed', gapEv: 1.1 },
    ]);
  });

  test('schema errors name the field and its line', async () => {
    const text = JSON.stringify({ name: 'json', subcells: [{ gap: 1.7 }, { gap: 1.1, tint: 3 }] }, null, 2);
    const msg = await failure('bad.json', text);
    const line = text.split('\n').findIndex((l) => l.includes('"tint"')) + 1;
    expect(msg).toMatch(new RegExp(`bad\\.json:${line}: subcells\\[1\\]\\.tint: unknown key "tint"`));
  });

  test('a JSON syntax error gives a line', async () => {
    const msg = await failure('syntax.json', '{\n  "name": "x",\n  "subcells": [\n}\n');
    expect(msg).toMatch(/syntax\.json:\d+: not valid JSON/);
  });

  test('a duplicated key is an error, as in YAML', async () => {
    const msg = await failure('dup.json', '{\n  "name": "x",\n  "name": "y",\n  "subcells": [{"gap": 1.1}]\n}\n');
    expect(msg).toMatch(/dup\.json:3: .*unique/i);
  });
});

describe('messages speak of design fields', () => {
  test('a spectrum file without units names spectrum.units, not a flag', async () => {
    const spec = file('bare.tsv', '300\t0.5\n400\t1.0\n500\t1.2\n');
    const msg = await failure('bare.yaml', `name: x\nspectrum:\n  source: ${spec}\nsubcells:\n  - gap: 1.7\n  - gap: 1.1\n`);
    expect(msg).toContain('spectrum.units');
    expect(msg).not.toContain('--units');
  });

  test('per-interface lists read sensibly for two subcells', async () => {
    const msg = await failure('inter.yaml', 'name: x\nsubcells:\n  - gap: 1.7\n  - gap: 1.1\noptics:\n  interlayer_transmittance: [0.9, 0.8]\n');
    expect(msg).toMatch(/optics\.interlayer_transmittance: takes one value \(there is one interface\), got 2/);
  });
});

describe('impossible constraints are errors that name the field', () => {
  test('more subcells than a stack holds', async () => {
    const cells = Array.from({ length: 7 }, (_, i) => `  - gap: ${(2.4 - 0.2 * i).toFixed(1)}`).join('\n');
    const msg = await failure('seven.yaml', `name: x\nsubcells:\n${cells}\n`);
    expect(msg).toMatch(/seven\.yaml:2: subcells: a stack holds at most 6 subcells \(got 7\)/);
  });

  test('fixed gaps that ascend', async () => {
    const msg = await failure('ascend.yaml', `name: x\nsubcells:\n  - gap: 1.12\n  - gap: 1.5\n`);
    expect(msg).toMatch(/ascend\.yaml:4: subcells\[1\]\.gap: fixed gaps must descend from the top: subcell 2 \(1\.5000 eV\) is not below subcell 1 \(1\.1200 eV\)/);
  });

  test('a fixed gap outside the search span', async () => {
    const msg = await failure('span.yaml', `name: x\nsearch:\n  span: [0.8, 2.4]\nsubcells:\n  - gap: 2.6\n  - free: true\n`);
    expect(msg).toMatch(/span\.yaml:5: subcells\[0\]\.gap: fixed gap 2\.6000 eV lies outside the search span 0\.8–2\.4 eV/);
  });

  test('a fixed mapped gap outside its map axis', async () => {
    const msg = await failure('axis.yaml', `${TWO_CELLS}map:\n  pairs:\n    - axes: [1, 2]\n      y: [0.8, 1.0]\n`);
    expect(msg).toMatch(/axis\.yaml:8: map\.pairs\[0\]\.y: subcell 2 is fixed at 1\.1200 eV, outside this axis range 0\.8–1 eV/);
  });

  test('a range below a fixed gap beneath it', async () => {
    const msg = await failure('order.yaml', `name: x\nsubcells:\n  - range: [1.0, 1.3]\n  - gap: 1.42\n`);
    expect(msg).toMatch(/order\.yaml:4: subcells\[1\]\.gap: .*gaps must descend from the top/);
  });

  test('two kinds of constraint on one subcell', async () => {
    const msg = await failure('both.yaml', `name: x\nsubcells:\n  - gap: 1.7\n    material: perovskite-i-br\n  - gap: 1.1\n`);
    expect(msg).toMatch(/both\.yaml:4: subcells\[0\]\.material: give one of free, range, gap or material, not gap and material/);
  });

  test('an unknown material lists the known ones', async () => {
    const msg = await failure('mat.yaml', `name: x\nsubcells:\n  - material: unobtainium\n  - gap: 1.1\n`);
    expect(msg).toMatch(/mat\.yaml:3: subcells\[0\]\.material: unknown material family "unobtainium"; known families: .*perovskite-i-br/);
  });

  test('a three-terminal wiring needs exactly two subcells', async () => {
    const msg = await failure('3t.yaml', `name: x\nsubcells:\n  - free: true\n  - free: true\n  - gap: 0.7\nwirings: [series, 3t]\n`);
    expect(msg).toMatch(/3t\.yaml:6: wirings\[1\]: wiring 3t needs exactly 2 subcells/);
  });

  test('coupling efficiencies: one per interface', async () => {
    const msg = await failure('lc.yaml', `${TWO_CELLS}optics:\n  lc: [0.5, 0.3]\n`);
    expect(msg).toMatch(/lc\.yaml:6: optics\.lc: takes one efficiency \(there is one interface\), got 2/);
  });

  test('absorptance below 1 only on the top cell', async () => {
    const msg = await failure('abs.yaml', `name: x\nsubcells:\n  - gap: 1.7\n  - gap: 1.1\n    absorptance: 0.8\n`);
    expect(msg).toMatch(/abs\.yaml:5: subcells\[1\]\.absorptance: .*top cell/);
  });

  test('ere and voc_loss together', async () => {
    const msg = await failure('ere.yaml', `name: x\nsubcells:\n  - gap: 1.7\n    ere: 0.01\n    voc_loss: 0.2\n`);
    expect(msg).toMatch(/ere\.yaml:5: subcells\[0\]\.voc_loss: give either ere or voc_loss, not both/);
  });

  test('a spectrum and an ensemble together', async () => {
    const msg = await failure('light.yaml', `name: x\nspectrum: am1.5g\nensemble: somewhere\nsubcells:\n  - gap: 1.1\n`);
    expect(msg).toMatch(/light\.yaml:3: ensemble: give either spectrum or ensemble, not both/);
  });

  test('a missing spectrum file names the field', async () => {
    const msg = await failure('nofile.yaml', `name: x\nspectrum: no-such-file.csv\nsubcells:\n  - gap: 1.1\n`);
    expect(msg).toMatch(/nofile\.yaml:2: spectrum: .*no-such-file\.csv/);
  });
});

describe('light', () => {
  test('a spectrum file is found relative to the design file', async () => {
    const sub = mkdtempSync(join(dir, 'rel-'));
    copyFileSync(join(ROOT, 'spectra/am1.5g.tsv'), join(sub, 'my-sun.tsv'));
    const p = join(sub, 'design.yaml');
    writeFileSync(p, `name: x\nspectrum:\n  source: my-sun.tsv\n  irradiance: 800\nsubcells:\n  - gap: 1.34\n`);
    const d = await loadDesign(p);
    expect(d.light.kind).toBe('spectrum');
    expect(d.reference.spectrum.pinWm2).toBeCloseTo(800, 6);
  });

  test('a blackbody sun with concentration', async () => {
    const d = await loadDesignText(join(dir, 'bb.yaml'), `name: x\nspectrum:\n  source: blackbody:6000\n  suns: 10\nsubcells:\n  - gap: 1.3\n`);
    expect(d.reference.spectrum.name).toMatch(/6000/);
  });

  test('an ensemble is loaded relative to the design file, with its members and weights', async () => {
    const p = join(ROOT, 'examples/ensemble-demo/design-check.yaml');
    const d = await loadDesignText(p, `name: x\nensemble: manifest.yaml\nsubcells:\n  - gap: 1.7\n  - gap: 1.1\n`);
    expect(d.light.kind).toBe('ensemble');
    expect(d.spectra.length).toBeGreaterThan(1);
    const energy = (s: (typeof d.spectra)[number]) => s.weight * s.spectrum.pinWm2;
    expect(d.spectra.every((s) => energy(s) <= energy(d.reference))).toBe(true);
  });
});

/** Users add their own absorber family in a design file and bind subcells to it by id. */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadDesign } from '../../src/design/index.js';
import { UserError } from '../../src/errors.js';
import { reportCommand } from '../../src/cli/report-command.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-families-'));
const file = (name: string, text: string) => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};

// An invented alloy for the test: not a real material's data.
const FAMILY = `materials:
  - id: demo-chalcogenide
    name: Demo chalcogenide alloy (invented)
    variable: fraction of the second end member
    ea_ev: 1.25
    eb_ev: 1.95
    bowing_ev: 0.2
    window_ev: [1.35, 1.85]
    window_reason: invented window for a test
    dEg_dT_ev_per_k: -0.0003
    refractive_index: 2.8
    source: invented test data
`;

describe('user-defined absorber families in design files', () => {
  test('a subcell bound to a user family resolves to its window, and the report gives its composition', async () => {
    const path = file('user.yaml', `name: user family\n${FAMILY}subcells:\n  - material: demo-chalcogenide\n  - material: si\nwirings: [series]\nmap: { step: 0.04 }\n`);
    const d = await loadDesign(path);
    expect(d.subcells[0].constraint.kind).toBe('material');
    const out = join(dir, 'user.html');
    const summary = JSON.parse(await reportCommand({ design: path, output: out, json: true }));
    const w = summary.wirings[0];
    // 2T on silicon wants ≈1.73 eV (docs/PHYSICS.md §5), inside the invented window.
    expect(Math.abs(w.gaps_ev[0] - 1.729)).toBeLessThan(0.003);
    // Invert E(x) = (1−x)·1.25 + x·1.95 − 0.2·x(1−x) at the reported gap: 0.2x² + 0.5x + 1.25 − E = 0.
    const e = w.gaps_ev[0];
    const xExpected = (-0.5 + Math.sqrt(0.25 - 4 * 0.2 * (1.25 - e))) / (2 * 0.2);
    const top = w.compositions.find((c: { subcell: number }) => c.subcell === 1);
    expect(top.family).toBe('demo-chalcogenide');
    expect(top.compositions[0].x).toBeCloseTo(xExpected, 5);
    expect(top.compositions[0].in_window).toBe(true);
  });

  test('a malformed user family names the field and its line', async () => {
    const bad = FAMILY.replace('    ea_ev: 1.25\n', '    ea_ev: hot\n');
    const path = file('bad.yaml', `name: bad\n${bad}subcells:\n  - material: demo-chalcogenide\n  - gap: 1.1\n`);
    await expect(loadDesign(path)).rejects.toThrow(UserError);
    await expect(loadDesign(path)).rejects.toThrow(/bad\.yaml:\d+: materials\[0\]\.ea_ev: must be a number/);
  });

  test('an id defined twice is refused', async () => {
    const twice = FAMILY + FAMILY.replace('materials:\n', '');
    const path = file('twice.yaml', `name: twice\n${twice}subcells:\n  - material: demo-chalcogenide\n  - gap: 1.1\n`);
    await expect(loadDesign(path)).rejects.toThrow(/defined twice/);
  });
});

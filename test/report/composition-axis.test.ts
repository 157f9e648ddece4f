/**
 * Maps of bound subcells carry a secondary composition axis. Expected values:
 * each tick sits at the family's gap for that composition — the published
 * quadratic 1.57 + 0.39x + 0.33x² eV for the mixed-halide top (Noh et al.,
 * Nano Lett. 13 (2013) 1764, from memory), evaluated here by hand.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { reportCommand } from '../../src/cli/report-command.js';
import { compositionAxis } from '../../src/search/composition-tolerance.js';
import { getFamily, gapFromComposition } from '../../src/materials/index.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-composition-axis-'));

describe('secondary composition axes on maps', () => {
  test('ticks at round compositions inside the axis, only within the practical window branch', () => {
    const a = compositionAxis(getFamily('perovskite-i-br'), 0, 1.6, 1.8, 300)!;
    expect(a.ticks.length).toBeGreaterThanOrEqual(3);
    for (const t of a.ticks) {
      expect(Math.abs(t.gapEv - (1.57 + 0.39 * t.x + 0.33 * t.x ** 2))).toBeLessThan(1e-12); // Noh et al. 2013 (from memory)
      expect(Math.abs((t.x * 100) % 5)).toBeLessThan(1e-6);
    }
    // tin–lead: only the window branch (x ≤ 0.7), so every gap has one tick
    const s = compositionAxis(getFamily('perovskite-sn-pb'), 1, 1.2, 1.55, 300)!;
    expect(Math.max(...s.ticks.map((t) => t.x))).toBeLessThanOrEqual(0.7);
    s.ticks.forEach((t) => expect(t.gapEv).toBeCloseTo(gapFromComposition(getFamily('perovskite-sn-pb'), t.x), 12));
    expect(compositionAxis(getFamily('si'), 1, 1.0, 1.3, 300)).toBeUndefined();
  });

  test(
    'the report map of two bound subcells draws a top (x) and a right (y) composition axis',
    async () => {
      const design = join(dir, 'bound.yaml');
      writeFileSync(design, 'name: two bound films (invented test)\nsubcells:\n  - material: perovskite-i-br\n  - material: perovskite-sn-pb\nwirings: [series]\nmap: { step: 0.02 }\n');
      const out = join(dir, 'bound.html');
      await reportCommand({ design, output: out });
      const html = readFileSync(out, 'utf8');
      expect(html).toContain('class="gs-axis gs-composition-x" data-family="perovskite-i-br"');
      expect(html).toContain('class="gs-axis gs-composition-y" data-family="perovskite-sn-pb"');
      const ticks = [...html.matchAll(/gs-composition-x[\s\S]*?<\/g>/g)][0][0];
      const pairs = [...ticks.matchAll(/data-gap="([\d.]+)">([\d.]+)</g)].map((m) => [Number(m[1]), Number(m[2])]);
      expect(pairs.length).toBeGreaterThanOrEqual(2);
      for (const [gap, x] of pairs) expect(Math.abs(gap - (1.57 + 0.39 * x + 0.33 * x * x))).toBeLessThan(1e-4);
    },
    180_000,
  );
});

/** Chart geometry that depends on the data: axis bounds and long labels. */
import { describe, expect, test } from 'vitest';
import { sensitivityChartSvg } from '../../src/report/charts/sensitivity-chart.js';

/** The y coordinates of a path's points (M/L commands, plot coordinates). */
function pathYs(d: string): number[] {
  return [...d.matchAll(/[ML]\s*(-?[\d.]+)[ ,](-?[\d.]+)/g)].map((m) => Number(m[2]));
}

describe('sensitivity chart', () => {
  test('a fixed slice above the optimum stays inside the plot', () => {
    const deltaEv = [-0.1, -0.05, 0, 0.05, 0.1];
    const svg = sensitivityChartSvg({
      id: 's', labels: ['top', 'bottom'], best: 0.4521, threshold: 0.44, loss: 0.01, objective: 'efficiency',
      slices: [
        { subcell: 1, fixed: false, gapEv: 1.7, deltaEv, efficiency: [0.43, 0.445, 0.4521, 0.444, 0.42] },
        { subcell: 2, fixed: true, gapEv: 1.12, deltaEv, efficiency: [0.4574, 0.455, 0.4521, 0.447, 0.44] },
      ],
    });
    const paths = [...svg.matchAll(/class="gs-slice"[^>]*\sd="([^"]+)"/g)].map((m) => m[1]);
    expect(paths).toHaveLength(2);
    for (const d of paths) for (const y of pathYs(d)) expect(y).toBeGreaterThanOrEqual(0);
  });
});

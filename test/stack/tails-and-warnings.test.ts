import { describe, expect, test } from 'vitest';
import { am15g } from '../../src/light/sources.js';
import { evaluateStack, stackWarnings } from '../../src/stack/evaluate.js';
import { idealStack, seriesWiring, type StackSpec } from '../../src/stack/model.js';
import { runJsonHere } from '../helpers/cli.js';

const s = am15g();
const film = (gaps: number[], urbachEv: number): StackSpec =>
  idealStack(gaps, seriesWiring(gaps.length), {
    subcells: gaps.map((g, i) => ({
      gapEv: g,
      ere: 1,
      absorptance: i === 0 ? { kind: 'beer-lambert', passes: 1, thicknessNm: 400, alpha: { kind: 'direct', alpha0PerCm: 1.5e5, urbachEv } } : { kind: 'step', value: 1 },
    })),
  });

describe('Urbach tails', () => {
  test('a cell’s J0 is its own: it does not move when another cell’s gap moves', () => {
    const a = evaluateStack(film([1.55, 1.12], 0.02), s).subcells[0].j0Am2;
    const b = evaluateStack(film([1.55, 0.7], 0.02), s).subcells[0].j0Am2;
    expect(b / a).toBeCloseTo(1, 9);
  });
  test('a tail raises J0 above the sharp edge (more sub-gap emission), so Voc falls', () => {
    const sharp = evaluateStack(film([1.55, 1.12], 0), s).subcells[0];
    const tail = evaluateStack(film([1.55, 1.12], 0.015), s).subcells[0];
    expect(tail.j0Am2).toBeGreaterThan(sharp.j0Am2);
  });
});

describe('coupling warnings', () => {
  test('empirical coupling above the radiative fraction is flagged, not refused', async () => {
    const spec = idealStack([1.6, 1.12], seriesWiring(2), { coupling: { model: 'empirical', eta: [0.9] }, subcells: [1.6, 1.12].map((g) => ({ gapEv: g, ere: 1e-3, absorptance: { kind: 'step', value: 1 } })) });
    expect(stackWarnings(spec)[0]).toMatch(/exceeds its ERE/);
    expect(stackWarnings(idealStack([1.6, 1.12], seriesWiring(2), { coupling: { model: 'empirical', eta: [0.9] } }))).toEqual([]);
    const j = await runJsonHere(['evaluate', '--gaps', '1.6,1.12', '--ere', '1e-3', '--lc', '0.9']);
    expect(j.warnings[0]).toMatch(/overstates the gain/);
  });
  test('under radiative coupling the emission line says light also goes down', async () => {
    const j = await runJsonHere(['evaluate', '--gaps', '1.6,1.12', '--lc', 'radiative:3.5']);
    expect(j.emission).toMatch(/down into the cell below/);
  });
});

describe('material windows never exceed what the gap model reaches', () => {
  test('a tin–lead bottom is not placed below the model’s minimum gap', async () => {
    const j = await runJsonHere(['optimize', '--cells', '2', '--material', '1=perovskite-i-br', '--material', '2=perovskite-sn-pb']);
    const bottom = j.best.compositions.find((c: { subcell: number }) => c.subcell === 2);
    expect(bottom.compositions.length).toBeGreaterThan(0);
    expect(j.best.gaps_ev[1]).toBeGreaterThanOrEqual(1.2);
  });
});

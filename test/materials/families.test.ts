/**
 * Built-in family data against its sources. Each expected value names its
 * source; "from memory" marks a value recalled rather than re-read, "common
 * practice" a trade figure with no single source.
 */
import { describe, expect, it } from 'vitest';
import { type AbsorberFamily, compositionsForGap, gapFromComposition, gapReach, getFamily, listFamilies } from '../../src/materials/index.js';

/** Bowing parameter implied by a model: b = (EA + EB)/2 − Eg(1/2), times 4. */
function impliedBowingEv(f: AbsorberFamily): number {
  const ea = gapFromComposition(f, 0);
  const eb = gapFromComposition(f, 1);
  return 4 * (0.5 * (ea + eb) - gapFromComposition(f, 0.5));
}

describe('the family list', () => {
  it('holds the six alloys and four fixed absorbers with kebab-case ids', () => {
    expect(listFamilies().map((f) => f.id)).toEqual([
      'perovskite-i-br',
      'perovskite-sn-pb',
      'cigs',
      'algaas',
      'gainp',
      'ingaas',
      'si',
      'gaas',
      'ge',
      'cdte',
    ]);
    for (const f of listFamilies()) expect(f.id).toMatch(/^[a-z0-9]+(-[a-z0-9]+)*$/);
  });

  it('gives every family a source for its gap model, window, dEg/dT and refractive index', () => {
    for (const f of listFamilies()) {
      for (const key of ['gap_model', 'window', 'dEg_dT', 'refractive_index']) {
        expect(f.sources[key], `${f.id}.${key}`).toMatch(/\S/);
      }
      expect(f.citation).toMatch(/\S/);
      expect(f.window.reason).toMatch(/\S/);
    }
  });
});

describe('mixed-halide lead perovskite (I/Br)', () => {
  const f = getFamily('perovskite-i-br');
  it('end members and bowing match the quadratic fit of Noh et al. 2013', () => {
    // Noh et al., Nano Lett. 13 (2013) 1764: Eg = 1.57 + 0.39x + 0.33x² eV (from memory)
    expect(gapFromComposition(f, 0)).toBeCloseTo(1.57, 12); // MAPbI3, Noh et al. 2013 (from memory)
    expect(gapFromComposition(f, 1)).toBeCloseTo(2.29, 12); // MAPbBr3, Noh et al. 2013 (from memory)
    expect(impliedBowingEv(f)).toBeCloseTo(0.33, 12); // Noh et al. 2013 (from memory)
  });
  it('bromide end is near the 2.3 eV reported for MAPbBr3', () => {
    // ≈2.3 eV: Sheng et al., J. Phys. Chem. C (2015), MAPbBr3 films
    expect(Math.abs(gapFromComposition(f, 1) - 2.3)).toBeLessThan(0.02);
  });
  it('window tops out at about 1.8 eV (halide segregation, Hoke et al., Chem. Sci. 6 (2015) 613; limit common practice)', () => {
    expect(f.window.gapEv[1]).toBeGreaterThanOrEqual(1.75);
    expect(f.window.gapEv[1]).toBeLessThanOrEqual(1.8);
    expect(f.window.reason).toContain('Hoke');
  });
  it('gap widens on heating', () => {
    // +0.33 to +0.44 meV/K: 30–40 meV from 290 to 380 K, quoted by Saidi et al., J. Phys. Chem. Lett. 7 (2016) 5247
    expect(f.dEgDtEvPerK).toBeGreaterThanOrEqual(30e-3 / 90);
    expect(f.dEgDtEvPerK).toBeLessThanOrEqual(40e-3 / 90);
  });
});

describe('tin–lead iodide perovskite: composition-dependent bowing with a flat, Sn-leaning minimum', () => {
  const f = getFamily('perovskite-sn-pb');
  it('end members match Hao et al. 2014', () => {
    expect(gapFromComposition(f, 0)).toBeCloseTo(1.55, 12); // MAPbI3, Hao et al., J. Am. Chem. Soc. 136 (2014) 8094
    expect(gapFromComposition(f, 1)).toBeCloseTo(1.35, 12); // MASnI3, Hao et al., J. Am. Chem. Soc. 136 (2014) 8094
  });
  it('passes near published mixed-cation points (all from memory, ±0.04 eV: film-to-film scatter)', () => {
    // 60 % Sn: 1.25 eV, (FASnI3)0.6(MAPbI3)0.4, Zhao et al., Nat. Energy 2 (2017) 17018; FA0.6MA0.4Sn0.6Pb0.4I3, Tong et al., Science 364 (2019) 475
    expect(Math.abs(gapFromComposition(f, 0.6) - 1.25)).toBeLessThan(0.04);
    // 50 % Sn: ≈1.22 eV, FA0.75Cs0.25Sn0.5Pb0.5I3, Eperon et al., Science 354 (2016) 861
    expect(Math.abs(gapFromComposition(f, 0.5) - 1.22)).toBeLessThan(0.04);
  });
  it('1.25 eV lands at 50–60 % Sn on the Pb-rich branch (common practice for tandem bottom cells)', () => {
    const x = compositionsForGap(f, 1.25)[0];
    expect(x).toBeGreaterThan(0.5);
    expect(x).toBeLessThan(0.6);
  });
  it('the minimum lies at 60–70 % Sn, broad and asymmetric, which no quadratic is (issue 12: a quadratic is symmetric about its minimum)', () => {
    const r = gapReach(f);
    expect(r.xAtMin).toBeGreaterThan(0.6);
    expect(r.xAtMin).toBeLessThan(0.7);
    // broad: within 20 meV of the minimum over 55–80 % Sn (common practice: a broad minimum)
    for (const x of [0.55, 0.6, 0.7, 0.8]) expect(gapFromComposition(f, x) - r.minEv).toBeLessThan(0.02);
    // asymmetric: 15 points of composition either side of the minimum differ by > 10 % in rise
    // (flatter on the Pb-rich side, where tandem bottom cells sit; steeper towards pure Sn)
    const pbSide = gapFromComposition(f, r.xAtMin - 0.15) - r.minEv;
    const snSide = gapFromComposition(f, r.xAtMin + 0.15) - r.minEv;
    expect(snSide).toBeGreaterThan(1.1 * pbSide);
  });
});

describe('Cu(In,Ga)Se2', () => {
  const f = getFamily('cigs');
  it('end members and small bowing', () => {
    expect(gapFromComposition(f, 0)).toBeCloseTo(1.04, 12); // CuInSe2 (from memory)
    expect(gapFromComposition(f, 1)).toBeCloseTo(1.68, 12); // CuGaSe2 (from memory)
    expect(impliedBowingEv(f)).toBeCloseTo(0.21, 12); // (from memory)
  });
  it('dEg/dT of CuGaSe2', () => {
    // −(2.1 ± 0.1)e-4 eV/K: Neumann, Hörig & Reccius, Solid State Commun. 27 (1978) 449
    expect(f.dEgDtEvPerK).toBeCloseTo(-2.1e-4, 10);
  });
});

/*
 * III-V: 300 K end members from the Vurgaftman et al. (J. Appl. Phys. 89
 * (2001) 5815) temperature laws, evaluated by hand:
 *   GaAs Γ  1.519  − 0.5405e-3·300²/(300+204) = 1.422482
 *   AlAs Γ  3.099  − 0.885e-3 ·300²/(300+530) = 3.003036
 *   InAs Γ  0.417  − 0.276e-3 ·300²/(300+93)  = 0.353794
 *   InP  Γ  1.4236 − 0.363e-3 ·300²/(300+162) = 1.352886
 *   GaP  Γ  2.886  + 0.1081·(1 − coth(164/300)) = 2.777039
 *   GaAs X  1.981  − 0.460e-3 ·300²/(300+204) = 1.898857
 *   AlAs X  2.24   − 0.70e-3  ·300²/(300+530) = 2.164096
 */
describe('AlGaAs: the room-temperature direct-gap fit, not the Vurgaftman Γ gap', () => {
  const f = getFamily('algaas');
  /** Γ gap at 300 K from the Vurgaftman et al. 2001 parameters (end members evaluated above). */
  const gammaVurgaftman = (x: number) => (1 - x) * 1.422482 + x * 3.003036 - x * (1 - x) * (-0.127 + 1.31 * x);
  it('follows 1.424 + 1.247x for x < 0.45 (Casey & Panish 1978; Adachi, J. Appl. Phys. 58 (1985) R1; from memory)', () => {
    expect(gapFromComposition(f, 0)).toBeCloseTo(1.424, 12); // GaAs at 300 K, 1.424 eV (common practice)
    expect(gapFromComposition(f, 0.3)).toBeCloseTo(1.424 + 1.247 * 0.3, 12); // 1.798 eV, Al0.3Ga0.7As ≈ 1.80 eV (common practice)
    expect(() => gapFromComposition(f, 0.6)).toThrow(/outside/);
  });
  it('the Vurgaftman Γ gap sits 0.03–0.04 eV above it over x = 0.2–0.4, the reason for the choice (see family sources)', () => {
    for (const x of [0.2, 0.3, 0.4]) {
      const d = gammaVurgaftman(x) - gapFromComposition(f, x);
      expect(d).toBeGreaterThan(0.015);
      expect(d).toBeLessThan(0.045);
    }
    expect(f.sources['gap_model']).toContain('room-temperature');
  });
  it('Γ–X crossover lies near x ≈ 0.45', () => {
    // X gap with bowing 0.055 eV (Vurgaftman et al. 2001); crossover near x≈0.45 at ≈2.0 eV (common practice)
    const xGap = (x: number) => (1 - x) * 1.898857 + x * 2.164096 - 0.055 * x * (1 - x);
    let lo = 0;
    let hi = 1;
    for (let i = 0; i < 60; i++) {
      const m = 0.5 * (lo + hi);
      if (gammaVurgaftman(m) < xGap(m)) lo = m;
      else hi = m;
    }
    expect(lo).toBeGreaterThan(0.4);
    expect(lo).toBeLessThan(0.46);
    expect(gammaVurgaftman(lo)).toBeCloseTo(2.0, 1);
    // the room-temperature fit ends there
    expect(f.compositionRange[1]).toBe(0.45);
    // the practical window stops below the crossover
    expect(f.window.gapEv[1]).toBeLessThan(gammaVurgaftman(lo));
  });
});

describe('GaInP (Γ gap, x = Ga fraction, Vurgaftman et al. 2001)', () => {
  const f = getFamily('gainp');
  it('end members and bowing', () => {
    expect(gapFromComposition(f, 0)).toBeCloseTo(1.352886, 6); // InP, Vurgaftman et al. 2001
    expect(gapFromComposition(f, 1)).toBeCloseTo(2.777039, 6); // GaP Γ, Vurgaftman et al. 2001
    expect(impliedBowingEv(f)).toBeCloseTo(0.65, 12); // Vurgaftman et al. 2001
  });
  it('lattice-matched Ga0.51In0.49P is near 1.9 eV (disordered)', () => {
    // ≈1.9 eV for disordered GaInP on GaAs (common practice)
    expect(Math.abs(gapFromComposition(f, 0.51) - 1.9)).toBeLessThan(0.03);
    expect(f.window.reason).toContain('ordering');
  });
});

describe('InGaAs (x = In fraction, Vurgaftman et al. 2001)', () => {
  const f = getFamily('ingaas');
  it('end members and bowing', () => {
    expect(gapFromComposition(f, 0)).toBeCloseTo(1.422482, 6); // GaAs, Vurgaftman et al. 2001
    expect(gapFromComposition(f, 1)).toBeCloseTo(0.353794, 6); // InAs, Vurgaftman et al. 2001
    expect(impliedBowingEv(f)).toBeCloseTo(0.477, 12); // Vurgaftman et al. 2001
  });
  it('In0.53Ga0.47As lattice-matched to InP is near 0.74 eV', () => {
    // ≈0.74–0.75 eV (common practice)
    expect(Math.abs(gapFromComposition(f, 0.53) - 0.745)).toBeLessThan(0.012);
  });
});

describe('fixed absorbers at 300 K', () => {
  it('Si 1.12, GaAs 1.42, Ge 0.66, CdTe 1.50 eV', () => {
    expect(gapFromComposition(getFamily('si'), 0)).toBe(1.12); // common practice
    expect(gapFromComposition(getFamily('gaas'), 0)).toBe(1.42); // Vurgaftman et al. 2001 (1.4225, rounded)
    expect(gapFromComposition(getFamily('ge'), 0)).toBe(0.66); // common practice
    expect(gapFromComposition(getFamily('cdte'), 0)).toBe(1.5); // common practice
  });
  it('GaAs dEg/dT is the slope of the Vurgaftman Varshni law at 300 K', () => {
    // −α·T(T+2β)/(T+β)² with α = 0.5405 meV/K, β = 204 K (Vurgaftman et al. 2001)
    expect(getFamily('gaas').dEgDtEvPerK).toBeCloseTo((-0.5405e-3 * 300 * 708) / 504 ** 2, 12);
  });
});

describe('signs of dEg/dT', () => {
  it('negative for Si, Ge, CdTe, CIGS and III-V; positive for lead-halide perovskites', () => {
    for (const id of ['si', 'ge', 'cdte', 'gaas', 'cigs', 'algaas', 'gainp', 'ingaas']) {
      expect(getFamily(id).dEgDtEvPerK, id).toBeLessThan(0);
    }
    for (const id of ['perovskite-i-br', 'perovskite-sn-pb']) {
      expect(getFamily(id).dEgDtEvPerK, id).toBeGreaterThan(0);
    }
  });
});

/**
 * Built-in absorber families: composition ↔ gap models at 300 K, practical
 * windows, dEg/dT and refractive index, with the source of every number.
 *
 * III-V end members are computed here from the 0 K gaps and temperature
 * parameters tabulated by Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89
 * (2001) 5815 (Varshni form E0 − αT²/(T+β); GaP Γ in their
 * E0 + α[1 − coth(β/T)] form), so the numbers can be audited against the table.
 * Values marked "from memory" were not re-checked against the paper while
 * writing; "common practice" marks trade facts with no single source.
 */
import { UserError } from '../errors.js';
import { type AbsorberFamily, makeFamily, REFERENCE_TEMPERATURE_K } from './alloy.js';

// ---------------------------------------------------------------------------
// III-V end members (Vurgaftman et al. 2001, Table parameters for Γ valley)

/** Temperature dependence of a III-V gap: value [eV] and slope [eV/K] at T [K]. */
interface BinaryGap {
  readonly gapEv: (tempK: number) => number;
  readonly slopeEvPerK: (tempK: number) => number;
  /** Parameters as tabulated (the citation is added where used). */
  readonly source: string;
}

/** Varshni form E_g(T) = E0 − αT²/(T + β); α [eV/K], β [K]. */
function varshni(e0Ev: number, alphaEvPerK: number, betaK: number, source: string): BinaryGap {
  return {
    gapEv: (t) => e0Ev - (alphaEvPerK * t * t) / (t + betaK),
    slopeEvPerK: (t) => (-alphaEvPerK * t * (t + 2 * betaK)) / (t + betaK) ** 2,
    source,
  };
}

/** Bose–Einstein-like form E_g(T) = E0 + α[1 − coth(θ/T)] used for GaP Γ; α [eV], θ [K]. */
function coth(e0Ev: number, alphaEv: number, thetaK: number, source: string): BinaryGap {
  return {
    gapEv: (t) => e0Ev + alphaEv * (1 - 1 / Math.tanh(thetaK / t)),
    slopeEvPerK: (t) => (-alphaEv * thetaK) / (t * t * Math.sinh(thetaK / t) ** 2),
    source,
  };
}

const VURGAFTMAN = 'Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89 (2001) 5815';

/** Γ-valley gaps of the III-V binaries (Vurgaftman et al. 2001, Table III–V entries). */
export const III_V_GAMMA = {
  GaAs: varshni(1.519, 0.5405e-3, 204, 'GaAs E0Γ=1.519 eV, α=0.5405 meV/K, β=204 K'),
  AlAs: varshni(3.099, 0.885e-3, 530, 'AlAs E0Γ=3.099 eV, α=0.885 meV/K, β=530 K'),
  InAs: varshni(0.417, 0.276e-3, 93, 'InAs E0Γ=0.417 eV, α=0.276 meV/K, β=93 K'),
  InP: varshni(1.4236, 0.363e-3, 162, 'InP E0Γ=1.4236 eV, α=0.363 meV/K, β=162 K'),
  GaP: coth(2.886, 0.1081, 164, 'GaP EΓ(T)=2.886+0.1081[1−coth(164/T)] eV'),
} as const;

/** X-valley gaps, used only to locate the direct–indirect crossover. */
export const III_V_X = {
  GaAs: varshni(1.981, 0.46e-3, 204, 'GaAs E0X=1.981 eV, α=0.460 meV/K, β=204 K'),
  AlAs: varshni(2.24, 0.7e-3, 530, 'AlAs E0X=2.24 eV, α=0.70 meV/K, β=530 K'),
} as const;

/** Ternary bowing parameters [eV] (Vurgaftman et al. 2001). */
export const III_V_BOWING_EV = {
  /** AlGaAs Γ gap: C = −0.127 + 1.310·x_Al. */
  AlGaAsGammaC0: -0.127,
  AlGaAsGammaC1: 1.31,
  /** AlGaAs X gap. */
  AlGaAsX: 0.055,
  /** GaInP Γ gap. */
  GaInPGamma: 0.65,
  /** InGaAs Γ gap. */
  InGaAsGamma: 0.477,
} as const;

const T0 = REFERENCE_TEMPERATURE_K;
const GAAS_EV = III_V_GAMMA.GaAs.gapEv(T0); // 1.4225
const ALAS_EV = III_V_GAMMA.AlAs.gapEv(T0); // 3.0030
const INAS_EV = III_V_GAMMA.InAs.gapEv(T0); // 0.3538
const INP_EV = III_V_GAMMA.InP.gapEv(T0); // 1.3529
const GAP_EV = III_V_GAMMA.GaP.gapEv(T0); // 2.7770

/** dEg/dT of an alloy [eV/K]: end-member slopes at 300 K interpolated linearly at x. */
function interpolatedSlope(a: BinaryGap, b: BinaryGap, x: number): number {
  return (1 - x) * a.slopeEvPerK(T0) + x * b.slopeEvPerK(T0);
}

/**
 * Sn–Pb iodide perovskite: (1−x)E_Pb + x·E_Sn − x(1−x)(b0 + b1·x) with E_Pb = 1.55, E_Sn = 1.35,
 * b0 = 0.55, b1 = 0.45 eV (see the family's sources), as ascending polynomial coefficients.
 */
const SNPB = { ePb: 1.55, eSn: 1.35, b0: 0.55, b1: 0.45 } as const;
const SNPB_COEFFS_EV = [SNPB.ePb, SNPB.eSn - SNPB.ePb - SNPB.b0, SNPB.b0 - SNPB.b1, SNPB.b1] as const;

/**
 * AlGaAs room-temperature direct gap E_g = 1.424 + 1.247x for x < 0.45 (Casey & Panish,
 * Heterostructure Lasers (1978), as tabulated by Adachi, J. Appl. Phys. 58 (1985) R1; from memory).
 * Chosen over the Γ gap from the Vurgaftman parameters (kept below for the Γ–X crossover), which sits
 * 0.03–0.04 eV higher at 300 K: the linear fit was made to room-temperature absorption and
 * photoluminescence data, the design temperature here, whereas the Vurgaftman bowing is a low-
 * temperature compilation carried to 300 K by Varshni laws.
 */
const ALGAAS_RT_COEFFS_EV = [1.424, 1.247] as const;
/** Upper end of the room-temperature fit: the Γ–X crossover [-]. */
const ALGAAS_DIRECT_MAX_X = 0.45;


// ---------------------------------------------------------------------------
// The families

const FAMILIES: readonly AbsorberFamily[] = [
  makeFamily({
    id: 'perovskite-i-br',
    name: 'Mixed-halide lead perovskite (I/Br)',
    kind: 'alloy',
    variable: { symbol: 'x', meaning: 'Br fraction of the halide site, x in APb(I1−xBrx)3' },
    // Noh et al. publish their fit as a quadratic in x; it equals the bowing
    // form with E_A = 1.57, E_B = 2.29, b = 0.33 eV.
    model: { form: 'polynomial', coefficientsEv: [1.57, 0.39, 0.33] },
    compositionRange: [0, 1],
    window: {
      gapEv: [1.57, 1.8],
      reason:
        'photo-induced halide segregation into I-rich domains (Hoke et al., Chem. Sci. 6 (2015) 613) makes Br-rich films unstable under light; mixed-cation films are used up to about 1.75–1.8 eV (common practice)',
    },
    dEgDtEvPerK: 3.9e-4,
    refractiveIndex: 2.5,
    citation: 'Noh et al., Nano Lett. 13 (2013) 1764',
    sources: {
      gap_model:
        'Noh et al., Nano Lett. 13 (2013) 1764: quadratic fit Eg(x) = 1.57 + 0.39x + 0.33x² eV for MAPb(I1−xBrx)3 (coefficients from memory)',
      window:
        'Hoke et al., Chem. Sci. 6 (2015) 613: light-induced segregation, red-shifted PL at 1.68 eV; upper limit 1.8 eV for mixed-cation films is common practice',
      dEg_dT:
        'MAPbI3 gap widens on heating: measured change of 30–40 meV from 290 to 380 K, as quoted by Saidi, Poncé & Monserrat, J. Phys. Chem. Lett. 7 (2016) 5247; 35 meV/90 K ≈ +3.9e-4 eV/K, applied to the whole family',
      refractive_index: 'n ≈ 2.5 just above the MAPbI3 gap (from memory)',
      composition_note: 'fitted for methylammonium films; formamidinium/caesium compositions shift the gap by a few tens of meV (common practice)',
    },
  }),
  makeFamily({
    id: 'perovskite-sn-pb',
    name: 'Tin–lead iodide perovskite',
    kind: 'alloy',
    variable: { symbol: 'x', meaning: 'Sn fraction of the metal site, x in A(Pb1−xSnx)I3' },
    // Composition-dependent bowing b(x) = b0 + b1·x (the form Vurgaftman et al. 2001 use for
    // AlGaAs) makes the gap a cubic whose minimum is flat and leans to the Sn-rich side.
    model: { form: 'polynomial', coefficientsEv: SNPB_COEFFS_EV },
    compositionRange: [0, 1],
    window: {
      gapEv: [1.22, 1.55],
      composition: [0, 0.7],
      reason:
        'Sn-rich films (Sn fraction above about 0.7) oxidise Sn2+ to Sn4+ and self-dope p-type, losing voltage; low-gap bottom cells commonly use 50–60 % Sn (common practice)',
    },
    dEgDtEvPerK: 2.0e-4,
    refractiveIndex: 2.6,
    citation: 'Hao et al., J. Am. Chem. Soc. 136 (2014) 8094',
    sources: {
      gap_model:
        'Hao, Stoumpos, Chang & Kanatzidis, J. Am. Chem. Soc. 136 (2014) 8094: end members MAPbI3 1.55 eV and MASnI3 1.35 eV, mixed compositions below both (anomalous bowing)',
      bowing:
        'composition-dependent bowing b(x) = 0.55 + 0.45x eV (the form of Vurgaftman et al., J. Appl. Phys. 89 (2001) 5815, for AlGaAs): our choice, so that the gap has its flat minimum of ≈1.23 eV at ≈67 % Sn and reaches 1.25 eV at ≈52 % Sn, as reported for mixed-cation Sn–Pb films, e.g. 1.25 eV at 60 % Sn (Zhao et al., Nat. Energy 2 (2017) 17018; Tong et al., Science 364 (2019) 475) and ≈1.2 eV at 50 % Sn (Eperon et al., Science 354 (2016) 861) — all points from memory; a single bowing parameter (a quadratic) cannot place both the minimum and the 1.25 eV point',
      window: 'Sn oxidation limit and the 50–60 % Sn practice are common practice',
      dEg_dT: 'positive, like lead iodide perovskite; magnitude +2e-4 eV/K from memory and uncertain',
      refractive_index: 'n ≈ 2.6 near the gap (from memory)',
    },
  }),
  makeFamily({
    id: 'cigs',
    name: 'Cu(In,Ga)Se2 chalcopyrite',
    kind: 'alloy',
    variable: { symbol: 'x', meaning: 'Ga fraction of the group-III site, x = Ga/(In+Ga) in Cu(In1−xGax)Se2' },
    model: { form: 'bowing', eaEv: 1.04, ebEv: 1.68, bowingEv: 0.21 },
    compositionRange: [0, 1],
    window: {
      gapEv: [1.04, 1.3],
      reason:
        'Ga-rich films (x ≳ 0.45, gap ≳ 1.3 eV) show a growing open-circuit-voltage deficit from bulk defects and band alignment (common practice)',
    },
    dEgDtEvPerK: -2.1e-4,
    refractiveIndex: 2.9,
    citation: 'CuInSe2 1.04 eV, CuGaSe2 1.68 eV, b ≈ 0.21 eV (from memory)',
    sources: {
      gap_model:
        'end members CuInSe2 1.04 eV and CuGaSe2 1.68 eV at 300 K, bowing 0.21 eV (all from memory; reported bowings span roughly 0.15–0.25 eV)',
      window: 'common practice',
      dEg_dT:
        'Neumann, Hörig & Reccius, Solid State Commun. 27 (1978) 449: CuGaSe2 dEg/dT = −(2.1 ± 0.1)e-4 eV/K above 120 K, applied to the whole family',
      refractive_index: 'n ≈ 2.9 near the gap (from memory)',
    },
  }),
  makeFamily({
    id: 'algaas',
    name: 'AlGaAs (direct Γ gap)',
    kind: 'alloy',
    variable: { symbol: 'x', meaning: 'Al fraction of the group-III site, x in AlxGa1−xAs' },
    // Room-temperature linear fit, valid while the gap is direct (x < 0.45).
    model: { form: 'polynomial', coefficientsEv: ALGAAS_RT_COEFFS_EV },
    compositionRange: [0, ALGAAS_DIRECT_MAX_X],
    window: {
      gapEv: [ALGAAS_RT_COEFFS_EV[0], 1.9],
      reason:
        'becomes indirect near x ≈ 0.43–0.45 (Γ–X crossover at ≈2.0 eV from the Vurgaftman 2001 parameters), above which the model’s Γ gap is no longer the absorption edge; Al-rich layers oxidise and DX centres appear in n-type material above x ≈ 0.2, so absorbers stay below ≈1.9 eV (DX-centre onset from memory; the 1.9 eV limit is common practice)',
    },
    dEgDtEvPerK: interpolatedSlope(III_V_GAMMA.GaAs, III_V_GAMMA.AlAs, 0.2),
    refractiveIndex: 3.5,
    citation: VURGAFTMAN,
    sources: {
      gap_model:
        'E_g = 1.424 + 1.247x eV at 300 K for x < 0.45 (Casey & Panish, Heterostructure Lasers, 1978; Adachi, J. Appl. Phys. 58 (1985) R1; from memory), chosen over the Vurgaftman Γ gap, which lies 0.03–0.04 eV higher at 300 K, because it was fitted to room-temperature data',
      gamma_gap_not_used: `${VURGAFTMAN}: ${III_V_GAMMA.GaAs.source}; ${III_V_GAMMA.AlAs.source}; Γ bowing C = −0.127 + 1.310x eV`,
      crossover: `${VURGAFTMAN}: ${III_V_X.GaAs.source}; ${III_V_X.AlAs.source}; X bowing 0.055 eV`,
      window: 'crossover from the Vurgaftman parameters; oxidation, DX centres and the 1.9 eV limit are common practice',
      dEg_dT: 'slopes of the Vurgaftman temperature laws at 300 K, interpolated linearly at x = 0.2',
      refractive_index: 'n ≈ 3.5 near the gap (from memory)',
    },
  }),
  makeFamily({
    id: 'gainp',
    name: 'GaInP (direct Γ gap)',
    kind: 'alloy',
    variable: { symbol: 'x', meaning: 'Ga fraction of the group-III site, x in GaxIn1−xP' },
    model: { form: 'bowing', eaEv: INP_EV, ebEv: GAP_EV, bowingEv: III_V_BOWING_EV.GaInPGamma },
    compositionRange: [0, 1],
    window: {
      gapEv: [1.7, 2.1],
      reason:
        'lattice-matched to GaAs at x ≈ 0.51 (≈1.9 eV disordered; CuPt ordering lowers it by up to ≈0.1 eV, so grown films sit at 1.8–1.9 eV); other compositions need metamorphic growth, and the gap turns indirect near x ≈ 0.7 (≈2.2 eV) (common practice)',
    },
    dEgDtEvPerK: interpolatedSlope(III_V_GAMMA.InP, III_V_GAMMA.GaP, 0.51),
    refractiveIndex: 3.5,
    citation: VURGAFTMAN,
    sources: {
      gap_model: `${VURGAFTMAN}: ${III_V_GAMMA.InP.source}; ${III_V_GAMMA.GaP.source}; Γ bowing 0.65 eV; evaluated at 300 K`,
      window: 'ordering shift, metamorphic limits and the Γ–X crossover near x ≈ 0.7 are common practice',
      dEg_dT: 'slopes of the Vurgaftman temperature laws at 300 K, interpolated linearly at x = 0.51',
      refractive_index: 'n ≈ 3.5 near the gap (from memory)',
    },
  }),
  makeFamily({
    id: 'ingaas',
    name: 'InGaAs',
    kind: 'alloy',
    variable: { symbol: 'x', meaning: 'In fraction of the group-III site, x in InxGa1−xAs' },
    model: { form: 'bowing', eaEv: GAAS_EV, ebEv: INAS_EV, bowingEv: III_V_BOWING_EV.InGaAsGamma },
    compositionRange: [0, 1],
    window: {
      gapEv: [0.7, GAAS_EV],
      reason:
        'lattice-matched to InP at x ≈ 0.53 (≈0.74 eV); compositions between GaAs and that point need strain-relaxing metamorphic buffers, and gaps much below 0.7 eV are rarely worth their dark current in solar cells (common practice)',
    },
    dEgDtEvPerK: interpolatedSlope(III_V_GAMMA.GaAs, III_V_GAMMA.InAs, 0.53),
    refractiveIndex: 3.6,
    citation: VURGAFTMAN,
    sources: {
      gap_model: `${VURGAFTMAN}: ${III_V_GAMMA.GaAs.source}; ${III_V_GAMMA.InAs.source}; Γ bowing 0.477 eV; evaluated at 300 K`,
      window: 'common practice',
      dEg_dT: 'slopes of the Vurgaftman temperature laws at 300 K, interpolated linearly at x = 0.53',
      refractive_index: 'n ≈ 3.6 near the gap (from memory)',
    },
  }),
  fixed('si', 'Crystalline silicon', 1.12, -2.5e-4, 3.55, 'indirect gap', 'common practice (1.12 eV at 300 K)', {
    gap_model: '1.12 eV at 300 K (common practice; ≈1.124 eV in Green, J. Appl. Phys. 67 (1990) 2944, from memory)',
    dEg_dT: '−2.5e-4 eV/K near 300 K (from memory)',
    refractive_index: 'n ≈ 3.55 near 1.1 µm (from memory)',
  }),
  fixed('gaas', 'Gallium arsenide', 1.42, III_V_GAMMA.GaAs.slopeEvPerK(T0), 3.6, 'direct gap', VURGAFTMAN, {
    gap_model: `${VURGAFTMAN}: ${III_V_GAMMA.GaAs.source}, which gives 1.4225 eV at 300 K; rounded to 1.42 eV`,
    dEg_dT: 'slope of the Vurgaftman Varshni law at 300 K',
    refractive_index: 'n ≈ 3.6 near 870 nm (from memory)',
  }),
  fixed('ge', 'Germanium', 0.66, -3.9e-4, 4.1, 'indirect gap', 'common practice (0.66 eV at 300 K)', {
    gap_model: '0.66 eV at 300 K (common practice)',
    dEg_dT: '≈ −3.9e-4 eV/K near 300 K (from memory)',
    refractive_index: 'n ≈ 4.1 near 1.8 µm (from memory)',
  }),
  fixed('cdte', 'Cadmium telluride', 1.5, -3.0e-4, 3.0, 'direct gap', 'common practice (≈1.50 eV at 300 K)', {
    gap_model: '≈1.50 eV at 300 K (common practice)',
    dEg_dT: '≈ −3e-4 eV/K near 300 K (from memory; reported values scatter)',
    refractive_index: 'n ≈ 3.0 near 830 nm (from memory)',
  }),
];

function fixed(
  id: string,
  name: string,
  gapEv: number,
  dEgDtEvPerK: number,
  refractiveIndex: number,
  character: string,
  citation: string,
  sources: Record<string, string>,
): AbsorberFamily {
  return makeFamily({
    id,
    name,
    kind: 'fixed',
    variable: null,
    model: { form: 'fixed', gapEv },
    compositionRange: [0, 0],
    window: { gapEv: [gapEv, gapEv], reason: `fixed compound (${character}); the gap cannot be tuned` },
    dEgDtEvPerK,
    refractiveIndex,
    citation,
    sources: { ...sources, window: 'fixed compound' },
  });
}

/** All built-in families, alloys first. */
export function listFamilies(): readonly AbsorberFamily[] {
  return FAMILIES;
}

/**
 * Look a family up by id among the built-ins and any user-defined ones.
 * @param id kebab-case family id
 * @param extra user-defined families (from a design file), searched first
 * @throws UserError listing the known ids when id is unknown
 */
export function getFamily(id: string, extra: readonly AbsorberFamily[] = []): AbsorberFamily {
  const found = extra.find((f) => f.id === id) ?? FAMILIES.find((f) => f.id === id);
  if (found === undefined) {
    const known = [...extra, ...FAMILIES].map((f) => f.id).join(', ');
    throw new UserError(`unknown material family "${id}"; known families: ${known}`);
  }
  return found;
}

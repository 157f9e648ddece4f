/**
 * Plain-data description of a stack: subcells top (light side) first, their
 * absorptance, the optics between them, luminescent coupling and wiring.
 */

/** Absorption coefficient α(E) [cm⁻¹]. */
export type AlphaModel =
  | {
      /** Direct-gap edge α = α0·√((E − E_g)/1 eV), optional Urbach tail exp((E − E_g)/E_U) below the gap. */
      kind: 'direct';
      /** α at 1 eV above the gap [cm⁻¹]. */
      alpha0PerCm: number;
      /** Urbach energy [eV]; 0 for a sharp edge. */
      urbachEv: number;
    }
  | {
      /** Tabulated α(E), linear interpolation; 0 below the first energy, last value above the last. */
      kind: 'table';
      energyEv: number[];
      alphaPerCm: number[];
    };

/** Absorptance a(E) of one subcell; the same curve sets photogeneration and J0 (reciprocity). */
export type AbsorptanceModel =
  | {
      /** Ideal step: a = `value` above the gap, 0 below; value 1 is the classic limit. */
      kind: 'step';
      value: number;
    }
  | {
      /** Beer–Lambert: a = 1 − exp(−p·α·d), p = 1 (single pass) or 2 (rear mirror). */
      kind: 'beer-lambert';
      passes: 1 | 2;
      thicknessNm: number;
      alpha: AlphaModel;
    }
  | {
      /** Lambertian light trapping: a = 4n²αd / (1 + 4n²αd) (Tiedje et al., IEEE TED 31 (1984) 711). */
      kind: 'lambertian';
      refractiveIndex: number;
      thicknessNm: number;
      alpha: AlphaModel;
    }
  | {
      /**
       * Measured absorptance a(E) of the isolated film [-], linear interpolation; 0 below the
       * first energy, the last value held above the last. Filtered by the cells above like any film.
       */
      kind: 'absorptance-table';
      energyEv: number[];
      value: number[];
      /** Where the data came from (file name), for reports. */
      source?: string;
    }
  | {
      /**
       * External quantum efficiency measured in the stack [-]: front reflection and the cells
       * above are already in it, so it gives J_gen = q∫φ_0·EQE dE and, by reciprocity
       * (Rau, Phys. Rev. B 76 (2007) 085303), J0_rad = q∫EQE·φ_bb dE. Interpolation as above.
       */
      kind: 'eqe-table';
      energyEv: number[];
      value: number[];
      source?: string;
    };

/** Refractive index of a film when neither its family nor the user gives one [-] (crystalline Si near its gap, common practice). */
export const DEFAULT_FILM_INDEX = 3.5;

/** A constant or a table over photon energy [eV]; linear interpolation, end values held. */
export type SpectralValue = number | { energyEv: number[]; value: number[] };

/** One subcell: its gap [eV], external radiative efficiency (0, 1] and absorptance model. */
export interface SubcellSpec {
  /** Band gap [eV]. */
  gapEv: number;
  /** External radiative efficiency (0, 1]. */
  ere: number;
  absorptance: AbsorptanceModel;
  /** Series resistance of this subcell [Ω·cm²]; absent or 0 for none. */
  rsOhmCm2?: number;
  /** Refractive index of the film [-] (its family's, or given); radiative coupling below it uses it. Absent: DEFAULT_FILM_INDEX. */
  refractiveIndex?: number;
}

/** Luminescent coupling between neighbouring subcells. */
export type Coupling =
  | { model: 'none' }
  | {
      /** Empirical: fraction η_i of subcell i's recombination current that becomes photocurrent in subcell i+1; J0 unchanged. */
      model: 'empirical';
      /** One value per interface, top first (length = subcells − 1). */
      eta: number[];
    }
  | {
      /** Radiative limit: downward share n²/(1+n²) of the radiative part (ERE) of recombination; upper cells' J0 × (1+n²). */
      model: 'radiative';
      /** One index for every interface [-]; absent: each upper subcell's own film index. */
      refractiveIndex?: number;
    };

/** Index n [-] of radiative coupling below subcell i (0-based): the coupling's own, else the emitting film's. */
export function couplingIndexBelow(spec: StackSpec, i: number): number {
  const c = spec.coupling;
  if (c.model === 'radiative' && c.refractiveIndex !== undefined) return c.refractiveIndex;
  return spec.subcells[i].refractiveIndex ?? DEFAULT_FILM_INDEX;
}

/** True when some subcell has a series resistance. */
export const hasSeriesResistance = (spec: StackSpec): boolean => spec.subcells.some((c) => (c.rsOhmCm2 ?? 0) > 0);

/** Wiring: a partition of the subcells (0-based, top first) into series groups, or voltage-matched strings. */
export type Wiring =
  | { kind: 'groups'; label: string; groups: number[][] }
  | {
      /** m circuits of the upper group in series match n circuits of the lower: m·V_upper = n·V_lower. */
      kind: 'voltage-matched';
      label: string;
      m: number;
      n: number;
      groups: [number[], number[]];
    };

/** A stack as plain data: subcells top (light side) first, cell temperature [K], optics between them, coupling and wiring. */
export interface StackSpec {
  subcells: SubcellSpec[];
  /** Cell temperature [K]. */
  tempK: number;
  /** Front reflectance R(E) [-]. */
  frontReflectance: SpectralValue;
  /** Transmittance of the interlayer below subcell i, i = 0 … N−2 [-]. */
  interlayerTransmittance: SpectralValue[];
  coupling: Coupling;
  wiring: Wiring;
}

/** Ideal step subcells (a = 1), no reflection, lossless interlayers, isolated, at 300 K. */
export function idealStack(gapsEv: number[], wiring: Wiring, overrides: Partial<StackSpec> = {}): StackSpec {
  return {
    subcells: gapsEv.map((g) => ({ gapEv: g, ere: 1, absorptance: { kind: 'step', value: 1 } })),
    tempK: 300,
    frontReflectance: 0,
    interlayerTransmittance: gapsEv.slice(1).map(() => 1),
    coupling: { model: 'none' },
    wiring,
    ...overrides,
  };
}

/** 2T: one series string through all n subcells, one current (docs/PHYSICS.md §5). */
export const seriesWiring = (n: number): Wiring => ({ kind: 'groups', label: 'series', groups: [Array.from({ length: n }, (_, i) => i)] });
/** 4T (2N-terminal): every subcell its own circuit at its own maximum power point (docs/PHYSICS.md §5). */
export const independentWiring = (n: number): Wiring => ({ kind: 'groups', label: 'independent', groups: Array.from({ length: n }, (_, i) => [i]) });

/** The template stack with these gaps [eV], top first (and, if given, another cell temperature [K]); everything else unchanged. */
export function stackWithGaps(template: StackSpec, gapsEv: ArrayLike<number>, tempK = template.tempK): StackSpec {
  return { ...template, tempK, subcells: template.subcells.map((c, i) => ({ ...c, gapEv: gapsEv[i] })) };
}

/** True when the wiring is one series string through every subcell (2T): one current, re-matched under every spectrum. */
export function isSeriesString(w: Wiring): boolean {
  return w.kind === 'groups' && w.groups.length === 1;
}

/**
 * A design file as written (keys in snake_case, as in
 * schema/design.schema.json) and the resolved design the report runs on.
 */
import type { EnsembleSummary } from '../light/ensemble.js';
import type { Spectrum } from '../light/spectrum.js';
import type { SiteLightOptions, SiteYear } from '../light/site-year.js';
import type { SubcellConstraint } from '../search/design-search.js';
import type { LabelledSpectrum } from '../light/weighted-spectrum.js';
import type { AbsorptanceModel, StackSpec, Wiring } from '../stack/model.js';
import type { UserFamilyEntry } from '../materials/index.js';

export interface SpectrumEntry {
  source: string;
  suns?: number | 'max';
  irradiance?: number;
  units?: string;
}

export interface SubcellEntry {
  label?: string;
  free?: true;
  range?: [number, number];
  gap?: number;
  material?: string;
  full_range?: boolean;
  ere?: number;
  voc_loss?: number;
  /** Top cell: a constant absorptance above the gap, or "best" (the search thins it; series wirings). */
  absorptance?: number | 'best';
  /** A film: thickness [nm] with a direct edge (alpha0_per_cm, urbach_ev) or an α table (alpha_file). */
  thickness_nm?: number;
  alpha0_per_cm?: number;
  urbach_ev?: number;
  alpha_file?: string;
  /** Light path of the film: single (default), double or lambertian (bottom subcell only). */
  optics?: 'single' | 'double' | 'lambertian';
  /** Refractive index of the film [-] (default: its material's, else 3.5). */
  refractive_index?: number;
  /** Measured absorptance of the isolated film, or EQE measured in the stack (table files). */
  absorptance_file?: string;
  eqe_file?: string;
  /** Series resistance [Ω·cm²]. */
  rs_ohm_cm2?: number;
}

/** A wiring with its own optics: what differs from the shared ones (e.g. 4T transparent contacts). */
export interface WiringEntry {
  wiring: string;
  /** Extra transmittance between subcells (transparent contacts), one or one per interface. */
  contact_transmittance?: number | number[];
  lc?: 'none' | string | number | number[];
  /** Series resistance per subcell [Ω·cm²] for this wiring, top first. */
  rs_ohm_cm2?: number[];
}

export interface MapPairEntry {
  axes: [number, number];
  x?: [number, number];
  y?: [number, number];
}

/** The optional light-model keys of `weather:` and `sites:` (tracking, albedo, aerosol, water, ozone, Faiman coefficients). */
export interface WeatherLightKeys {
  tracking?: 'none' | 'single-axis';
  albedo?: number;
  aod500?: number;
  water_cm?: number;
  ozone_atm_cm?: number;
  faiman?: [number, number];
}

/** The file as written, after schema validation. */
export interface DesignFile {
  name: string;
  description?: string;
  spectrum?: string | SpectrumEntry;
  ensemble?: string;
  /** A weather file's hourly year as the ensemble (docs/PHYSICS.md §10). */
  weather?: WeatherLightKeys & {
    file: string;
    tilt: number;
    azimuth: number;
  };
  /** The question asked at several sites, each under its weather file's hourly year on one plane; the report adds a Sites section. */
  sites?: WeatherLightKeys & {
    /** Weather files or folders of them, relative to the design file. */
    files: string[];
    /** Tilt [°] or "latitude" (each site's own). */
    tilt: number | 'latitude';
    /** Azimuth [°] east of north, or "equator". */
    azimuth: number | 'equator';
  };
  temperature?: number;
  subcells: SubcellEntry[];
  optics?: {
    reflectance?: number;
    interlayer_transmittance?: number | number[];
    lc?: 'none' | string | number | number[];
  };
  wirings?: (string | WiringEntry)[];
  search?: { span?: [number, number]; step?: number };
  map?: { step?: number; pairs?: MapPairEntry[] };
  tolerance?: { loss?: number };
  /** User-defined absorber families (bowing form), usable as subcell materials by id. */
  materials?: UserFamilyEntry[];
  /** Several questions side by side; each replaces the shared keys it gives. */
  scenarios?: ScenarioEntry[];
}

/** One scenario: a name, its own subcells, and any shared key it replaces. */
export type ScenarioEntry = { name: string; subcells: SubcellEntry[] } & Partial<Omit<DesignFile, 'name' | 'subcells' | 'scenarios'>>;

export type { LabelledSpectrum };

/** The light of a design: one spectrum, or an ensemble of weighted members. */
export type DesignLight =
  | { kind: 'spectrum'; spectrum: Spectrum; request: string }
  | {
      kind: 'ensemble';
      name: string;
      sha256: string;
      source: string;
      /** Summary lines for the report (members, irradiance, APE, warnings). */
      summaryLines: string[];
      /** The ensemble's summary (irradiance, APE histogram, ranges), behind summaryLines. */
      summary: EnsembleSummary;
      warnings: string[];
      request: string;
      /** The site year, when the ensemble came from a weather file. */
      site?: SiteYear;
    };

export interface DesignSubcell {
  /** 1-based position from the top. */
  index: number;
  /** The user's label, or "subcell i". */
  label: string;
  /** True when the user gave a label. */
  labelled: boolean;
  constraint: SubcellConstraint;
  ere: number;
  /** Non-radiative Voc loss as given [V], when the file gave voc_loss. */
  vocLossV?: number;
  /** Constant absorptance above the gap (top cell only) [-]; 1 when the search chooses it ("best"). */
  absorptance: number;
  /** The subcell's absorptance model in every template (a film, measured data or a step). */
  model: AbsorptanceModel;
  /** Series resistance [Ω·cm²] (0 for none). */
  rsOhmCm2: number;
  /** Refractive index of the film, when given or known from the bound family [-]. */
  refractiveIndex?: number;
}

export interface DesignWiring {
  /** As written in the file, lower case (series, independent, 3t, vm:1:2). */
  key: string;
  /** For file names and ids: series, independent, 3t, vm-1-2. */
  slug: string;
  wiring: Wiring;
  /** Template stack (placeholder gaps) with this wiring. */
  template: StackSpec;
  /** The search chooses the top cell's constant absorptance (absorptance: best). */
  freeTopAbsorptance: boolean;
}

export interface DesignMapPair {
  /** 0-based subcells, xCell above yCell. */
  xCell: number;
  yCell: number;
  xRangeEv?: [number, number];
  yRangeEv?: [number, number];
}

/** The sites a design asks its question at (design files' `sites:`), resolved. */
export interface DesignSites {
  /** Weather files, folders expanded (their weather files in name order), paths usable from the working directory. */
  files: string[];
  /** Tilt [°] from horizontal, or each site's latitude; azimuth [°] east of north (180 = south), or facing the equator. */
  plane: { tilt: number | 'latitude'; azimuth: number | 'equator' };
  /** The light model at every site (as for a single weather file), without the plane. */
  model: Omit<SiteLightOptions, 'tiltDeg' | 'azimuthDeg'>;
}

/** A validated, resolved design. */
export interface Design {
  path: string;
  sha256: string;
  file: DesignFile;
  name: string;
  description: string;
  tempK: number;
  light: DesignLight;
  /** Spectra the objective weighs (one for a single spectrum). */
  spectra: LabelledSpectrum[];
  /** The spectrum used for per-subcell detail (J–V, bands): the single one, or the ensemble member with the largest energy share. */
  reference: LabelledSpectrum;
  subcells: DesignSubcell[];
  wirings: DesignWiring[];
  spanEv: [number, number];
  searchStepEv?: number;
  loss: number;
  /** Map step given in the file [eV], else undefined (chosen per map). */
  mapStepEv?: number;
  pairs: DesignMapPair[];
  /** The sites of the Sites section, when the file has `sites:` (the light above is then AM1.5G, the reference). */
  sites?: DesignSites;
}

/**
 * The plain-number outcomes a report is built from, one set per wiring. Types
 * only: `compute.ts` fills them, `ensemble-compare.ts` and the charts read them.
 */
import type { DesignMapPair, DesignWiring } from '../design/index.js';
import type { DesignSearchResult } from '../search/design-search.js';
import type { CompositionAxis } from '../search/composition-tolerance.js';
import type { GapMap } from '../search/map.js';
import type { StackResult } from '../stack/evaluate.js';
import type { StackSpec } from '../stack/model.js';

export interface MapMark {
  axis: 'x' | 'y';
  subcell: number;
  kind: 'window' | 'range' | 'fixed';
  loEv: number;
  hiEv: number;
  label: string;
}

export interface MapOutcome {
  pair: DesignMapPair;
  map: GapMap;
  stepEv: number;
  /** Marker: the wiring's recommended gaps on the mapped pair [eV]. */
  optimum: { x: number; y: number; value: number };
  /** η threshold of the tolerance region, (1 − loss)·best [-]. */
  threshold: number;
  /** J_gen(x cell) − J_gen(y cell) per pixel [A/m²] (series wiring only), NaN where not ordered. */
  matching: Float64Array | null;
  marks: MapMark[];
  /** Subcells maximised per pixel (0-based). */
  profiled: number[];
  warnings: string[];
  /** Secondary composition axes of mapped subcells bound to alloy families. */
  compositionAxes?: { x?: CompositionAxis; y?: CompositionAxis };
}

export interface SensitivitySlice {
  subcell: number;
  fixed: boolean;
  gapEv: number;
  /** Gap offsets [eV] and η [-] (null where the gaps would not descend). */
  deltaEv: number[];
  efficiency: (number | null)[];
  /** The subcell's practical window or allowed range [eV], when it has one. */
  windowEv?: [number, number];
}

export interface JvCurve {
  label: string;
  /** Voltage [V], current density [A/m²]. */
  voltageV: number[];
  currentAm2: number[];
}

export interface JvOutcome {
  subcells: JvCurve[];
  /** Terminal curve of a series stack. */
  stack: JvCurve | null;
  /** Operating point of each subcell in the stack. */
  operating: { vV: number; jAm2: number }[];
  /** Maximum power point of the stack's terminals (series). */
  stackMpp: { vV: number; jAm2: number } | null;
}

export interface WiringOutcome {
  wiring: DesignWiring;
  search: DesignSearchResult;
  bestSpec: StackSpec;
  /** The stack at its optimum under the reference spectrum at its cell temperature. */
  detail: StackResult;
  /** Terminal FF of a series stack, P_max / (V_oc·J_sc). */
  stackFf: number | null;
  sensitivity: SensitivitySlice[];
  jv: JvOutcome;
  maps: MapOutcome[];
}

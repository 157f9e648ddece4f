/** Tunable absorber families: composition ↔ gap models and their built-in data. */
export {
  type AbsorberFamily,
  type CompositionVariable,
  type FamilySpec,
  type GapDescription,
  type GapModel,
  type GapReach,
  type PracticalWindow,
  REFERENCE_TEMPERATURE_K,
  compositionsForGap,
  describeGap,
  gapAtTemperature,
  gapFromComposition,
  gapReach,
  isInWindow,
  makeFamily,
  modelCoefficientsEv,
  modelReach,
} from './alloy.js';
export { familyFromEntry, type UserFamilyEntry } from './user-family.js';
export { III_V_BOWING_EV, III_V_GAMMA, III_V_X, getFamily, listFamilies } from './families.js';
export { gapAtReference } from './reference-gap.js';

/**
 * Design files: a YAML or JSON description of a design question, checked
 * against schema/design.schema.json and resolved into engine inputs.
 */
import { validateDesignData } from './schema.js';
import { resolveDesign } from './resolve.js';
import { parseDesignText, readDesignSource } from './source.js';
import type { Design } from './types.js';
import { UserError } from '../errors.js';

export type { Design, DesignFile, DesignSites, DesignSubcell, DesignWiring, DesignMapPair, DesignLight, LabelledSpectrum } from './types.js';
export { DESIGN_SCHEMA_PATH, validateDesignData } from './schema.js';
export { DESIGN_DEFAULTS, MAX_MAP_AXIS_POINTS, constraintRangeEv, resolveDesign } from './resolve.js';
export { designError, fieldName, parseDesignText, readDesignSource, type DesignSource, type FieldPath } from './source.js';

export { loadScenarioSet, resolveScenarios, type ScenarioSet } from './scenarios.js';

/** Read, validate and resolve a design file (paths inside it are relative to the file); one with scenarios needs loadScenarioSet. */
export async function loadDesign(path: string): Promise<Design> {
  const src = readDesignSource(path);
  const f = validateDesignData(src);
  if (f.scenarios) throw new UserError(`${path}: holds ${f.scenarios.length} scenarios; load it as a set of scenarios (gapstack report handles both)`);
  return resolveDesign(src, f);
}

/** The same from text already in memory; `path` names the file in messages and anchors relative paths. */
export async function loadDesignText(path: string, text: string): Promise<Design> {
  const src = parseDesignText(path, text);
  const f = validateDesignData(src);
  if (f.scenarios) throw new UserError(`${path}: holds ${f.scenarios.length} scenarios; load it as a set of scenarios (gapstack report handles both)`);
  return resolveDesign(src, f);
}

/**
 * Design files: a YAML or JSON description of a design question, checked
 * against schema/design.schema.json and resolved into engine inputs.
 */
import { validateDesignData } from './schema.js';
import { resolveDesign } from './resolve.js';
import { parseDesignText, readDesignSource } from './source.js';
import type { Design } from './types.js';

export type { Design, DesignFile, DesignSubcell, DesignWiring, DesignMapPair, DesignLight, LabelledSpectrum } from './types.js';
export { DESIGN_SCHEMA_PATH, validateDesignData } from './schema.js';
export { DESIGN_DEFAULTS, MAX_MAP_AXIS_POINTS, constraintRangeEv, resolveDesign } from './resolve.js';
export { designError, fieldName, parseDesignText, readDesignSource, type DesignSource, type FieldPath } from './source.js';

/** Read, validate and resolve a design file (paths inside it are relative to the file). */
export async function loadDesign(path: string): Promise<Design> {
  const src = readDesignSource(path);
  return resolveDesign(src, validateDesignData(src));
}

/** The same from text already in memory; `path` names the file in messages and anchors relative paths. */
export async function loadDesignText(path: string, text: string): Promise<Design> {
  const src = parseDesignText(path, text);
  return resolveDesign(src, validateDesignData(src));
}

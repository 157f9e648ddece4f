/**
 * Several design questions in one file: `scenarios:` holds named designs that
 * share the file's top-level keys and may replace any of them. Each scenario
 * resolves as a design of its own; errors point at the scenario's lines.
 */
import { UserError } from '../errors.js';
import { resolveDesign } from './resolve.js';
import { validateDesignData } from './schema.js';
import { readDesignSource, type DesignSource, type FieldPath } from './source.js';
import type { Design, DesignFile, ScenarioEntry } from './types.js';

export interface ScenarioSet {
  /** The file's name and description. */
  name: string;
  description: string;
  path: string;
  sha256: string;
  /** True when the file used `scenarios:` (a plain design gives one unnamed scenario). */
  named: boolean;
  scenarios: Design[];
}

/** The scenario's design file: shared keys, replaced by the scenario's own. */
function scenarioFile(f: DesignFile, s: ScenarioEntry): DesignFile {
  const { scenarios: _omit, ...shared } = f;
  return { ...shared, ...s, name: s.name } as DesignFile;
}

/** A view of the source in which fields the scenario sets are found under scenarios[k]. */
function scenarioSource(src: DesignSource, s: ScenarioEntry, k: number): DesignSource {
  const own = new Set(Object.keys(s));
  return {
    ...src,
    lineOf: (path: FieldPath, key?: boolean) => (path.length > 0 && own.has(String(path[0])) ? src.lineOf(['scenarios', k, ...path], key) : src.lineOf(path, key)),
  };
}

/** Resolve every scenario of a schema-valid file (or the file itself as one scenario). */
export async function resolveScenarios(src: DesignSource, f: DesignFile): Promise<ScenarioSet> {
  const base = { name: f.name, description: f.description ?? '', path: src.path, sha256: src.sha256 };
  if (!f.scenarios) return { ...base, named: false, scenarios: [await resolveDesign(src, f)] };
  if (f.sites !== undefined) throw new UserError(`${src.path}:${src.lineOf(['sites'], true) ?? '?'}: sites: does not go with scenarios; ask the sites question in a design file of its own`);
  const names = new Set<string>();
  const scenarios: Design[] = [];
  for (const [k, s] of f.scenarios.entries()) {
    if (names.has(s.name)) throw new UserError(`${src.path}:${src.lineOf(['scenarios', k, 'name']) ?? '?'}: scenarios[${k}].name: "${s.name}" is used twice; scenarios need distinct names`);
    names.add(s.name);
    try {
      scenarios.push(await resolveDesign(scenarioSource(src, s, k), scenarioFile(f, s)));
    } catch (err) {
      // Name the scenario in front of the field: "file:line: scenarios[1] (all-perovskite): subcells[0].gap: …".
      if (err instanceof UserError) throw new UserError(err.message.replace(/^([^\n]*?:\d+: |[^\n]*?: )/, `$1scenarios[${k}] (${s.name}): `));
      throw err;
    }
  }
  return { ...base, named: true, scenarios };
}

/** Read, validate and resolve a design file into its scenarios. */
export async function loadScenarioSet(path: string): Promise<ScenarioSet> {
  const src = readDesignSource(path);
  return resolveScenarios(src, validateDesignData(src));
}

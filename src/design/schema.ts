/**
 * Checking a design file against schema/design.schema.json (JSON Schema
 * draft 2020-12, with ajv) and turning ajv's errors into sentences that name
 * the field, the line and what is allowed.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { ErrorObject, ValidateFunction } from 'ajv';
import { UserError } from '../errors.js';
import { designError, fieldName, type DesignSource, type FieldPath } from './source.js';
import type { DesignFile } from './types.js';
// ajv's standalone code for schema/design.schema.json, generated at build time by
// scripts/compile-design-schema.mjs: loading a design neither imports ajv's compiler nor compiles.
import compiledValidator from './validate-design.generated.js';

/** Where the schema ships: schema/ at the package root (from src/ and dist/ alike). */
export const DESIGN_SCHEMA_PATH = fileURLToPath(new URL('../../schema/design.schema.json', import.meta.url));

/** The schema as data. */
export function designSchema(): Record<string, unknown> {
  return JSON.parse(readFileSync(DESIGN_SCHEMA_PATH, 'utf8')) as Record<string, unknown>;
}

function validator(): ValidateFunction {
  return compiledValidator as ValidateFunction;
}

function pathOf(instancePath: string): (string | number)[] {
  if (instancePath === '') return [];
  return instancePath
    .slice(1)
    .split('/')
    .map((s) => s.replace(/~1/g, '/').replace(/~0/g, '~'))
    .map((s) => (/^\d+$/.test(s) ? Number(s) : s));
}

function shown(v: unknown): string {
  const text = typeof v === 'string' ? `"${v}"` : JSON.stringify(v);
  if (text === undefined) return String(v);
  return text.length > 60 ? `${text.slice(0, 57)}…` : text;
}

const TYPE_WORDS: Record<string, string> = { number: 'a number', integer: 'a whole number', string: 'text', object: 'a mapping of keys', array: 'a list', boolean: 'true or false' };

const COMPARISON: Record<string, string> = { '>=': '≥', '<=': '≤', '>': '>', '<': '<' };

interface Problem {
  path: FieldPath;
  key: boolean;
  message: string;
}

function describe(e: ErrorObject): Problem {
  const path = pathOf(e.instancePath);
  const p = e.params as Record<string, unknown>;
  const got = ` (got ${shown(e.data)})`;
  const desc = (e.parentSchema as { description?: string } | undefined)?.description;
  switch (e.keyword) {
    case 'additionalProperties': {
      const extra = String(p.additionalProperty);
      const allowed = Object.keys((e.parentSchema as { properties?: object } | undefined)?.properties ?? {});
      return { path: [...path, extra], key: true, message: `unknown key "${extra}"; allowed here: ${allowed.join(', ')}` };
    }
    case 'required':
      return { path, key: false, message: `missing required key "${String(p.missingProperty)}"` };
    case 'type':
      return { path, key: false, message: `must be ${TYPE_WORDS[String(p.type)] ?? String(p.type)}${got}` };
    case 'minimum':
    case 'maximum':
    case 'exclusiveMinimum':
    case 'exclusiveMaximum':
      return { path, key: false, message: `must be ${COMPARISON[String(p.comparison)] ?? String(p.comparison)} ${String(p.limit)}${got}${desc ? `: ${desc}` : ''}` };
    case 'minItems':
      return { path, key: false, message: `must hold at least ${String(p.limit)} item(s) (got ${Array.isArray(e.data) ? e.data.length : '?'})` };
    case 'maxItems':
      if (path.length === 1 && path[0] === 'subcells') return { path, key: false, message: `a stack holds at most ${String(p.limit)} subcells (got ${Array.isArray(e.data) ? e.data.length : '?'})` };
      return { path, key: false, message: `must hold at most ${String(p.limit)} item(s) (got ${Array.isArray(e.data) ? e.data.length : '?'})` };
    case 'minLength':
      return { path, key: false, message: 'must not be empty' };
    case 'maxLength':
      return { path, key: false, message: `must be at most ${String(p.limit)} characters` };
    case 'const':
      return { path, key: false, message: `must be ${shown(p.allowedValue)}${got}` };
    case 'not-with':
      return { path, key: true, message: `does not go with gap_formula; give either gap_formula or ea_ev, eb_ev and bowing_ev` };
    case 'pattern':
    case 'anyOf':
      return { path, key: false, message: `${shown(e.data)} is not allowed${desc ? `; expected ${desc}` : ''}` };
    default:
      return { path, key: false, message: `${e.message ?? 'is not valid'}${got}` };
  }
}

/** Validate parsed design data; throws one UserError listing every problem, the first on the first line. */
export function validateDesignData(src: DesignSource): DesignFile {
  const validate = validator();
  if (validate(src.data)) return src.data as DesignFile;
  let errors = validate.errors ?? [];
  // A failed anyOf reports every branch too; keep only the anyOf itself there.
  const anyOfPaths = errors.filter((e) => e.keyword === 'anyOf').map((e) => e.instancePath);
  // An if/then reports its own failure beside the failed "then" keyword; the latter says it.
  errors = errors.filter((e) => e.keyword !== 'if');
  // A key a branch forbids (schema false) reads as an unknown key there.
  errors = errors.map((e) => (e.keyword === 'false schema' ? { ...e, keyword: 'not-with', params: { key: pathOf(e.instancePath).slice(-1)[0] } } : e));
  const kept = errors.filter((e) => e.keyword === 'anyOf' || !anyOfPaths.some((a) => e.instancePath === a || e.instancePath.startsWith(`${a}/`)));
  const seen = new Set<string>();
  const problems = kept
    .map(describe)
    .map((p) => ({ ...p, line: src.lineOf(p.path, p.key) }))
    .filter((p) => {
      const k = `${fieldName(p.path)}|${p.message}`;
      if (seen.has(k)) return false;
      seen.add(k);
      return true;
    })
    .sort((a, b) => (a.line ?? 1e9) - (b.line ?? 1e9));
  const lines = problems.map((p) => designError(src, p.path, p.message, p.key).message);
  const more = lines.length > 1 ? ` (and ${lines.length - 1} more problem${lines.length > 2 ? 's' : ''}, listed below)` : '';
  throw new UserError([`${lines[0]}${more}`, ...lines.slice(1)].join('\n'));
}

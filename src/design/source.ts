/**
 * Reading a design file's text into plain data, keeping where each value sat
 * so that every later error can name the field and, for YAML, the line.
 * JSON is parsed strictly with JSON.parse; its locations come from the YAML
 * parser, which reads JSON as a subset.
 */
import { readUserText } from '../io/read-user-file.js';
import { extname } from 'node:path';
import { isMap, isSeq, LineCounter, parseDocument, type Document, type Node as YamlNode } from 'yaml';
import { fileError, UserError } from '../errors.js';
import { sha256Hex } from '../light/spectrum.js';

/** A path into the design data: object keys and array indices. */
export type FieldPath = readonly (string | number)[];

/** Largest design file read [bytes]. */
export const MAX_DESIGN_FILE_BYTES = 1_000_000;

export interface DesignSource {
  /** The path as given. */
  path: string;
  /** SHA-256 (hex) of the file bytes. */
  sha256: string;
  format: 'yaml' | 'json';
  /** Parsed data, not yet validated. */
  data: unknown;
  /** 1-based line of the value at a field path (of the key, for `key: true`); undefined when unknown. */
  lineOf(path: FieldPath, key?: boolean): number | undefined;
}

/** "subcells[1].gap" from ["subcells", 1, "gap"]; "(top level)" for the root. */
export function fieldName(path: FieldPath): string {
  let out = '';
  for (const p of path) out += typeof p === 'number' ? `[${p}]` : out === '' ? p : `.${p}`;
  return out === '' ? '(top level)' : out;
}

/** A UserError located in the design file: "file:line: field: message". */
export function designError(src: Pick<DesignSource, 'path' | 'lineOf'>, path: FieldPath, message: string, key = false): UserError {
  return fileError(src.path, src.lineOf(path, key), `${fieldName(path)}: ${message}`);
}

function locator(doc: Document | undefined, lc: LineCounter): DesignSource['lineOf'] {
  return (path, key = false) => {
    if (!doc) return undefined;
    let node: unknown = doc.contents;
    let keyNode: unknown;
    let last: unknown = node;
    for (const p of path) {
      keyNode = undefined;
      if (isMap(node)) {
        const pair = node.items.find((it) => (it.key as { value?: unknown } | null)?.value === p);
        if (!pair) break;
        keyNode = pair.key;
        node = pair.value;
      } else if (isSeq(node) && typeof p === 'number') {
        node = node.items[p];
      } else break;
      if (node) last = node;
      else break;
    }
    // A block list or mapping reads best at its key's line; a scalar at its own.
    const block = (isMap(node) || isSeq(node)) && !(node as { flow?: boolean }).flow;
    const target = ((key || block) && keyNode ? keyNode : node ?? keyNode ?? last) as YamlNode | undefined;
    const range = target?.range;
    if (!range) return undefined;
    return lc.linePos(range[0]).line;
  };
}

/** Deepest nesting of lists and mappings accepted in a design file (real designs stay below 10). */
export const MAX_DESIGN_NESTING = 64;

/**
 * Refuse flow nesting deeper than MAX_DESIGN_NESTING before any parser
 * recurses into it (a 200 000-deep `[[[…` would overflow the stack). Brackets
 * inside quoted strings and comments are skipped.
 */
function checkNesting(path: string, text: string): void {
  let depth = 0;
  let line = 1;
  let quote = '';
  let comment = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '\n') {
      line++;
      comment = false;
      continue;
    }
    if (comment) continue;
    if (quote) {
      if (c === '\\' && quote === '"') i++;
      else if (c === quote) quote = '';
      continue;
    }
    if (c === '"' || (c === "'" && /[\s[{,:]/.test(text[i - 1] ?? ' '))) quote = c;
    else if (c === '#' && /\s/.test(text[i - 1] ?? '\n')) comment = true;
    else if (c === '[' || c === '{') {
      if (++depth > MAX_DESIGN_NESTING) throw fileError(path, line, `nested more than ${MAX_DESIGN_NESTING} levels deep; a design file is refused there`);
    } else if (c === ']' || c === '}') depth = Math.max(0, depth - 1);
  }
}

/** Parse design text; `path` is used for messages and to choose YAML or JSON (by extension). */
export function parseDesignText(path: string, text: string, sha256 = sha256Hex(text)): DesignSource {
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  checkNesting(path, text);
  try {
    return parseDesignTextChecked(path, text, sha256);
  } catch (err) {
    if (err instanceof UserError) throw err;
    // The parsers' own limits (alias expansion, recursion) are limits on the input.
    const msg = (err as Error)?.message ?? String(err);
    if (err instanceof RangeError || err instanceof ReferenceError || /alias|call stack/i.test(msg)) {
      throw fileError(path, undefined, `refused: ${msg.split('\n')[0]} (aliases or nesting beyond what a design file needs)`);
    }
    throw err;
  }
}

function parseDesignTextChecked(path: string, text: string, sha256: string): DesignSource {
  const format = extname(path).toLowerCase() === '.json' ? 'json' : 'yaml';
  const lc = new LineCounter();
  if (format === 'json') {
    let data: unknown;
    try {
      data = JSON.parse(text);
    } catch (err) {
      const msg = (err as Error).message;
      const pos = /position (\d+)/.exec(msg);
      // Newer engines drop the position; the YAML parser, reading JSON as flow YAML, still finds the line.
      const yerr = parseDocument(text, { lineCounter: lc, prettyErrors: false }).errors[0];
      const fallback = yerr ? lc.linePos(yerr.pos[0]).line : undefined;
      const line = pos ? text.slice(0, Number(pos[1])).split('\n').length : fallback;
      throw fileError(path, line, `not valid JSON: ${msg.split('\n')[0].replace(/^JSON\.parse: /, '')}`);
    }
    // JSON.parse keeps the last of duplicate keys silently; a design file is rejected for them, as in YAML.
    const doc = parseDocument(text, { lineCounter: lc, prettyErrors: false });
    const dup = doc.errors.find((e) => e.code === 'DUPLICATE_KEY');
    if (dup) throw fileError(path, dup.linePos?.[0]?.line ?? lc.linePos(dup.pos[0]).line, `not valid as a design file: ${dup.message.split('\n')[0]}`);
    return { path, sha256, format, data, lineOf: locator(doc.errors.length === 0 ? doc : undefined, lc) };
  }
  const doc = parseDocument(text, { lineCounter: lc, prettyErrors: false });
  if (doc.errors.length > 0) {
    const e = doc.errors[0];
    const line = e.linePos?.[0]?.line ?? lc.linePos(e.pos[0]).line;
    throw fileError(path, line, `not valid YAML: ${e.message.split('\n')[0]}`);
  }
  const data = doc.toJS({ maxAliasCount: 100 }) as unknown;
  return { path, sha256, format, data, lineOf: locator(doc, lc) };
}

/** Read and parse a design file (a regular file of at most MAX_DESIGN_FILE_BYTES, checked before and while reading). */
export function readDesignSource(path: string): DesignSource {
  const { bytes, text } = readUserText(path, { what: 'design file', maxBytes: MAX_DESIGN_FILE_BYTES });
  return parseDesignText(path, text, sha256Hex(bytes));
}

/**
 * The command line's contract at its edges: what a closed pipe or a full disk
 * does to standard output, options given twice, negative numbers as option
 * values, terminal control codes in text that came from users' files, and
 * numbers that must never be printed when they are not finite.
 */
import { UserError } from '../errors.js';

export const EXIT_OK = 0;
export const EXIT_USER = 2;
export const EXIT_INTERNAL = 1;

/** Options that may be given more than once (each adds an item). */
const REPEATABLE = new Set(['fix', 'range', 'material']);

/** Short aliases of long options (as registered in main.ts). */
const ALIASES: Record<string, string> = { o: 'output', h: 'help' };

/** `--top-absorptance` and `--topAbsorptance` are one option to yargs. */
function canonical(name: string): string {
  const long = ALIASES[name] ?? name;
  return long.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`).replace(/^no-/, '');
}

/**
 * Refuse a single-valued option given twice (`--gaps 1.7 --gaps 1.1` would
 * otherwise become a 2-cell stack, `-o a -o b` a list of paths), before any work.
 */
export function checkRepeatedOptions(argv: readonly string[]): void {
  const seen = new Map<string, string>();
  for (const word of argv) {
    if (word === '--') break;
    let name: string | undefined;
    if (word.startsWith('--') && word.length > 2) name = word.slice(2).split('=')[0];
    else if (/^-[A-Za-z]$/.test(word) || /^-[A-Za-z]=/.test(word)) name = word.slice(1, 2);
    if (name === undefined) continue;
    const key = canonical(name);
    if (REPEATABLE.has(key)) continue;
    const first = seen.get(key);
    if (first !== undefined) throw new UserError(`--${key} is given twice (${first} and ${word}); give it once`);
    seen.set(key, word);
  }
}

/**
 * `--x -1:2` and `--irradiance -5`: a value that starts with a minus and a
 * digit belongs to the option before it, not a new option. Joined as
 * `--x=-1:2` so the parser reads it as the value (and the checks then judge it).
 */
export function joinNegativeValues(argv: readonly string[]): string[] {
  const out: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const word = argv[i];
    const next = argv[i + 1];
    if (word === '--') {
      out.push(...argv.slice(i));
      break;
    }
    if (/^--[A-Za-z][\w-]*$/.test(word) && next !== undefined && /^-(\d|\.\d)/.test(next)) {
      out.push(`${word}=${next}`);
      i++;
    } else out.push(word);
  }
  return out;
}

/**
 * Text safe for a terminal: C0/C1 control characters other than newline and
 * tab (ESC above all, which starts colour and cursor codes) are shown as
 * visible escapes, so a label in a user's file cannot rewrite the screen.
 */
export function sanitiseForTerminal(text: string): string {
  // eslint-disable-next-line no-control-regex
  return text.replace(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/g, (c) => `\\x${c.charCodeAt(0).toString(16).padStart(2, '0')}`);
}

/** A result that holds NaN or ±Infinity: an internal fault, never shown as a number. */
export class NonFiniteResult extends Error {
  constructor(where: string) {
    super(`a computed value is not finite (${where}); nothing was printed`);
    this.name = 'NonFiniteResult';
  }
}

/** Throw NonFiniteResult when command-line text shows a NaN or an infinity as a number. */
export function assertFiniteText(text: string): void {
  const m = /(^|[^A-Za-z_])(NaN|-?Infinity)([^A-Za-z_]|$)/.exec(text);
  if (m) {
    const line = text.slice(0, m.index).split('\n').length;
    throw new NonFiniteResult(`output line ${line}`);
  }
}

/**
 * JSON text of a command's result; a non-finite number anywhere in it (which
 * JSON.stringify would silently print as null) is an internal fault.
 */
export function finiteJson(value: unknown, replacer: null = null, indent?: number): string {
  void replacer; // the JSON.stringify signature, so call sites read the same
  return JSON.stringify(
    value,
    function (this: unknown, key: string, v: unknown) {
      if (typeof v === 'number' && !Number.isFinite(v)) throw new NonFiniteResult(`field "${key}"`);
      return v;
    },
    indent,
  );
}

/**
 * Standard output that cannot take more: a reader that went away (EPIPE, as
 * with `| head -1`) ends the run quietly with exit 0, as Unix tools do; a full
 * disk or another write failure ends it with exit 2 and one line.
 */
export function guardStandardStreams(): void {
  process.stdout.on('error', (err: NodeJS.ErrnoException) => {
    if (err.code === 'EPIPE' || err.code === 'ERR_STREAM_DESTROYED') process.exit(EXIT_OK);
    try {
      process.stderr.write(`gapstack: cannot write the output (${err.code === 'ENOSPC' ? 'no space left on the device' : err.code ?? 'error'})\n`);
    } catch {
      // stderr is gone too; the exit code still says it
    }
    process.exit(EXIT_USER);
  });
  // A closed stderr must not turn a clean run into a crash either.
  process.stderr.on('error', () => process.exit(process.exitCode === undefined ? EXIT_OK : Number(process.exitCode)));
}

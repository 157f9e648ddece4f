/**
 * The command line's front and each command are separate bundles, each with
 * its own copy of this module, so the front cannot tell a command's errors by
 * `instanceof`: these marks, shared through the global symbol registry, can.
 */
const USER_ERROR = Symbol.for('gapstack.UserError');
const PARAMETER_ERROR = Symbol.for('gapstack.ParameterError');

/**
 * Errors that a user can fix (bad option, bad file, impossible constraint).
 * The command line prints `message` alone and exits with code 2; anything else
 * is an internal fault (exit 1, hint to rerun with --debug).
 */
export class UserError extends Error {
  /** Marks a UserError from any copy of this module (isUserError). */
  readonly [USER_ERROR] = true;

  constructor(message: string) {
    super(message);
    this.name = 'UserError';
  }
}

/** A user error located in a file: the message starts with `file:line:`. */
export function fileError(file: string, line: number | undefined, message: string): UserError {
  return new UserError(line === undefined ? `${file}: ${message}` : `${file}:${line}: ${message}`);
}

/** A parameter named inside a message, so a shell can call it by its own name. */
export interface ParameterRef {
  readonly parameter: string;
}

/** Message text: plain pieces and parameter references, in reading order. */
export type MessageParts = readonly (string | ParameterRef)[];

/** A reference to a parameter inside `says` text. */
export const ref = (parameter: string): ParameterRef => ({ parameter });

/**
 * Tagged template for messages that name parameters: interpolated
 * `ref('stepEv')` values stay references, everything else becomes text.
 * says`${ref('stepEv')} must be positive, got ${x}`
 */
export function says(strings: TemplateStringsArray, ...values: unknown[]): MessageParts {
  const parts: (string | ParameterRef)[] = [];
  strings.forEach((s, i) => {
    if (s) parts.push(s);
    if (i < values.length) {
      const v = values[i];
      parts.push(typeof v === 'object' && v !== null && 'parameter' in v ? (v as ParameterRef) : String(v));
    }
  });
  return parts;
}

/**
 * A value a library function cannot use. The message names parameters as the
 * library does (`stepEv must be within 0.0001–0.2 eV, got 0.3`); a shell that
 * calls them something else (a command-line flag, a design-file field)
 * rebuilds it with `messageWith`. It is a UserError, so the command line
 * still exits with code 2.
 */
export class ParameterError extends UserError {
  /** Marks a ParameterError from any copy of this module (isParameterError). */
  readonly [PARAMETER_ERROR] = true;
  /** The parameter at fault, as the library names it (e.g. `stepEv`, `fixedEv[1]`). */
  readonly parameter: string;
  /** What the parameter accepts, in words. */
  readonly allowed: string;
  /** The message with its parameter references still open. */
  readonly parts: MessageParts;

  constructor(parameter: string, allowed: string, parts: MessageParts) {
    super(render(parts, (p) => p));
    this.name = 'ParameterError';
    this.parameter = parameter;
    this.allowed = allowed;
    this.parts = parts;
  }

  /**
   * The message with each parameter renamed (`undefined` keeps the library
   * name); `omitLeading` drops a reference that opens the message when it
   * approves that parameter, for contexts that already say where the value
   * came from.
   */
  messageWith(rename: (parameter: string) => string | undefined, opts: { omitLeading?: (parameter: string) => boolean } = {}): string {
    let parts = this.parts;
    const lead = parts[0];
    if (opts.omitLeading && parts.length > 1 && typeof lead !== 'string' && opts.omitLeading(lead.parameter)) {
      const next = parts[1];
      parts = [typeof next === 'string' ? next.replace(/^\s+/, '') : next, ...parts.slice(2)];
    }
    return render(parts, (p) => rename(p) ?? p);
  }
}

const marked = (err: unknown, mark: symbol): boolean => typeof err === 'object' && err !== null && (err as Record<symbol, unknown>)[mark] === true;

/** A UserError, from this copy of the module or another. */
export const isUserError = (err: unknown): err is UserError => err instanceof UserError || marked(err, USER_ERROR);

/** A ParameterError, from this copy of the module or another. */
export const isParameterError = (err: unknown): err is ParameterError => err instanceof ParameterError || marked(err, PARAMETER_ERROR);

function render(parts: MessageParts, name: (parameter: string) => string): string {
  return parts.map((p) => (typeof p === 'string' ? p : name(p.parameter))).join('');
}

/** A ParameterError located in a file: the message starts with `file:line:` as `fileError`'s do. */
export function fileParameterError(file: string, line: number | undefined, parameter: string, allowed: string, parts: MessageParts): ParameterError {
  return new ParameterError(parameter, allowed, [line === undefined ? `${file}: ` : `${file}:${line}: `, ...parts]);
}

/** The same user error with text appended, keeping a ParameterError's parameter references. */
export function withSuffix(err: UserError, suffix: string): UserError {
  return err instanceof ParameterError ? new ParameterError(err.parameter, err.allowed, [...err.parts, suffix]) : new UserError(`${err.message}${suffix}`);
}

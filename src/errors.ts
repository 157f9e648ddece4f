/**
 * Errors that a user can fix (bad option, bad file, impossible constraint).
 * The command line prints `message` alone and exits with code 2; anything else
 * is an internal fault (exit 1, hint to rerun with --debug).
 */
export class UserError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UserError';
  }
}

/** A user error located in a file: the message starts with `file:line:`. */
export function fileError(file: string, line: number | undefined, message: string): UserError {
  return new UserError(line === undefined ? `${file}: ${message}` : `${file}:${line}: ${message}`);
}

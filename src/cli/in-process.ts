/**
 * The command line run inside the calling process: what it prints and the
 * exit code it would end with, without spawning node. For tests of output
 * and messages and for embedding; one call at a time (it borrows
 * process.stdout, process.stderr and process.exitCode for the duration).
 * `--help` and `--version` are left to a real process: yargs prints those
 * through the console and ends the process.
 */

export interface CliOutcome {
  /** Exit code the process would end with: 0 success, 2 a user error, 1 an internal fault. */
  code: number;
  stdout: string;
  stderr: string;
}

let busy = false;

/** Run `gapstack <argv…>` in this process. */
export async function runInProcess(argv: string[]): Promise<CliOutcome> {
  if (argv.some((a) => a === '--help' || a === '-h' || a === '--version')) throw new Error('--help and --version end the process; run them in a child process');
  if (busy) throw new Error('runInProcess is already running: one call at a time');
  busy = true;
  const { run } = await import('./main.js');
  const out: string[] = [];
  const err: string[] = [];
  const writeOut = process.stdout.write;
  const writeErr = process.stderr.write;
  const exitBefore = process.exitCode;
  const capture = (sink: string[]) =>
    ((chunk: string | Uint8Array, ...rest: unknown[]) => {
      sink.push(typeof chunk === 'string' ? chunk : Buffer.from(chunk).toString('utf8'));
      const done = rest.find((r) => typeof r === 'function') as (() => void) | undefined;
      done?.();
      return true;
    }) as typeof process.stdout.write;
  process.exitCode = undefined;
  process.stdout.write = capture(out);
  process.stderr.write = capture(err);
  try {
    await run(argv);
    return { code: Number(process.exitCode ?? 0), stdout: out.join(''), stderr: err.join('') };
  } finally {
    process.stdout.write = writeOut;
    process.stderr.write = writeErr;
    process.exitCode = exitBefore;
    busy = false;
  }
}

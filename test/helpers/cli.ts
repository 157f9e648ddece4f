import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

export const ROOT = fileURLToPath(new URL('../..', import.meta.url));
export const BIN = fileURLToPath(new URL('../../bin/gapstack.js', import.meta.url));

export interface CliResult {
  code: number;
  stdout: string;
  stderr: string;
}

/** Run the built command line (npm test builds dist first). */
export function runCli(args: string[], opts: { cwd?: string; input?: string } = {}): CliResult {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: opts.cwd ?? ROOT, encoding: 'utf8', input: opts.input, timeout: 120_000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

/** Run and parse JSON stdout, failing loudly on a non-zero exit. */
export function runJson(args: string[]): any {
  const r = runCli([...args, '--json']);
  if (r.code !== 0) throw new Error(`exit ${r.code}: ${r.stderr}`);
  return JSON.parse(r.stdout);
}

import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

export const ROOT = fileURLToPath(new URL('../..', import.meta.url));
export const BIN = fileURLToPath(new URL('../../bin/gapstack.cjs', import.meta.url));

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

/**
 * Run the built command line inside this test's process (dist/cli/in-process.js,
 * built by npm test's pretest): the same output and exit code as `runCli`
 * without starting node, for tests of output and messages. Each command family
 * keeps at least one spawned `runCli` test proving the binary itself.
 */
export async function runCliHere(args: string[]): Promise<CliResult> {
  const { runInProcess } = (await import(pathToFileURL(join(ROOT, 'dist', 'cli', 'in-process.js')).href)) as typeof import('../../src/cli/in-process.js');
  return runInProcess(args);
}

/** In-process `runJson`. */
export async function runJsonHere(args: string[]): Promise<any> {
  const r = await runCliHere([...args, '--json']);
  if (r.code !== 0) throw new Error(`exit ${r.code}: ${r.stderr}`);
  return JSON.parse(r.stdout);
}

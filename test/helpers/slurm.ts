/**
 * A throwaway single-node Slurm cluster on localhost for integration tests:
 * Debian's slurm-wlm and munge (installed with apt-get when absent and we are
 * root), a private munge key and socket, a minimal slurm.conf in a temporary
 * folder with its own ports, and the daemons this helper started stopped again
 * by their pids. Where the machine cannot run Slurm, `start` returns the reason.
 */
import { spawnSync } from 'node:child_process';
import { chmodSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { hostname, tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { randomBytes } from 'node:crypto';

export interface SlurmCluster {
  dir: string;
  /** Environment for sbatch, squeue, scontrol: points them at this cluster's slurm.conf. */
  env: NodeJS.ProcessEnv;
  stop: () => void;
}

const TOOLS = ['munged', 'slurmctld', 'slurmd', 'sbatch', 'scontrol', 'sinfo'];

function which(tool: string): boolean {
  return spawnSync('sh', ['-c', `command -v ${tool} || test -x /usr/sbin/${tool}`], { encoding: 'utf8' }).status === 0;
}

function run(cmd: string, args: string[], env?: NodeJS.ProcessEnv, timeoutMs = 60_000) {
  return spawnSync(cmd, args, { encoding: 'utf8', env: env ?? process.env, timeout: timeoutMs });
}

/** Install slurm-wlm and munge with apt-get when they are missing; the reason it could not, or null. */
function ensureInstalled(): string | null {
  if (TOOLS.every(which)) return null;
  if (process.getuid?.() !== 0) return 'Slurm is not installed and this test is not running as root, so it cannot install it (apt-get install slurm-wlm munge)';
  if (!which('apt-get')) return 'Slurm is not installed and this machine has no apt-get to install it';
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  let r = run('apt-get', ['install', '-y', '--no-install-recommends', 'slurm-wlm', 'munge'], env, 900_000);
  if (r.status !== 0) {
    run('apt-get', ['update'], env, 600_000);
    r = run('apt-get', ['install', '-y', '--no-install-recommends', 'slurm-wlm', 'munge'], env, 900_000);
  }
  if (r.status !== 0) return `apt-get could not install slurm-wlm and munge: ${(r.stderr || r.stdout).trim().split('\n').pop()}`;
  return TOOLS.every(which) ? null : 'slurm-wlm and munge installed, but their programs are not on PATH';
}

function pidIn(file: string): number | null {
  try {
    const pid = Number(readFileSync(file, 'utf8').trim());
    return Number.isInteger(pid) && pid > 1 ? pid : null;
  } catch {
    return null;
  }
}

/** Whether a process is still running (a zombie counts as gone). */
function alive(pid: number | null): boolean {
  if (pid === null) return false;
  try {
    process.kill(pid, 0);
  } catch {
    return false;
  }
  try {
    return !/^\d+ \([^)]*\) Z/.test(readFileSync(`/proc/${pid}/stat`, 'utf8'));
  } catch {
    return false;
  }
}

function killPid(pid: number | null): void {
  if (pid === null) return;
  try {
    process.kill(pid, 'SIGTERM');
  } catch {
    /* already gone */
  }
}

async function waitFor(check: () => boolean, ms: number): Promise<boolean> {
  const until = Date.now() + ms;
  while (Date.now() < until) {
    if (check()) return true;
    await new Promise((r) => setTimeout(r, 250));
  }
  return check();
}

/** munged refuses a socket whose folders are not searchable by all: use TMPDIR only when every ancestor is. */
function reachableTmp(): string {
  const base = tmpdir();
  for (let d = base; d !== dirname(d); d = dirname(d)) {
    if ((statSync(d).mode & 0o001) === 0) return '/tmp';
  }
  return base;
}

/** Start munged, slurmctld and slurmd for one node; a reason string when this machine cannot. */
export async function startSlurm(): Promise<SlurmCluster | string> {
  if (process.platform !== 'linux') return `Slurm needs Linux (this is ${process.platform})`;
  if (process.getuid?.() !== 0) return 'the single-node Slurm cluster runs its daemons as root, and this test is not root';
  const missing = ensureInstalled();
  if (missing) return missing;

  const dir = mkdtempSync(join(reachableTmp(), 'gapstack-slurm-'));
  chmodSync(dir, 0o755);
  for (const d of ['munge', 'state', 'spool', 'log']) mkdirSync(join(dir, d), { recursive: true });
  const key = join(dir, 'munge', 'munge.key');
  writeFileSync(key, randomBytes(1024), { mode: 0o400 });
  const socket = join(dir, 'munge', 'munge.socket');
  const pids = { munged: join(dir, 'munge', 'munged.pid'), slurmctld: join(dir, 'slurmctld.pid'), slurmd: join(dir, 'slurmd.pid') };
  // Ports away from Slurm's defaults (6817/6818), so a real cluster on the machine is left alone.
  const base = 20000 + Math.floor(Math.random() * 20000);
  const host = hostname().split('.')[0]!;
  const conf = join(dir, 'slurm.conf');
  writeFileSync(
    conf,
    [
      'ClusterName=gapstacktest',
      `SlurmctldHost=${host}(127.0.0.1)`,
      `SlurmctldPort=${base}`,
      `SlurmdPort=${base + 1}`,
      'AuthType=auth/munge',
      `AuthInfo=socket=${socket}`,
      'CredType=cred/munge',
      'SlurmUser=root',
      'SlurmdUser=root',
      `StateSaveLocation=${join(dir, 'state')}`,
      `SlurmdSpoolDir=${join(dir, 'spool')}`,
      `SlurmctldPidFile=${pids.slurmctld}`,
      `SlurmdPidFile=${pids.slurmd}`,
      `SlurmctldLogFile=${join(dir, 'log', 'slurmctld.log')}`,
      `SlurmdLogFile=${join(dir, 'log', 'slurmd.log')}`,
      'ProctrackType=proctrack/linuxproc',
      'TaskPlugin=task/none',
      'SelectType=select/cons_tres',
      'SelectTypeParameters=CR_Core',
      'SchedulerType=sched/backfill',
      'ReturnToService=2',
      'MpiDefault=none',
      'JobAcctGatherType=jobacct_gather/none',
      'AccountingStorageType=accounting_storage/none',
      `NodeName=${host} NodeAddr=127.0.0.1 CPUs=2 RealMemory=1000 State=UNKNOWN`,
      `PartitionName=gapstack Nodes=${host} Default=YES MaxTime=INFINITE State=UP`,
      '',
    ].join('\n'),
  );
  const env: NodeJS.ProcessEnv = { ...process.env, SLURM_CONF: conf };
  const stop = () => {
    const started = [pidIn(pids.slurmd), pidIn(pids.slurmctld), pidIn(pids.munged)];
    run('scontrol', ['shutdown'], env, 15_000);
    for (const pid of started) killPid(pid);
    // Wait (bounded) until they have exited, so none writes into the folder while it goes.
    const until = Date.now() + 15_000;
    while (Date.now() < until && started.some(alive)) spawnSync('sleep', ['0.2']);
    rmSync(dir, { recursive: true, force: true, maxRetries: 5, retryDelay: 200 });
  };
  const fail = (what: string, log?: string): string => {
    const tail = log && existsSync(log) ? readFileSync(log, 'utf8').trim().split('\n').slice(-3).join(' | ') : '';
    stop();
    return `${what}${tail ? `: ${tail}` : ''}`;
  };

  const m = run('munged', [`--socket=${socket}`, `--key-file=${key}`, `--log-file=${join(dir, 'log', 'munged.log')}`, `--pid-file=${pids.munged}`, `--seed-file=${join(dir, 'munge', 'seed')}`]);
  if (m.status !== 0) return fail(`munged did not start (${(m.stderr || '').trim()})`, join(dir, 'log', 'munged.log'));
  const c = run('slurmctld', ['-f', conf], env);
  if (c.status !== 0) return fail(`slurmctld did not start (${(c.stderr || '').trim()})`, join(dir, 'log', 'slurmctld.log'));
  const d = run('slurmd', ['-f', conf], env);
  if (d.status !== 0) return fail(`slurmd did not start (${(d.stderr || '').trim()})`, join(dir, 'log', 'slurmd.log'));
  const idle = await waitFor(() => /idle/.test(run('sinfo', ['-h', '-o', '%T'], env, 10_000).stdout ?? ''), 30_000);
  if (!idle) return fail('the Slurm node did not come up idle within 30 s', join(dir, 'log', 'slurmd.log'));
  return { dir, env, stop };
}

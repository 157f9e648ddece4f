/**
 * The shipped scheduler examples agree with how gapstack reads its share:
 * the Kubernetes indexed Job passes its completion count, the Slurm script
 * calls the sites command and leaves the share to the array's environment.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { kubernetesShard, slurmShard } from '../../src/sites/shard.js';
import { ROOT } from '../helpers/cli.js';

describe('scheduler examples', () => {
  it('the Kubernetes manifest is an indexed Job whose GAPSTACK_SHARD_COUNT equals spec.completions', () => {
    const job = parse(readFileSync(join(ROOT, 'examples/kubernetes/sites-indexed-job.yaml'), 'utf8'));
    expect(job.kind).toBe('Job');
    expect(job.spec.completionMode).toBe('Indexed');
    const c = job.spec.template.spec.containers[0];
    expect(c.command.slice(0, 2)).toEqual(['gapstack', 'sites']);
    const count = c.env.find((e: { name: string }) => e.name === 'GAPSTACK_SHARD_COUNT').value;
    expect(Number(count)).toBe(job.spec.completions);
    // Every pod index maps to its own shard of that count.
    const shards = Array.from({ length: job.spec.completions }, (_, i) => kubernetesShard({ JOB_COMPLETION_INDEX: String(i), GAPSTACK_SHARD_COUNT: count }));
    expect(shards.map((s) => s!.index)).toEqual([0, 1, 2, 3]);
  });

  it('the Slurm script runs `sites` without --shard, and its default array covers every shard once', () => {
    const text = readFileSync(join(ROOT, 'examples/slurm/sites-array.sbatch'), 'utf8');
    expect(text.startsWith('#!/bin/bash\n')).toBe(true);
    expect(text).toMatch(/^\$GAPSTACK sites "\$DESIGN" "\$SITES" --tilt "\$TILT" --azimuth "\$AZIMUTH" --out "\$OUT"$/m);
    expect(text).not.toMatch(/--shard/);
    const m = /^#SBATCH --array=(\d+)-(\d+)$/m.exec(text)!;
    const [lo, hi] = [Number(m[1]), Number(m[2])];
    const shards = [];
    for (let id = lo; id <= hi; id++) shards.push(slurmShard({ SLURM_ARRAY_TASK_ID: String(id), SLURM_ARRAY_TASK_MIN: String(lo), SLURM_ARRAY_TASK_MAX: String(hi), SLURM_ARRAY_TASK_COUNT: String(hi - lo + 1) })!);
    expect(shards.map((s) => s.index)).toEqual(Array.from({ length: hi - lo + 1 }, (_, i) => i));
  });
});

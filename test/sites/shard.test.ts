import { createHash } from 'node:crypto';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/errors.js';
import { inShard, kubernetesShard, parseShard, resolveShard, shardLabel, shardOfKey, siteKeyOfBytes, slurmShard } from '../../src/sites/shard.js';

const key = (s: string) => createHash('sha256').update(s).digest('hex');

describe('--shard K/N', () => {
  it('counts from 1 for people and from 0 inside', () => {
    expect(parseShard('1/3')).toEqual({ index: 0, count: 3 });
    expect(parseShard(' 3/3 ')).toEqual({ index: 2, count: 3 });
    expect(shardLabel(parseShard('2/5'))).toBe('2/5');
  });

  it.each(['0/3', '4/3', '1/0', 'a/3', '1/3/4', '1', '-1/3', '1.5/3', ''])('refuses %j as a user error', (bad) => {
    expect(() => parseShard(bad)).toThrow(UserError);
  });
});

describe('shard from a Slurm job array', () => {
  it('task id relative to the array minimum, count from SLURM_ARRAY_TASK_COUNT', () => {
    expect(slurmShard({ SLURM_ARRAY_TASK_ID: '1', SLURM_ARRAY_TASK_MIN: '1', SLURM_ARRAY_TASK_MAX: '4', SLURM_ARRAY_TASK_COUNT: '4' })).toEqual({ index: 0, count: 4 });
    expect(slurmShard({ SLURM_ARRAY_TASK_ID: '3', SLURM_ARRAY_TASK_COUNT: '4' })).toEqual({ index: 3, count: 4 });
  });

  it('count from min and max when the count is absent (sbatch --array=0-7)', () => {
    expect(slurmShard({ SLURM_ARRAY_TASK_ID: '5', SLURM_ARRAY_TASK_MIN: '0', SLURM_ARRAY_TASK_MAX: '7' })).toEqual({ index: 5, count: 8 });
  });

  it('a stepped array (--array=10-20:5) is numbered along its steps', () => {
    expect(slurmShard({ SLURM_ARRAY_TASK_ID: '15', SLURM_ARRAY_TASK_MIN: '10', SLURM_ARRAY_TASK_MAX: '20', SLURM_ARRAY_TASK_STEP: '5', SLURM_ARRAY_TASK_COUNT: '3' })).toEqual({ index: 1, count: 3 });
  });

  it('refuses an array whose task ids have gaps, and an id without a count', () => {
    expect(() => slurmShard({ SLURM_ARRAY_TASK_ID: '4', SLURM_ARRAY_TASK_MIN: '1', SLURM_ARRAY_TASK_MAX: '9', SLURM_ARRAY_TASK_COUNT: '3' })).toThrow(/gaps/);
    expect(() => slurmShard({ SLURM_ARRAY_TASK_ID: '4' })).toThrow(UserError);
  });

  it('is absent outside a job array', () => {
    expect(slurmShard({ SLURM_JOB_ID: '12' })).toBeNull();
  });
});

describe('shard from a Kubernetes indexed Job', () => {
  it('JOB_COMPLETION_INDEX is 0-based; the count comes from the option or GAPSTACK_SHARD_COUNT', () => {
    expect(kubernetesShard({ JOB_COMPLETION_INDEX: '0' }, 4)).toEqual({ index: 0, count: 4 });
    expect(kubernetesShard({ JOB_COMPLETION_INDEX: '3', GAPSTACK_SHARD_COUNT: '4' })).toEqual({ index: 3, count: 4 });
  });

  it('refuses an index without a count and an index past the count', () => {
    expect(() => kubernetesShard({ JOB_COMPLETION_INDEX: '0' })).toThrow(/--shard-count/);
    expect(() => kubernetesShard({ JOB_COMPLETION_INDEX: '4' }, 4)).toThrow(UserError);
  });
});

describe('resolveShard', () => {
  it('the option wins over the environment', () => {
    expect(resolveShard({ option: '2/2', env: { SLURM_ARRAY_TASK_ID: '0', SLURM_ARRAY_TASK_COUNT: '5' } })).toEqual({ shard: { index: 1, count: 2 }, source: 'option' });
  });

  it('Slurm, then Kubernetes, then the whole batch', () => {
    expect(resolveShard({ env: { SLURM_ARRAY_TASK_ID: '1', SLURM_ARRAY_TASK_COUNT: '2' } }).source).toBe('slurm');
    expect(resolveShard({ env: { JOB_COMPLETION_INDEX: '1' }, shardCount: 2 })).toEqual({ shard: { index: 1, count: 2 }, source: 'kubernetes' });
    expect(resolveShard({ env: {} })).toEqual({ shard: { index: 0, count: 1 }, source: 'none' });
  });

  it('refuses a count without an index, and an option that disagrees with the count', () => {
    expect(() => resolveShard({ env: {}, shardCount: 3 })).toThrow(UserError);
    expect(() => resolveShard({ option: '1/2', shardCount: 3, env: {} })).toThrow(UserError);
  });
});

describe('partition of sites', () => {
  it('a site key is the SHA-256 of the file bytes (FIPS 180-4 test vector "abc")', () => {
    // FIPS 180-4 / NIST example "abc": ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad.
    expect(siteKeyOfBytes(new TextEncoder().encode('abc'))).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('every site lands in exactly one shard, for any count, whatever order the sites come in', () => {
    fc.assert(
      fc.property(fc.uniqueArray(fc.string({ minLength: 1, maxLength: 12 }), { minLength: 1, maxLength: 40 }), fc.integer({ min: 1, max: 9 }), (names, n) => {
        const keys = names.map(key);
        const byShard = (order: string[]) => Array.from({ length: n }, (_, i) => order.filter((k) => inShard(k, { index: i, count: n })).sort());
        const parts = byShard(keys);
        expect(parts.flat().sort()).toEqual([...keys].sort());
        expect(byShard([...keys].reverse())).toEqual(parts);
      }),
      { numRuns: 60 },
    );
  });

  it('spreads sites evenly: 1200 keys over 4 shards, each within 20 % of 300', () => {
    const counts = [0, 0, 0, 0];
    for (let i = 0; i < 1200; i++) counts[shardOfKey(key(`site-${i}`), 4)]!++;
    for (const c of counts) expect(Math.abs(c - 300)).toBeLessThan(60);
  });
});

/**
 * Benchmark of a batch over sites, the 2T fixed-bottom question (top gap free,
 * bottom 1.12 eV, series): cost per site from the difference between two batch
 * sizes (start-up and the once-per-batch AM1.5G search cancel), and the peak
 * memory of each, which must stay flat because rows are streamed. With each
 * site's real light (its weather file's hourly year, as `gapstack sites` runs
 * it) a few seconds per site keep the batches at 4 and 16 sites; the batch
 * machinery alone (the demo ensemble at every site) is measured at 10 and 200.
 * Each batch runs in its own process on one core (the design search of one site
 * is single-threaded), three times: one process's peak moves by a fifth from
 * run to run with the collector's timing (156–195 MiB measured for the same
 * 4-site batch), so each size's time and peak are medians, printed with their
 * range.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { stats } from './whole-command.js';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const CHILD = fileURLToPath(new URL('./sites-child.js', import.meta.url));

/** Per-site cost target [s] on one core, and the allowed growth of peak memory from 10 to 200 sites. */
export const SITE_SECONDS_TARGET = 1.5;
export const MEMORY_GROWTH_LIMIT = 1.25;

/** `count` distinct weather files made from the invented example sites (a numbered comment line makes each file's bytes unique). */
function writeSites(dir: string, count: number): void {
  mkdirSync(dir, { recursive: true });
  const sources = readdirSync(join(ROOT, 'examples/sites')).filter((f) => f.endsWith('.epw')).sort();
  const texts = sources.map((f) => readFileSync(join(ROOT, 'examples/sites', f), 'utf8'));
  for (let i = 0; i < count; i++) {
    const k = i % texts.length;
    const text = texts[k]!.replace(/^COMMENTS 2,/m, `COMMENTS 2,benchmark copy ${i}; `);
    writeFileSync(join(dir, `${sources[k]!.replace(/\.epw$/, '')}-${i}.epw`), text);
  }
}

interface Measured {
  sites: number;
  seconds: number;
  max_rss_mib: number;
}

/** Runs of each batch size. */
const RUNS = 3;

function measureOnce(design: string, sitesDir: string, out: string, light: 'weather' | 'demo'): Measured {
  const r = spawnSync(process.execPath, [CHILD, design, sitesDir, out, light], { encoding: 'utf8', env: { ...process.env, UV_THREADPOOL_SIZE: '1' } });
  if (r.status !== 0) throw new Error(`sites benchmark batch failed: ${r.stderr}`);
  return JSON.parse(r.stdout.trim().split('\n').pop()!) as Measured;
}

/** RUNS batches of one size: median time and peak, and the peaks' range [MiB]. */
function measure(design: string, sitesDir: string, out: string, light: 'weather' | 'demo'): Measured & { rss_range_mib: [number, number] } {
  const runs = Array.from({ length: RUNS }, (_, k) => measureOnce(design, sitesDir, `${out}-${k}`, light));
  const peaks = stats(runs.map((r) => r.max_rss_mib));
  return { sites: runs[0]!.sites, seconds: stats(runs.map((r) => r.seconds)).median, max_rss_mib: peaks.median, rss_range_mib: [peaks.min, peaks.max] };
}

/** Run the sites benchmark; returns rows for the bench's table/JSON and logs a line per result. */
export function benchSites(log: (line: string) => void): Record<string, unknown>[] {
  const dir = mkdtempSync(join(tmpdir(), 'gapstack-bench-sites-'));
  try {
    const design = join(dir, 'design.yaml');
    writeFileSync(design, ['name: benchmark 2T fixed-bottom question', `ensemble: ${JSON.stringify(join(ROOT, 'examples/ensemble-demo/manifest.yaml'))}`, 'temperature: 300', 'subcells:', '  - label: top', '    free: true', '  - label: bottom', '    gap: 1.12', 'wirings: [series]', ''].join('\n'));
    const rows: Record<string, unknown>[] = [];
    const pair = (light: 'weather' | 'demo', few: number, many: number, words: string) => {
      writeSites(join(dir, `${light}-s${few}`), few);
      writeSites(join(dir, `${light}-s${many}`), many);
      const small = measure(design, join(dir, `${light}-s${few}`), join(dir, `${light}-o${few}`), light);
      const large = measure(design, join(dir, `${light}-s${many}`), join(dir, `${light}-o${many}`), light);
      const perSite = (large.seconds - small.seconds) / (large.sites - small.sites);
      const growth = large.max_rss_mib / small.max_rss_mib;
      const range = (m: { rss_range_mib: [number, number] }) => `[${m.rss_range_mib[0].toFixed(0)}–${m.rss_range_mib[1].toFixed(0)}]`;
      log(
        `sites, 2T fixed bottom (each site's light: ${words}): ${perSite.toFixed(3)} s per site (target ≤ ${SITE_SECONDS_TARGET} s); peak memory, median of ${RUNS} runs, ${small.max_rss_mib.toFixed(0)} ${range(small)} MiB at ${small.sites} sites, ${large.max_rss_mib.toFixed(0)} ${range(large)} MiB at ${large.sites} (×${growth.toFixed(2)}, flat if ≤ ×${MEMORY_GROWTH_LIMIT})`,
      );
      rows.push(
        { item: `sites-2T-fixed-bottom-per-site-${light}`, seconds: perSite, target: `≤ ${SITE_SECONDS_TARGET} s`, met: perSite <= SITE_SECONDS_TARGET, light: words },
        { item: `sites-peak-memory-${light}`, sites: [small.sites, large.sites], mib_few: small.max_rss_mib, mib_many: large.max_rss_mib, growth, target: `≤ ×${MEMORY_GROWTH_LIMIT}`, met: growth <= MEMORY_GROWTH_LIMIT },
      );
    };
    pair('weather', 4, 16, "its weather file's hourly year, latitude tilt facing the equator");
    pair('demo', 10, 200, 'the 16-spectrum demo ensemble');
    return rows;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

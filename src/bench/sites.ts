/**
 * Benchmark of a batch over sites, the 2T fixed-bottom question (top gap free,
 * bottom 1.12 eV, series): cost per site from the difference between a 10-site
 * and a 200-site batch (start-up and the once-per-batch AM1.5G search cancel),
 * and the peak memory of each, which must stay flat because rows are streamed.
 * Each batch runs in its own process on one core (the design search of one site
 * is single-threaded).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

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

function measure(design: string, sitesDir: string, out: string): Measured {
  const r = spawnSync(process.execPath, [CHILD, design, sitesDir, out], { encoding: 'utf8', env: { ...process.env, UV_THREADPOOL_SIZE: '1' } });
  if (r.status !== 0) throw new Error(`sites benchmark batch failed: ${r.stderr}`);
  return JSON.parse(r.stdout.trim().split('\n').pop()!) as Measured;
}

/** Run the sites benchmark; returns rows for the bench's table/JSON and logs a line per result. */
export function benchSites(log: (line: string) => void): Record<string, unknown>[] {
  const dir = mkdtempSync(join(tmpdir(), 'gapstack-bench-sites-'));
  try {
    const design = join(dir, 'design.yaml');
    writeFileSync(design, ['name: benchmark 2T fixed-bottom question', `ensemble: ${JSON.stringify(join(ROOT, 'examples/ensemble-demo/manifest.yaml'))}`, 'temperature: 300', 'subcells:', '  - label: top', '    free: true', '  - label: bottom', '    gap: 1.12', 'wirings: [series]', ''].join('\n'));
    writeSites(join(dir, 's10'), 10);
    writeSites(join(dir, 's200'), 200);
    const small = measure(design, join(dir, 's10'), join(dir, 'o10'));
    const large = measure(design, join(dir, 's200'), join(dir, 'o200'));
    const perSite = (large.seconds - small.seconds) / (large.sites - small.sites);
    const growth = large.max_rss_mib / small.max_rss_mib;
    log(`sites, 2T fixed bottom (each site's light: the 16-spectrum demo ensemble): ${perSite.toFixed(3)} s per site (target ≤ ${SITE_SECONDS_TARGET} s); peak memory ${small.max_rss_mib.toFixed(0)} MiB at ${small.sites} sites, ${large.max_rss_mib.toFixed(0)} MiB at ${large.sites} (×${growth.toFixed(2)}, flat if ≤ ×${MEMORY_GROWTH_LIMIT})`);
    return [
      { item: 'sites-2T-fixed-bottom-per-site', seconds: perSite, target: `≤ ${SITE_SECONDS_TARGET} s`, met: perSite <= SITE_SECONDS_TARGET, light: 'demo ensemble (16 spectra)' },
      { item: 'sites-peak-memory', mib_10: small.max_rss_mib, mib_200: large.max_rss_mib, growth, target: `≤ ×${MEMORY_GROWTH_LIMIT}`, met: growth <= MEMORY_GROWTH_LIMIT },
    ];
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

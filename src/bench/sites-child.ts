/**
 * One measured batch for the sites benchmark, in its own process so its peak
 * memory is its own: `node dist/bench/sites-child.js DESIGN SITES_DIR OUT`.
 * Prints {"sites", "seconds", "max_rss_mib"} as JSON.
 */
import { closeSync, openSync, readSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { loadDesign } from '../design/index.js';
import { toolVersion } from '../io/version.js';
import { loadEnsemble } from '../light/ensemble.js';
import { siteQuestion, type SiteLightSource } from '../sites/question.js';
import { listWeatherFiles, runSites } from '../sites/run.js';
import { WHOLE } from '../sites/shard.js';

const [design, sites, out] = process.argv.slice(2);
if (!design || !sites || !out) throw new Error('usage: sites-child.js DESIGN SITES_DIR OUT');

// Each site's light: the demo ensemble (16 weighted spectra), with the site's name and place from its weather file.
const manifest = fileURLToPath(new URL('../../examples/ensemble-demo/manifest.yaml', import.meta.url));
const members = loadEnsemble(manifest, { defaultTempK: 300 }).members;
const light: SiteLightSource = async (path) => {
  const fd = openSync(path, 'r');
  const head = Buffer.alloc(512);
  const n = readSync(fd, head, 0, head.length, 0);
  closeSync(fd);
  const loc = head.subarray(0, n).toString('utf8').split('\n', 1)[0]!.split(',');
  return { name: loc[1]!, latDeg: Number(loc[6]), lonDeg: Number(loc[7]), spectra: members };
};

const t0 = performance.now();
const summary = await runSites({ files: listWeatherFiles([sites]), outDir: out, shard: WHOLE, question: siteQuestion(await loadDesign(design), light), version: toolVersion() });
const seconds = (performance.now() - t0) / 1000;
process.stdout.write(`${JSON.stringify({ sites: summary.shardSites, seconds, max_rss_mib: process.resourceUsage().maxRSS / 1024 })}\n`);

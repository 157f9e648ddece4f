/**
 * Preloaded into a benchmarked Node child (node --import) when /usr/bin/time
 * is missing: at exit, writes the process's peak resident set size [KiB]
 * (process.resourceUsage().maxRSS) to the file named by GAPSTACK_BENCH_PEAK_FILE.
 */
import { writeFileSync } from 'node:fs';

const file = process.env.GAPSTACK_BENCH_PEAK_FILE;
if (file) process.on('exit', () => writeFileSync(file, `${process.resourceUsage().maxRSS}\n`));

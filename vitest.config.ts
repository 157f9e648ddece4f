import { defineConfig } from 'vitest/config';
import { reportDomVite } from './scripts/report-dom.mjs';

// The suite runs on shared 2-core machines next to other work: a CLI call or a
// report can take seconds there, so no test leans on vitest's 5 s default.
export default defineConfig({
  // The report's DOM as every build has it (scripts/report-dom.mjs): d3-node and
  // linkedom go through the test runner's resolver, so their imports are redirected.
  plugins: [reportDomVite],
  test: {
    // Both cores of the reference machine: the default leaves one idle, and the suite then needs about 280 s instead of about 195 s.
    maxWorkers: 2,
    testTimeout: 120_000,
    hookTimeout: 180_000,
    server: { deps: { inline: ['d3-node', 'linkedom'] } },
  },
});

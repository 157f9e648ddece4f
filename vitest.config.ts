import { defineConfig } from 'vitest/config';

// The suite runs on shared 2-core machines next to other work: a CLI call or a
// report can take seconds there, so no test leans on vitest's 5 s default.
export default defineConfig({
  test: {
    testTimeout: 120_000,
    hookTimeout: 180_000,
  },
});

import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['packages/*/test/**/*.test.ts', 'test/**/*.test.ts'],
    testTimeout: 60_000,
    hookTimeout: 60_000,
    // Worker-pool tests start real threads; keep files from competing for the 2 cores.
    fileParallelism: false,
    // Every fast-check property is seeded (each names its own seed; this is the default).
    setupFiles: ['test/support/fastCheckSeed.ts'],
  },
});

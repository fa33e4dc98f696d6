import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['packages/*/test/**/*.test.ts', 'test/**/*.test.ts'],
    // The end-to-end tests spawn packages/cli/bin/twinfet.js, which runs the bundle: made first.
    globalSetup: ['test/support/bundle.ts'],
    // Hang guards, not speed checks: on this shared 2-core machine a full run has taken 6-7x
    // its unloaded time (single tests up to 32 s), so the guards are far above that.
    testTimeout: 300_000,
    hookTimeout: 300_000,
    // Worker-pool tests start real threads; keep files from competing for the 2 cores.
    fileParallelism: false,
    // Every fast-check property is seeded (each names its own seed; this is the default).
    setupFiles: ['test/support/fastCheckSeed.ts'],
  },
});

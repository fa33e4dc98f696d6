import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['packages/*/test/**/*.test.ts', 'test/**/*.test.ts'],
    // The end-to-end tests spawn packages/cli/bin/twinfet.js, which runs the bundle: made first.
    globalSetup: ['test/support/bundle.ts'],
    testTimeout: 60_000,
    hookTimeout: 60_000,
    // Worker-pool tests start real threads; keep files from competing for the 2 cores.
    fileParallelism: false,
  },
});

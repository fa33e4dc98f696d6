import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

/**
 * The vitest configuration `pnpm mutate` (StrykerJS, stryker.config.mjs) runs: only the test
 * files that check the mutated model and statistics files, and the package names resolved to
 * the sources, so that tests importing '@twinfet/core' see the mutated code rather than dist.
 * Everything runs in this thread (no worker pool): mutants are switched on per test in-process.
 */
const src = (path: string): string => fileURLToPath(new URL(path, import.meta.url));

export default defineConfig({
  resolve: {
    alias: {
      '@twinfet/core': src('./packages/core/src/index.ts'),
      '@twinfet/montecarlo': src('./packages/montecarlo/src/index.ts'),
    },
  },
  test: {
    include: [
      'packages/core/test/ekv.test.ts',
      'packages/core/test/topologies.test.ts',
      'packages/core/test/stageReference.test.ts',
      'packages/core/test/deviceModel.test.ts',
      'packages/montecarlo/test/ziggurat.test.ts',
      'packages/montecarlo/test/clopperPearson.test.ts',
      'packages/montecarlo/test/wilson.test.ts',
      'packages/montecarlo/test/sigmaInterval.test.ts',
      'packages/montecarlo/test/moments.test.ts',
      'packages/montecarlo/test/reportIntervals.test.ts',
      'packages/montecarlo/test/correlation.test.ts',
    ],
    // Instrumented code runs tens of times slower: the 2^27 normal deviates of the ziggurat tail
    // counts take minutes, not seconds.
    testTimeout: 1_800_000,
    hookTimeout: 1_800_000,
    setupFiles: ['test/support/fastCheckSeed.ts'],
  },
});

import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

/**
 * The vitest configuration `pnpm mutate` (StrykerJS, stryker.config.mjs) runs: only the test
 * files that check the mutated model and statistics files, and the package names resolved to
 * the sources, so that tests importing '@twinfet/core' see the mutated code rather than dist.
 * Everything runs in this thread (no worker pool): mutants are switched on per test in-process.
 */
const src = (path: string): string => fileURLToPath(new URL(path, import.meta.url));

const CORE = [
  'packages/core/test/ekv.test.ts',
  'packages/core/test/topologies.test.ts',
  'packages/core/test/stageReference.test.ts',
  'packages/core/test/deviceModel.test.ts',
  // Each stage module's own tests: without them its mutants count as uncovered.
  'packages/core/test/resistor.test.ts',
  'packages/core/test/currentMirror.test.ts',
  'packages/core/test/folded.test.ts',
  'packages/core/test/foldedEdges.test.ts',
  'packages/core/test/selector.test.ts',
  // The near-balance EKV difference, the stage figures against the committed fixture, the
  // library edges and the operating conditions also check ekv.ts and the stage modules.
  'packages/core/test/ekvNear.test.ts',
  'packages/core/test/ekvNearCut.test.ts',
  'packages/core/test/ekvStrongDifference.test.ts',
  'packages/core/test/figureReference.test.ts',
  'packages/core/test/libraryEdge.test.ts',
  'packages/core/test/conditions.test.ts',
  'packages/core/test/elementGuards.test.ts',
  'packages/core/test/simpleFarDraws.test.ts',
  'packages/core/test/resistorEdges.test.ts',
  'packages/core/test/currentMirrorEdges.test.ts',
  'packages/core/test/stageWarnings.test.ts',
  'packages/core/test/mirrorRegions.test.ts',
  'packages/core/test/stageDefinitions.test.ts',
  'packages/core/test/selectorEdges.test.ts',
  'packages/core/test/mirrorLoadForms.test.ts',
  'packages/core/test/mirrorWork.test.ts',
  'packages/core/test/foldedWork.test.ts',
  'packages/core/test/selectorWork.test.ts',
  'packages/core/test/selectorReference.test.ts',
  'packages/core/test/mirrorSolve.test.ts',
];
// The deviate-for-deviate reference first: it fails in milliseconds where the statistical
// tests need millions of draws.
const RANDOM = ['packages/montecarlo/test/zigguratReference.test.ts', 'packages/montecarlo/test/ziggurat.test.ts', 'packages/montecarlo/test/zigguratSqueeze.test.ts'];
const STATS = [
  'packages/montecarlo/test/clopperPearson.test.ts',
  'packages/montecarlo/test/wilson.test.ts',
  'packages/montecarlo/test/sigmaInterval.test.ts',
  'packages/montecarlo/test/moments.test.ts',
  'packages/montecarlo/test/reportIntervals.test.ts',
  'packages/montecarlo/test/binomialEdges.test.ts',
  'packages/montecarlo/test/clopperPearsonWork.test.ts',
  'packages/montecarlo/test/statsEdges.test.ts',
  // assembleRunReport in this thread (reportIntervals runs the chunks on workers, which load dist).
  'packages/montecarlo/test/runReportAssembly.test.ts',
];
/** Test files per group of mutated sources (see stryker.config.mjs). */
const MUTATE_TESTS: Record<string, string[]> = {
  core: CORE,
  random: RANDOM,
  stats: STATS,
  all: [...CORE, ...RANDOM, ...STATS, 'packages/montecarlo/test/correlation.test.ts'],
};

export default defineConfig({
  resolve: {
    alias: {
      '@twinfet/core': src('./packages/core/src/index.ts'),
      '@twinfet/montecarlo': src('./packages/montecarlo/src/index.ts'),
    },
  },
  test: {
    // MUTATE_TESTS picks the test files of one group of mutated sources (a per-group run is far
    // faster than one over everything on 2 cores); unset, every file below runs.
    include: MUTATE_TESTS[process.env['MUTATE_TESTS'] ?? 'all'] ?? MUTATE_TESTS['all']!,
    // Instrumented code runs tens of times slower: the 2^27 normal deviates of the ziggurat tail
    // counts take minutes, not seconds.
    testTimeout: 1_800_000,
    hookTimeout: 1_800_000,
    setupFiles: ['test/support/fastCheckSeed.ts'],
  },
});

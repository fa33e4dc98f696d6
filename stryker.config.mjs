/**
 * Mutation testing (`npx --yes pnpm@12.4.2 mutate`): StrykerJS changes the model and statistics
 * sources one small edit at a time and reruns the tests that cover each edit; a mutant that no
 * test notices points at a missing reference check. Slow (tens of minutes on 2 cores), so it is
 * not part of .ci/run. Reports: reports/mutation/ (HTML and JSON, not committed).
 * @type {import('@stryker-mutator/api/core').PartialStrykerOptions}
 */
export default {
  testRunner: 'vitest',
  vitest: { configFile: 'vitest.mutate.config.ts', related: false },
  plugins: ['@stryker-mutator/vitest-runner'],
  coverageAnalysis: 'perTest',
  mutate: [
    'packages/core/src/pelgrom.ts',
    'packages/core/src/ekv.ts',
    'packages/core/src/elements.ts',
    'packages/core/src/stages/simple.ts',
    'packages/core/src/stages/mirror.ts',
    'packages/core/src/stages/resistor.ts',
    'packages/core/src/stages/folded.ts',
    'packages/core/src/stages/currentMirror.ts',
    'packages/core/src/stages/selector.ts',
    'packages/montecarlo/src/random/ziggurat.ts',
    'packages/montecarlo/src/stats/clopperPearson.ts',
    'packages/montecarlo/src/stats/wilson.ts',
    'packages/montecarlo/src/stats/sigmaInterval.ts',
    'packages/montecarlo/src/stats/moments.ts',
    // The report's intervals: mean, sigma, yield and chip (the lines that compute them).
    'packages/montecarlo/src/analyses/runReport.ts:160-170',
    'packages/montecarlo/src/analyses/runReport.ts:210-230',
  ],
  concurrency: 2,
  // A mutant that loops forever is cut off this long after the covering tests' normal time.
  timeoutMS: 20_000,
  reporters: ['clear-text', 'progress', 'html', 'json'],
  htmlReporter: { fileName: 'reports/mutation/mutation.html' },
  jsonReporter: { fileName: 'reports/mutation/mutation.json' },
  tempDirName: '.stryker-tmp',
  cleanTempDir: 'always',
  thresholds: { high: 90, low: 80, break: null },
};

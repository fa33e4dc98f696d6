// Public API of @twinfet/montecarlo: a named list, layer by layer. Test helpers (the KS test)
// and the test-only fault hook are not part of it.

// random/: seeded streams and standard normals
export { DEFAULT_SEED, seedText } from './random/seed.js';
export { chunkRng, type ChunkRng, type StreamKind } from './random/stream.js';
export { fillStandardNormals, standardNormal } from './random/ziggurat.js';

// stats/: estimators and intervals
export { clopperPearson, oneSidedUpper } from './stats/clopperPearson.js';
export { wilson } from './stats/wilson.js';
export { sigmaInterval } from './stats/sigmaInterval.js';
export { addSamples, emptyMoments, mergeMoments, stdDev, variance, type Moments } from './stats/moments.js';
export { addPairs, correlation, emptyCoMoments, mergeCoMoments, type CoMoments } from './stats/comoments.js';
export { createHistogram, exactQuantile, quantileFromHistogram, type Histogram } from './stats/histogram.js';
export {
  logNormalUpperTail,
  normalCdf,
  normalPdf,
  normalQuantile,
  normalUpperTail,
  sigmaLevel,
  sigmaLevelOfTails,
  twoSidedTail,
} from './stats/normal.js';
export { allowedFailure, chipFailure, chipYield, chipYieldFromFailure } from './stats/yield.js';

// engine/: chunks, executors, schedule
export { CHUNK_SIZE, RunAborted } from './engine/schedule.js';
export { ChunkError, createExecutor, defaultWorkers, type Executor } from './engine/pool.js';

// analyses/
export { linearisedSummary, type LinearisedSummary } from './analyses/linearisedSummary.js';
export { findDesignPoint, type DesignPoint } from './analyses/designPoint.js';
export {
  simulate,
  simulateWithSamples,
  QUANTILE_LEVELS,
  RUN_LIMITS,
  KEEP_LIMIT,
  type IntervalMethod,
  type QuantileValue,
  type RunOutcome,
  type RunReport,
  type SimulateOptions,
} from './analyses/simulate.js';
export {
  estimateHighSigma,
  type HighSigmaOptions,
  type HighSigmaReport,
  type ReportedDesignPoint,
} from './analyses/highSigma.js';
export { sweepDesigns, SWEEP_SAMPLES, type SweepOptions, type SweepPointResult } from './analyses/sweep.js';
export { linearisedDriftSigma, type ConditionResult, type DriftReport } from './analyses/conditionRun.js';
export { largestSigma, limitingStage, type LimitingStage } from './analyses/worstCondition.js';

// sizing/
export { SIZE_VARIATIONS, type SizeVary } from './sizing/resize.js';
export {
  sizeDesign,
  type Confirmation,
  type SizedPoint,
  type SizeOptions,
  type SizeReport,
  type SizeTarget,
} from './sizing/size.js';

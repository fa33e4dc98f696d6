// Public API of @twinfet/montecarlo: a named list, layer by layer. Test helpers (the KS test)
// and the test-only fault hook are not part of it.

// random/: seeded streams and standard normals
export { DEFAULT_SEED, seedText } from './random/seed.js';
export { chunkRng, type ChunkRng, type StreamKind } from './random/stream.js';
export { fillStandardNormals, standardNormal } from './random/ziggurat.js';

// stats/: estimators and intervals
export { clopperPearson, oneSidedUpper } from './stats/clopperPearson.js';
export { wilson } from './stats/wilson.js';
export { sigmaIntervalBonett, sigmaIntervalChiSquare } from './stats/sigmaInterval.js';
export { addSamples, emptyMoments, kurtosis, mergeMoments, stdDev, variance, type Moments } from './stats/moments.js';
export { addPairs, correlation, emptyCoMoments, mergeCoMoments, type CoMoments } from './stats/comoments.js';
export { createHistogram, exactQuantile, quantileFromHistogram, type Histogram } from './stats/histogram.js';
export { selectQuantiles, withoutNaN } from './stats/selectQuantiles.js';
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
export { correctSelection, lnWrongSelection, maxOfNormals, selectionSeparation, wrongSelection } from './stats/bechhofer.js';

// engine/: chunks, executors, schedule
export { CHUNK_SIZE, chunkCount, RunAborted } from './engine/schedule.js';
export { ChunkError, createExecutor, defaultWorkers, EAGER_POOL_SAMPLES, POOL_WORTH_MS, type Executor } from './engine/pool.js';

// analyses/
export {
  linearisedEstimate,
  linearisedSummary,
  SELECTION_CHIP_YIELD,
  SELECTION_PROBABILITIES,
  type GaussianSummary,
  type LinearisedSummary,
  type SelectionSummary,
} from './analyses/linearisedSummary.js';
export { figureLaw, linearisedFigureSigma, type FigureLaw } from './analyses/linearisedLaw.js';
export { RESPONSE_LEVELS, RESPONSE_SAMPLES, responseAt, responseEnvelope, type ResponseEnvelope, type ResponseSummary } from './analyses/response.js';
export { findDesignPoint, type DesignPoint } from './analyses/designPoint.js';
export {
  simulate,
  simulateWithSamples,
  QUANTILE_LEVELS,
  RUN_LIMITS,
  DEFAULT_SAMPLES,
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
export { areaSplit, type AreaSplit } from './sizing/areaSplit.js';
export {
  sizeDesign,
  type Confirmation,
  type SizedPoint,
  type SizeOptions,
  type SizeReport,
  type SizeTarget,
} from './sizing/size.js';

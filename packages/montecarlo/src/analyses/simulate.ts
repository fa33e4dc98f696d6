import { compileConditions, compileStage, InputError, specLimit, type Design, type FigureDefinition, type RandomVariable } from '@twinfet/core';
import { linearisedSummary } from './linearisedSummary.js';
import { createHistogram, mergeHistograms, type Histogram } from '../stats/histogram.js';
import type { InjectedFault, MonteCarloResult, MonteCarloTask } from '../engine/messages.js';
import { emptyMoments, mergeMoments, type Moments } from '../stats/moments.js';
import { createExecutor, defaultWorkers, type Executor } from '../engine/pool.js';
import { CHUNK_SIZE, chunkCount, chunkLength, runChunks, RunAborted } from '../engine/schedule.js';
import { seedText } from '../random/seed.js';
import { estimateHighSigma, type HighSigmaReport } from './highSigma.js';
import { assembleRunReport, type IntervalMethod, type RunReport } from './runReport.js';
import { addConditionChunk, conditionsOutcome, conditionsPlan, driftPairFor, emptyConditionTotals } from './conditionRun.js';
import { responseAt } from './response.js';

export { QUANTILE_LEVELS, AGREEMENT_Z, FEW_FAILURES, type IntervalMethod, type QuantileValue, type RunReport } from './runReport.js';
/** Samples of a run when none are asked for. */
export const DEFAULT_SAMPLES = 100_000;
/** Offsets are kept (exact quantiles) up to this many samples unless told otherwise. */
export const KEEP_LIMIT = 2_000_000;
/** Histogram bins over +-max(10 sigma_lin, 1.2 spec). */
export const HISTOGRAM_BINS = 2000;
/** The histogram spans this many linearised sigmas each side (at least 1.2 spec). */
export const HISTOGRAM_SIGMAS = 10;

/**
 * Limits of the run options, checked here and quoted by the command line (one place for each
 * rule; this project's limits, no source): sample counts, worker threads, and how many samples
 * may keep every draw (memory: dimension x 8 bytes each).
 */
export const RUN_LIMITS = {
  samples: [2, 1e12],
  workers: [1, 256],
  keptDraws: 2e7,
} as const;


/** Options of `simulate`. */
export interface SimulateOptions {
  /** Samples to draw (default 100000). */
  readonly samples?: number;
  /** Seed (default "1", printed with the report so a run can be repeated). */
  readonly seed?: string | number;
  /** Worker threads (default: the machine's parallelism; 1 runs in this thread). */
  readonly workers?: number;
  /** An executor to reuse across runs (the caller closes it). */
  readonly executor?: Executor;
  /** Cancels the run; the promise rejects with an AbortError (or returns partial, below). */
  readonly signal?: AbortSignal;
  /** On cancellation, return the statistics of the finished chunks marked `partial`. */
  readonly partialOnAbort?: boolean;
  readonly onProgress?: (done: number, total: number) => void;
  /** Confidence level of every interval (default 0.95). */
  readonly confidence?: number;
  /** Yield interval method (default Clopper-Pearson). */
  readonly interval?: IntervalMethod;
  /** |Vos| limit, volts (default: the design's spec). */
  readonly spec?: number;
  /** Keep every offset (exact quantiles): default when samples <= 2e6. */
  readonly keepOffsets?: boolean;
  /** Keep every sample's draws (for CSV output). */
  readonly keepDraws?: boolean;
  /** Add the importance-sampling estimate of the failure probability. */
  readonly importance?: boolean | { readonly relError?: number; readonly samples?: number };
  /** Test-only fault injection in one chunk (honoured in workers with TWINFET_TEST_FAULTS=1). */
  readonly fault?: { readonly chunk: number; readonly fault: InjectedFault };
  /**
   * The two conditions (names) to take the per-sample drift between (default: the coldest and
   * the hottest of the conditions that differ only in temperature, or none).
   */
  readonly drift?: readonly [string, string];
}

/** A run's report together with the kept samples. */
export interface RunOutcome {
  readonly report: RunReport;
  /** Every sample's offset (NaN where a solve failed), when kept. */
  readonly offsets?: Float64Array;
  /** Every sample's standard-normal draws, `dimension` per sample, when kept. */
  readonly draws?: Float64Array;
  readonly dimension: number;
  /** The stage's random variables, in sample order. */
  readonly variables: readonly RandomVariable[];
  /** What each sample's figure is (name, unit, sidedness). */
  readonly figure: FigureDefinition;
  /** With conditions and kept draws: every sample's figure at each condition (NaN where a solve failed). */
  readonly conditionFigures?: readonly Float64Array[];
  /** With a drift taken: the histogram of the per-sample drift (the figure's unit per kelvin). */
  readonly driftHistogram?: Histogram;
}

function checkOptions(o: SimulateOptions): void {
  const [sLo, sHi] = RUN_LIMITS.samples;
  if (o.samples !== undefined && !(Number.isInteger(o.samples) && o.samples >= sLo && o.samples <= sHi)) {
    throw new InputError('samples', `expected a whole number from ${sLo} to 1e12, got ${String(o.samples)}`);
  }
  const [wLo, wHi] = RUN_LIMITS.workers;
  if (o.workers !== undefined && !(Number.isInteger(o.workers) && o.workers >= wLo && o.workers <= wHi)) {
    throw new InputError('workers', `expected a whole number from ${wLo} to ${wHi}, got ${String(o.workers)}`);
  }
  if (o.confidence !== undefined && !(o.confidence > 0 && o.confidence < 1)) {
    throw new InputError('confidence', `expected a level strictly between 0 and 1 such as 0.95, got ${String(o.confidence)}`);
  }
  if (o.spec !== undefined && !(Number.isFinite(o.spec) && o.spec > 0)) {
    throw new InputError('spec', `expected a positive offset limit in volts, got ${String(o.spec)}`);
  }
  if (o.interval !== undefined && o.interval !== 'clopper-pearson' && o.interval !== 'wilson') {
    throw new InputError('interval', `expected "clopper-pearson" or "wilson", got ${JSON.stringify(o.interval)}`);
  }
  if (o.drift !== undefined && !(Array.isArray(o.drift) && o.drift.length === 2 && o.drift.every((x) => typeof x === 'string' && x !== ''))) {
    throw new InputError('drift', `expected the names of two conditions, such as ["cold", "hot"], got ${JSON.stringify(o.drift)}`);
  }
  if (o.keepDraws === true && o.samples !== undefined && o.samples > RUN_LIMITS.keptDraws) {
    throw new InputError('keepDraws', `keeping every draw of ${o.samples} samples needs too much memory; use at most 2e7 samples`);
  }
}

/**
 * Monte Carlo of the exact offset: the offset distribution, its sigma with a chi-square
 * interval, quantiles, the instance and chip yield with intervals, and the linearised picture
 * beside it. Chunked and seeded: the same seed and sample count give the same numbers with
 * any number of workers.
 * @example
 * const report = await simulate(design, { samples: 1e6, seed: 7 });
 * report.offset.sigma // volts
 */
export async function simulate(design: Design, options: SimulateOptions = {}): Promise<RunReport> {
  return (await simulateWithSamples(design, options)).report;
}

/** `simulate`, also returning the kept offsets and draws. */
export async function simulateWithSamples(design: Design, options: SimulateOptions = {}): Promise<RunOutcome> {
  checkOptions(options);
  const started = performance.now();
  const stage = compileStage(design);
  const samples = options.samples ?? DEFAULT_SAMPLES;
  const seed = seedText(options.seed);
  const confidence = options.confidence ?? 0.95;
  const method = options.interval ?? 'clopper-pearson';
  const spec = options.spec ?? specLimit(stage.design);
  const fig = stage.definition.figure;
  const keepOffsets = options.keepOffsets ?? (samples <= KEEP_LIMIT || options.keepDraws === true);
  const keepDraws = options.keepDraws ?? false;
  const analytic = linearisedSummary(stage, spec);
  const range = Math.max(HISTOGRAM_SIGMAS * analytic.sigma, 1.2 * spec);
  const histogramSpec = { lo: -range, hi: range, bins: HISTOGRAM_BINS };
  // Operating conditions: every sample also goes through each condition's stage (same draws).
  const atConditions = compileConditions(design);
  const pair = atConditions.length > 0 || options.drift !== undefined ? driftPairFor(stage.design, options.drift) : null;
  if (keepDraws && atConditions.length > 0 && samples * (1 + atConditions.length) > RUN_LIMITS.keptDraws) {
    throw new InputError('keepDraws', `keeping every figure of ${samples} samples at ${atConditions.length} conditions needs too much memory; use at most ${Math.floor(RUN_LIMITS.keptDraws / (1 + atConditions.length))} samples`);
  }
  const plan = atConditions.length === 0 ? undefined : conditionsPlan(atConditions, pair, keepOffsets, keepDraws);
  const totals = plan === undefined ? undefined : emptyConditionTotals(atConditions.length, plan, samples);

  const chunks = chunkCount(samples);
  const tasks = {
    length: chunks,
    samples,
    at: (chunk: number): MonteCarloTask => ({
      kind: 'montecarlo',
      design,
      seed,
      chunk,
      count: chunkLength(samples, chunk),
      spec,
      histogram: histogramSpec,
      keepOffsets,
      keepDraws,
      ...(plan === undefined ? {} : { conditions: plan }),
      ...(options.fault !== undefined && options.fault.chunk === chunk ? { fault: options.fault.fault } : {}),
    }),
  };
  const workers = Math.min(options.workers ?? defaultWorkers(), chunks);
  const executor = options.executor ?? createExecutor(workers, { chunks });

  let moments: Moments = emptyMoments();
  let histogram = createHistogram(histogramSpec.lo, histogramSpec.hi, histogramSpec.bins);
  let failuresHigh = 0;
  let failuresLow = 0;
  let nonConverged = 0;
  let done = 0;
  const offsets = keepOffsets ? new Float64Array(samples) : undefined;
  const draws = keepDraws ? new Float64Array(samples * stage.dimension) : undefined;
  const consume = (r: MonteCarloResult): void => {
    moments = mergeMoments(moments, r.moments);
    histogram = mergeHistograms(histogram, r.histogram);
    failuresHigh += r.failuresHigh;
    failuresLow += r.failuresLow;
    nonConverged += r.nonConverged;
    if (offsets !== undefined && r.offsets !== undefined) offsets.set(r.offsets, r.chunk * CHUNK_SIZE);
    if (draws !== undefined && r.draws !== undefined) draws.set(r.draws, r.chunk * CHUNK_SIZE * stage.dimension);
    if (totals !== undefined && r.conditions !== undefined) addConditionChunk(totals, r.conditions, r.chunk * CHUNK_SIZE);
    done += r.count;
  };
  let partial = false;
  let importance: HighSigmaReport | undefined;
  try {
    await runChunks(executor, tasks, consume, {
      signal: options.signal,
      onProgress: options.onProgress,
    });
    if (options.importance !== undefined && options.importance !== false) {
      const io = options.importance === true ? {} : options.importance;
      importance = await estimateHighSigma(design, {
        spec,
        seed,
        confidence,
        executor,
        ...(io.relError === undefined ? {} : { relError: io.relError }),
        ...(io.samples === undefined ? {} : { samples: io.samples }),
        ...(options.signal === undefined ? {} : { signal: options.signal }),
      });
    }
  } catch (e) {
    // Cancelled with nothing finished: there is no partial answer to give.
    if (!(e instanceof RunAborted) || options.partialOnAbort !== true || moments.count < 2) throw e;
    partial = true;
  } finally {
    if (options.executor === undefined) await executor.close();
  }
  if (moments.count < 2) {
    throw new InputError('design', `only ${moments.count} of ${samples} offsets could be evaluated (the balance solve failed); check the bias and sizes`);
  }

  const report = assembleRunReport(stage, {
    samples,
    seed,
    workers: executor.threads === 0 ? 1 : executor.threads,
    partial,
    spec,
    confidence,
    method,
    analytic,
    range,
    moments,
    histogram,
    failuresHigh,
    failuresLow,
    nonConverged,
    kept: offsets === undefined ? undefined : offsets.subarray(0, done),
    importance,
    response: partial ? undefined : responseAt(stage, spec, seed),
    started,
    ...(totals === undefined
      ? {}
      : {
          atConditions: conditionsOutcome(stage.design, atConditions, totals, pair, spec, confidence, method, done),
          conditionStages: atConditions,
        }),
  });
  return {
    report,
    ...(offsets === undefined ? {} : { offsets: partial ? offsets.subarray(0, done) : offsets }),
    ...(draws === undefined ? {} : { draws: partial ? draws.subarray(0, done * stage.dimension) : draws }),
    dimension: stage.dimension,
    variables: stage.variables,
    figure: stage.definition.figure,
    ...(totals === undefined || !keepDraws
      ? {}
      : { conditionFigures: totals.per.map((p) => (partial ? p.figures!.subarray(0, done) : p.figures!)) }),
    ...(totals?.drift === undefined ? {} : { driftHistogram: totals.drift.histogram }),
  };
}

import { compileStage, InputError, specLimit, type Design, type FigureDefinition, type RandomVariable } from '@twinfet/core';
import { linearisedSummary, type LinearisedSummary } from './linearisedSummary.js';
import { clopperPearson } from '../stats/clopperPearson.js';
import { binWidth, createHistogram, exactQuantile, mergeHistograms, quantileFromHistogram, type Histogram } from '../stats/histogram.js';
import type { InjectedFault, MonteCarloResult, MonteCarloTask } from '../engine/messages.js';
import { emptyMoments, mergeMoments, type Moments } from '../stats/moments.js';
import { normalQuantile } from '../stats/normal.js';
import { createExecutor, defaultWorkers, type Executor } from '../engine/pool.js';
import { CHUNK_SIZE, chunkCount, chunkLength, runChunks, RunAborted } from '../engine/schedule.js';
import { seedText } from '../random/seed.js';
import { sigmaInterval } from '../stats/sigmaInterval.js';
import { estimateHighSigma, type HighSigmaReport } from './highSigma.js';
import { wilson } from '../stats/wilson.js';
import { responseAt, type ResponseSummary } from './response.js';

/** Quantile levels reported for the signed offset and for |Vos|. */
export const QUANTILE_LEVELS = [0.001, 0.01, 0.5, 0.99, 0.999] as const;
/** Offsets are kept (exact quantiles) up to this many samples unless told otherwise. */
export const KEEP_LIMIT = 2_000_000;
/** Histogram bins over +-max(10 sigma_lin, 1.2 spec). */
export const HISTOGRAM_BINS = 2000;
/** The histogram spans this many linearised sigmas each side (at least 1.2 spec). */
export const HISTOGRAM_SIGMAS = 10;
/** A Monte Carlo sigma is flagged when it is this many standard errors from the linearised one. */
export const AGREEMENT_Z = 4;
/** Fewer failures than this make the yield estimate sample-limited. */
export const FEW_FAILURES = 10;

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

/** Interval method for the yield. */
export type IntervalMethod = 'clopper-pearson' | 'wilson';

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
}

/** A quantile of the offset, volts (null when it lies beyond the histogram's range). */
export interface QuantileValue {
  readonly p: number;
  readonly value: number | null;
}

/** The report of a Monte Carlo run. All voltages in volts. */
export interface RunReport {
  readonly samples: number;
  /** Samples whose offset was evaluated (samples minus non-converged, or fewer when partial). */
  readonly evaluated: number;
  readonly seed: string;
  readonly workers: number;
  readonly chunkSize: number;
  /** True when the run was cancelled and these are the statistics of the finished chunks. */
  readonly partial: boolean;
  readonly design: { readonly name: string; readonly topology: string };
  readonly offset: {
    readonly mean: number;
    readonly meanInterval: readonly [number, number];
    readonly sigma: number;
    readonly sigmaInterval: readonly [number, number];
    readonly min: number;
    readonly max: number;
    readonly quantileMethod: 'exact' | 'histogram';
    readonly quantiles: { readonly signed: readonly QuantileValue[]; readonly absolute: readonly QuantileValue[] };
  };
  readonly histogram: { readonly lo: number; readonly hi: number; readonly binWidth: number; readonly counts: readonly number[]; readonly underflow: number; readonly overflow: number };
  readonly analytic: LinearisedSummary & {
    readonly agreement: { readonly relativeDifference: number; readonly standardErrors: number; readonly consistent: boolean };
    /**
     * For a law other than the Gaussian (a selector's Bechhofer form): the Monte Carlo yield
     * against the law's, in binomial standard errors sqrt(P (1 - P) / N) of the law's P.
     */
    readonly yieldAgreement?: { readonly difference: number; readonly standardErrors: number; readonly consistent: boolean };
  };
  readonly yield: {
    readonly spec: number;
    readonly failures: number;
    readonly failuresHigh: number;
    readonly failuresLow: number;
    readonly estimate: number;
    readonly interval: readonly [number, number];
    readonly confidence: number;
    readonly method: IntervalMethod;
    readonly failure: { readonly estimate: number; readonly interval: readonly [number, number] };
    /** Fewer than 10 failures: the estimate is limited by the sample count. */
    readonly limitedBySamples: boolean;
  };
  readonly chip: { readonly instances: number; readonly estimate: number; readonly interval: readonly [number, number] };
  readonly importance?: HighSigmaReport;
  /** The stage's transfer curve at the spec (a selector's winner's share), nominal and spread. */
  readonly response?: ResponseSummary;
  readonly nonConverged: number;
  readonly seconds: number;
  readonly samplesPerSecond: number;
  readonly warnings: readonly string[];
  /**
   * What the statistics above describe: the stage's figure (`offset` in volts for the
   * differential stages). The `offset` block holds that figure's statistics whatever its name.
   */
  readonly figure: { readonly name: string; readonly label: string; readonly symbol: string; readonly unit: string; readonly sided: 'two' | 'one' };
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
  if (o.keepDraws === true && o.samples !== undefined && o.samples > RUN_LIMITS.keptDraws) {
    throw new InputError('keepDraws', `keeping every draw of ${o.samples} samples needs too much memory; use at most 2e7 samples`);
  }
}

function quantiles(sorted: Float64Array): QuantileValue[] {
  return QUANTILE_LEVELS.map((p) => ({ p, value: exactQuantile(sorted, p) }));
}

function histogramQuantiles(h: Histogram): QuantileValue[] {
  return QUANTILE_LEVELS.map((p) => {
    const v = quantileFromHistogram(h, p);
    return { p, value: Number.isFinite(v) ? v : null };
  });
}

/** |Vos| histogram folded from a signed one that is symmetric about 0. */
function folded(h: Histogram): Histogram {
  const bins = h.counts.length;
  const half = bins / 2;
  const out = createHistogram(0, h.hi, half);
  for (let j = 0; j < half; j++) out.counts[j] = h.counts[half + j]! + h.counts[half - 1 - j]!;
  out.overflow = h.overflow + h.underflow;
  return out;
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
  const samples = options.samples ?? 100_000;
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
      ...(options.fault !== undefined && options.fault.chunk === chunk ? { fault: options.fault.fault } : {}),
    }),
  };
  const workers = Math.min(options.workers ?? defaultWorkers(), chunks);
  const executor = options.executor ?? createExecutor(workers);

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
    done += r.count;
  };
  let partial = false;
  let importance: HighSigmaReport | undefined;
  try {
    await runChunks(executor, tasks, (r) => consume(r as MonteCarloResult), {
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

  const n = moments.count;
  const sigma = Math.sqrt(moments.m2 / (n - 1));
  const z = normalQuantile(1 - (1 - confidence) / 2);
  const failures = failuresHigh + failuresLow;
  const failInterval = method === 'wilson' ? wilson(failures, n, confidence) : clopperPearson(failures, n, confidence);
  const y = 1 - failures / n;
  const yLo = 1 - failInterval[1];
  const yHi = 1 - failInterval[0];
  const m = stage.design.spec.instances;
  const chip = (v: number): number => Math.exp(m * Math.log(v));

  let quantileMethod: 'exact' | 'histogram' = 'histogram';
  let signed: QuantileValue[];
  let absolute: QuantileValue[];
  if (offsets !== undefined) {
    quantileMethod = 'exact';
    const kept = offsets.subarray(0, done).filter((x) => x === x);
    const sorted = Float64Array.from(kept).sort();
    signed = quantiles(sorted);
    const abs = kept.map(Math.abs).sort();
    absolute = quantiles(abs);
  } else {
    signed = histogramQuantiles(histogram);
    absolute = histogramQuantiles(folded(histogram));
  }

  const se = sigma / Math.sqrt(2 * (n - 1));
  const standardErrors = (sigma - analytic.sigma) / se;
  let yieldAgreement: NonNullable<RunReport['analytic']['yieldAgreement']> | undefined;
  if (!('gaussian' in analytic)) {
    const p = analytic.yield.estimate;
    const zy = (y - p) / Math.sqrt((p * (1 - p)) / n);
    yieldAgreement = { difference: y - p, standardErrors: zy, consistent: Math.abs(zy) <= AGREEMENT_Z };
  }
  const response = partial ? undefined : responseAt(stage, spec, seed);
  const warnings = [...stage.warnings];
  if (nonConverged > 0) warnings.push(`${nonConverged} sample(s) whose balance solve did not converge were left out of every statistic`);
  if (histogram.underflow + histogram.overflow > 0) {
    warnings.push(`${histogram.underflow + histogram.overflow} sample(s) fell outside the histogram range +-${range.toExponential(3)} V (counted in every other statistic)`);
  }
  const seconds = (performance.now() - started) / 1000;
  const report: RunReport = {
    samples,
    evaluated: n,
    seed,
    workers: executor.threads === 0 ? 1 : executor.threads,
    chunkSize: CHUNK_SIZE,
    partial,
    design: { name: design.name, topology: design.topology },
    offset: {
      mean: moments.mean,
      meanInterval: [moments.mean - (z * sigma) / Math.sqrt(n), moments.mean + (z * sigma) / Math.sqrt(n)],
      sigma,
      sigmaInterval: sigmaInterval(sigma, n, confidence),
      min: moments.min,
      max: moments.max,
      quantileMethod,
      quantiles: { signed, absolute },
    },
    histogram: {
      lo: histogram.lo,
      hi: histogram.hi,
      binWidth: binWidth(histogram),
      counts: Array.from(histogram.counts),
      underflow: histogram.underflow,
      overflow: histogram.overflow,
    },
    analytic: {
      ...analytic,
      agreement: {
        relativeDifference: (sigma - analytic.sigma) / analytic.sigma,
        standardErrors,
        consistent: Math.abs(standardErrors) <= AGREEMENT_Z,
      },
      ...(yieldAgreement === undefined ? {} : { yieldAgreement }),
    },
    yield: {
      spec,
      failures,
      failuresHigh,
      failuresLow,
      estimate: y,
      interval: [yLo, yHi],
      confidence,
      method,
      failure: { estimate: failures / n, interval: failInterval },
      limitedBySamples: failures < FEW_FAILURES,
    },
    chip: { instances: m, estimate: chip(y), interval: [chip(yLo), chip(yHi)] },
    ...(importance === undefined ? {} : { importance }),
    ...(response === undefined ? {} : { response }),
    nonConverged,
    seconds,
    samplesPerSecond: n / seconds,
    warnings,
    figure: { name: fig.name, label: fig.label, symbol: fig.symbol, unit: fig.unit, sided: fig.sided },
  };
  return {
    report,
    ...(offsets === undefined ? {} : { offsets: partial ? offsets.subarray(0, done) : offsets }),
    ...(draws === undefined ? {} : { draws: partial ? draws.subarray(0, done * stage.dimension) : draws }),
    dimension: stage.dimension,
    variables: stage.variables,
    figure: stage.definition.figure,
  };
}

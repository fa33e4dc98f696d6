/**
 * A sweep: the same analysis over a list of designs (one field stepped), on one executor.
 * Every point uses the same seed, so neighbouring points share their random streams (common
 * random numbers) and the differences between them are not masked by sampling noise.
 */
import { compileStage, InputError, specLimit, type Design } from '@twinfet/core';
import { createExecutor, defaultWorkers, type Executor } from '../engine/pool.js';
import { seedText } from '../random/seed.js';
import { simulate } from './simulate.js';
import { estimateHighSigma } from './highSigma.js';
import { largestSigma, limitingStage } from './worstCondition.js';
import { chipYieldFromFailure } from '../stats/yield.js';

/** Monte Carlo samples per sweep point by default. */
export const SWEEP_SAMPLES = 20_000;

/** Options of `sweepDesigns`. */
export interface SweepOptions {
  /** Monte Carlo samples per point (default 20000). */
  readonly samples?: number;
  readonly seed?: string | number;
  readonly workers?: number;
  /** An executor to reuse (the caller closes it); otherwise one is made for the whole sweep. */
  readonly executor?: Executor;
  /** Confidence level of every interval (default 0.95). */
  readonly confidence?: number;
  /** |Vos| limit overriding each design's spec, volts. */
  readonly spec?: number;
  /** Add the importance-sampling failure probability at each point. */
  readonly importance?: boolean;
  readonly signal?: AbortSignal;
  /** Called after each finished point with the count of finished points. */
  readonly onPoint?: (done: number, total: number) => void;
}

/** The figures of one sweep point. Voltages in volts, probabilities as fractions. */
export interface SweepPointResult {
  readonly index: number;
  /** |Vos| limit and instances per chip used at this point. */
  readonly spec: number;
  readonly instances: number;
  /** Linearised sigma of the figure, volts (with conditions: the largest over them). */
  readonly analyticSigma: number;
  /**
   * With conditions: the condition of largest linearised sigma, of largest Monte Carlo sigma
   * (whose sigma `monteCarlo` reports), and of lowest yield; the yields are all-conditions
   * yields. Null without conditions.
   */
  readonly limitingCondition: null | { readonly linearised: string; readonly sigma: string; readonly yield: string };
  readonly monteCarlo: {
    readonly samples: number;
    readonly sigma: number;
    readonly sigmaInterval: readonly [number, number];
    readonly failures: number;
    readonly yield: number;
    readonly yieldInterval: readonly [number, number];
    readonly chipYield: number;
    readonly chipYieldInterval: readonly [number, number];
    /** Fewer than 10 failures: the yield is limited by the sample count. */
    readonly limitedBySamples: boolean;
  };
  /**
   * The point's yields, from the importance-sampling failure when the point has one (it is the
   * better estimate in the tails), else from the Monte Carlo count (`monteCarlo` above): instance
   * yield 1 - p and chip yield (1 - p)^instances, with their intervals.
   */
  readonly yield: {
    readonly method: 'monte-carlo' | 'importance-sampling';
    readonly estimate: number;
    readonly interval: readonly [number, number];
    readonly chipYield: number;
    readonly chipYieldInterval: readonly [number, number];
  };
  /** Importance-sampling failure probability (null unless asked for). */
  readonly importance: null | {
    /** `monte-carlo` when the spec lies inside the bulk and the estimate fell back to plain Monte Carlo (see HighSigmaReport). */
    readonly method: 'importance-sampling' | 'monte-carlo';
    readonly failure: number;
    readonly interval: readonly [number, number];
    /** Equivalent two-sided sigma level (null when the estimate is 0). */
    readonly sigmaLevel: number | null;
    readonly samples: number;
  };
  readonly warnings: readonly string[];
}

/**
 * Runs the analysis at each design, several points at a time (one per worker thread), and
 * returns the points in input order.
 * @throws InputError naming the point when a design is invalid
 */
export async function sweepDesigns(designs: readonly Design[], options: SweepOptions = {}): Promise<SweepPointResult[]> {
  if (designs.length === 0) throw new InputError('designs', 'a sweep needs at least one point');
  designs.forEach((d, i) => {
    try {
      compileStage(d);
    } catch (e) {
      if (e instanceof InputError) throw new InputError(e.field, `${e.message.slice(e.field.length + 2)} (at sweep point ${i + 1})`);
      throw e;
    }
  });
  const seed = seedText(options.seed);
  const samples = options.samples ?? SWEEP_SAMPLES;
  const confidence = options.confidence ?? 0.95;
  const executor = options.executor ?? createExecutor(options.workers ?? defaultWorkers());
  const out: SweepPointResult[] = new Array<SweepPointResult>(designs.length);
  let next = 0;
  let done = 0;
  let failed = false;
  const lane = async (): Promise<void> => {
    while (next < designs.length && !failed) {
      const index = next++;
      try {
        out[index] = await point(designs[index]!, index);
      } catch (e) {
        failed = true;
        throw e;
      }
      done++;
      options.onPoint?.(done, designs.length);
    }
  };
  const point = async (design: Design, index: number): Promise<SweepPointResult> => {
    const stage = compileStage(design);
    const spec = options.spec ?? specLimit(stage.design);
    const common = { seed, confidence, executor, spec, ...(options.signal === undefined ? {} : { signal: options.signal }) };
    const r = await simulate(design, { ...common, samples, keepOffsets: false });
    const tail = options.importance === true ? await estimateHighSigma(design, common) : undefined;
    const lin = limitingStage(stage.design);
    const big = largestSigma(r);
    const m = stage.design.spec.instances;
    const yieldFigures: SweepPointResult['yield'] =
      tail === undefined || tail.method === 'monte-carlo'
        ? { method: 'monte-carlo', estimate: r.yield.estimate, interval: r.yield.interval, chipYield: r.chip.estimate, chipYieldInterval: r.chip.interval }
        : {
            method: 'importance-sampling',
            estimate: 1 - tail.failureProbability,
            interval: [1 - tail.interval[1], 1 - tail.interval[0]],
            chipYield: chipYieldFromFailure(tail.failureProbability, m),
            chipYieldInterval: [chipYieldFromFailure(tail.interval[1], m), chipYieldFromFailure(tail.interval[0], m)],
          };
    return {
      index,
      spec,
      instances: stage.design.spec.instances,
      analyticSigma: lin.sigma,
      limitingCondition: lin.condition === null ? null : { linearised: lin.condition, sigma: big.condition!, yield: r.yield.worst! },
      monteCarlo: {
        samples: r.yield.evaluated ?? r.evaluated,
        sigma: big.sigma,
        sigmaInterval: big.sigmaInterval,
        failures: r.yield.failures,
        yield: r.yield.estimate,
        yieldInterval: r.yield.interval,
        chipYield: r.chip.estimate,
        chipYieldInterval: r.chip.interval,
        limitedBySamples: r.yield.limitedBySamples,
      },
      yield: yieldFigures,
      importance:
        tail === undefined
          ? null
          : { method: tail.method, failure: tail.failureProbability, interval: tail.interval, sigmaLevel: tail.sigmaLevel, samples: tail.samples },
      warnings: r.warnings,
    };
  };
  try {
    const lanes = Math.min(designs.length, Math.max(1, executor.threads));
    const results = await Promise.allSettled(Array.from({ length: lanes }, lane));
    const rejected = results.find((x): x is PromiseRejectedResult => x.status === 'rejected');
    if (rejected !== undefined) throw rejected.reason;
  } finally {
    if (options.executor === undefined) await executor.close();
  }
  return out;
}

/**
 * The failure probability P(|Vos| > spec) by plain Monte Carlo, for a spec inside the bulk of
 * the offset distribution, where importance sampling about the failure points has nothing to
 * gain (a design point within ~1.5 sigma) and its normal interval degenerates near p = 1.
 * The interval is Clopper-Pearson's. Uses the Monte Carlo streams of `simulate`, so the same
 * seed and sample count see the same failures as `simulate`. With `union`, a sample fails when
 * it fails at one of the design's conditions at least (the same draws at each).
 */
import type { Design } from '@twinfet/core';
import type { MonteCarloResult, MonteCarloTask } from '../engine/messages.js';
import { createExecutor, type Executor } from '../engine/pool.js';
import { CHUNK_SIZE, runChunks, taskList } from '../engine/schedule.js';
import { clopperPearson } from '../stats/clopperPearson.js';

/** A spec whose nearer failure point is closer than this many sigmas lies in the bulk (this project's rule). */
export const BULK_DISTANCE = 1.5;
/** A failure probability above this lies in the bulk (this project's rule). */
export const BULK_FAILURE = 0.1;
/** Remaining samples above which a worker pool is worth its start-up (~0.15 s). */
const POOL_THRESHOLD = 2_000_000;

/** The counts of a plain Monte Carlo failure estimate. */
export interface BulkCounts {
  readonly samples: number;
  readonly failures: number;
  readonly failuresHigh: number;
  readonly failuresLow: number;
  readonly nonConverged: number;
  readonly interval: readonly [number, number];
  readonly stopRule: 'relative-error' | 'samples' | 'max-samples';
  /** With `union`: each condition's own failures over its own converged samples. */
  readonly byCondition?: readonly { readonly failures: number; readonly samples: number }[];
  /** The executor in use at the end (a pool it opened, which the caller closes). */
  readonly executor: Executor;
}

/** Options of {@link bulkFailure}; all resolved by the caller. */
export interface BulkOptions {
  readonly spec: number;
  readonly seed: string;
  readonly confidence: number;
  readonly relError: number;
  /** A fixed sample count, or undefined for the relative-error rule. */
  readonly samples: number | undefined;
  readonly maxSamples: number;
  readonly executor: Executor;
  /** Whether a worker pool may be opened for a big job (when the caller owns the executor). */
  readonly mayOpenPool: boolean;
  readonly workers: number;
  readonly signal: AbortSignal | undefined;
  readonly onProgress: ((done: number, total: number) => void) | undefined;
  /** Count failures at one of `design.conditions` at least rather than at the design itself. */
  readonly union?: boolean;
}

/**
 * Counts failures in rounds of whole chunks (1, 2, 4, ... chunks) until the Clopper-Pearson
 * interval's half-width is at most `relError` of the estimate, or the fixed sample count.
 */
export async function bulkFailure(design: Design, o: BulkOptions): Promise<BulkCounts> {
  const total = o.samples ?? o.maxSamples;
  let executor = o.executor;
  let n = 0;
  let high = 0;
  let low = 0;
  // high + low without conditions; with them an instance may fail high at one and low at another.
  let failures = 0;
  let nonConverged = 0;
  let chunk = 0;
  let round = 1;
  let stopRule: BulkCounts['stopRule'] = o.samples === undefined ? 'relative-error' : 'samples';
  let interval: [number, number] = [0, 1];
  const perCondition = o.union === true ? (design.conditions ?? []).map(() => ({ failures: 0, samples: 0 })) : undefined;
  const consume = (r: MonteCarloResult): void => {
    const at = r.conditions;
    if (perCondition !== undefined && at !== undefined) {
      n += at.evaluatedAll;
      failures += at.failuresAll;
      high += at.failuresAllHigh;
      low += at.failuresAllLow;
      nonConverged += r.count - at.evaluatedAll;
      at.perCondition.forEach((c, k) => {
        perCondition[k]!.failures += c.failuresHigh + c.failuresLow;
        perCondition[k]!.samples += r.count - c.nonConverged;
      });
      return;
    }
    n += r.count - r.nonConverged;
    failures += r.failuresHigh + r.failuresLow;
    high += r.failuresHigh;
    low += r.failuresLow;
    nonConverged += r.nonConverged;
  };
  let drawn = 0;
  for (;;) {
    const remaining = total - drawn;
    if (remaining <= 0) {
      if (o.samples === undefined) stopRule = 'max-samples';
      break;
    }
    if (o.mayOpenPool && executor.threads === 0 && o.workers > 1 && remaining > POOL_THRESHOLD && o.samples !== undefined) {
      executor = createExecutor(o.workers);
    }
    const tasks: MonteCarloTask[] = [];
    let planned = 0;
    for (let c = 0; c < round && planned < remaining; c++) {
      const count = Math.min(CHUNK_SIZE, remaining - planned);
      tasks.push({
        kind: 'montecarlo',
        design,
        seed: o.seed,
        chunk: chunk++,
        count,
        spec: o.spec,
        // Failure counting needs no histogram: one bin over +-spec.
        histogram: { lo: -o.spec, hi: o.spec, bins: 1 },
        keepOffsets: false,
        keepDraws: false,
        ...(perCondition === undefined ? {} : { conditions: { keepFigures: false, drift: null } }),
      });
      planned += count;
    }
    const before = drawn;
    await runChunks(executor, taskList(tasks), consume, {
      signal: o.signal,
      onProgress: o.onProgress === undefined ? undefined : (d) => o.onProgress!(before + d, total),
    });
    drawn += planned;
    if (n > 0) {
      interval = clopperPearson(failures, n, o.confidence);
      const p = failures / n;
      if (o.samples === undefined && p > 0 && (interval[1] - interval[0]) / 2 <= o.relError * p) break;
    }
    round = Math.min(round * 2, 64);
  }
  return {
    samples: n,
    failures,
    failuresHigh: high,
    failuresLow: low,
    nonConverged,
    interval,
    stopRule,
    executor,
    ...(perCondition === undefined ? {} : { byCondition: perCondition }),
  };
}

/**
 * Messages between the main thread and the workers: one discriminated union each way.
 * A chunk is a pure function of its task: same task, same bytes, on any thread.
 */
import type { Design } from '@twinfet/core';
import type { Histogram } from '../stats/histogram.js';
import type { Moments } from '../stats/moments.js';

/** Test-only fault injection, honoured only when TWINFET_TEST_FAULTS=1 in the worker. */
export type InjectedFault = 'throw' | 'exit';

interface TaskBase {
  readonly design: Design;
  /** The run's seed, as text. */
  readonly seed: string;
  /** Chunk index: its generator is seeded from (seed, stream kind, chunk) only. */
  readonly chunk: number;
  /** Samples in this chunk. */
  readonly count: number;
  /** |Vos| limit for failure counting, volts. */
  readonly spec: number;
  readonly fault?: InjectedFault;
}

/** Plain Monte Carlo on the exact model. */
export interface MonteCarloTask extends TaskBase {
  readonly kind: 'montecarlo';
  /** Fixed histogram range and bin count (the same for every chunk, so they merge). */
  readonly histogram: { readonly lo: number; readonly hi: number; readonly bins: number };
  /** Return every sample's offset (for exact quantiles, CSV output). */
  readonly keepOffsets: boolean;
  /** Return every sample's standard-normal draws (for CSV output). */
  readonly keepDraws: boolean;
}

/** Mean-shift importance sampling from the equal mixture of N(shift_k, I). */
export interface ImportanceTask extends TaskBase {
  readonly kind: 'importance';
  /** Mixture centres in standard-normal space, each of the stage's dimension. */
  readonly shifts: readonly (readonly number[])[];
  /**
   * Instead of `shifts`: the groups - 1 centres of mirror-image regions (FailureSymmetry), centre
   * c having `fixed` on group 0, `own` on group c and `rest` on every other group, so that the
   * weight of a sample costs O(dimension) rather than O(centres x dimension).
   */
  readonly mirrored?: {
    readonly groupSize: number;
    readonly groups: number;
    readonly fixed: readonly number[];
    readonly own: readonly number[];
    readonly rest: readonly number[];
  };
  /**
   * Weights are accumulated as w e^{logScale}, so that at 26-37 sigma (w ~ e^{-b^2/2}) neither
   * w nor w^2 underflows; the caller divides the sums back.
   */
  readonly logScale: number;
}

export type ChunkTask = MonteCarloTask | ImportanceTask;

/** Result of a Monte Carlo chunk. */
export interface MonteCarloResult {
  readonly kind: 'montecarlo';
  readonly chunk: number;
  readonly count: number;
  /** Moments of the converged offsets, volts. */
  readonly moments: Moments;
  /** Fixed-range histogram of the converged offsets. */
  readonly histogram: Histogram;
  /** Samples with Vos > +spec and Vos < -spec. */
  readonly failuresHigh: number;
  readonly failuresLow: number;
  /** Evaluations whose balance solve did not converge (excluded from everything else). */
  readonly nonConverged: number;
  readonly offsets?: Float64Array;
  readonly draws?: Float64Array;
}

/** Result of an importance-sampling chunk: sums of the weighted failure indicator. */
export interface ImportanceResult {
  readonly kind: 'importance';
  readonly chunk: number;
  readonly count: number;
  /** Sum of w e^{logScale} 1{|Vos| > spec}, and of its square. */
  readonly sum: number;
  readonly sumSquares: number;
  /** The same split by side (Vos > +spec, Vos < -spec). */
  readonly sumHigh: number;
  readonly sumLow: number;
  /** Failing samples seen (unweighted). */
  readonly hits: number;
  readonly nonConverged: number;
  readonly histogram?: undefined;
  readonly offsets?: undefined;
  readonly draws?: undefined;
}

export type ChunkResult = MonteCarloResult | ImportanceResult;

/** An error inside a worker, sent back as data. */
export interface WorkerFailure {
  readonly kind: 'error';
  readonly name: string;
  readonly message: string;
  readonly stack?: string;
}

export type WorkerReply = ChunkResult | WorkerFailure;

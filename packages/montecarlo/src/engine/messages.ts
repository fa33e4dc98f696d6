/**
 * Messages between the main thread and the workers: one discriminated union each way.
 * A chunk is a pure function of its task: same task, same bytes, on any thread.
 */
import type { Design } from '@twinfet/core';
import type { CoMoments } from '../stats/comoments.js';
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
  /** Evaluate every sample also at each of `design.conditions` (absent: the design only). */
  readonly conditions?: ConditionsPlan;
}

/** What a chunk does at the design's operating conditions (the same draws at each). */
export interface ConditionsPlan {
  /** Return every sample's figure at each condition (for CSV output). */
  readonly keepFigures: boolean;
  /** Per-sample drift (x_to - x_from) / (T_to - T_from) between two conditions, or none. */
  readonly drift: null | {
    readonly from: number;
    readonly to: number;
    /** 1 / (T_to - T_from), 1/K. */
    readonly inverseSpan: number;
    readonly histogram: { readonly lo: number; readonly hi: number; readonly bins: number };
    /** Return every sample's drift (for exact quantiles). */
    readonly keep: boolean;
  };
}

/** One condition's part of a chunk result. */
export interface ConditionChunk {
  /** Moments of the figure at this condition over its converged samples. */
  readonly moments: Moments;
  readonly failuresHigh: number;
  readonly failuresLow: number;
  readonly nonConverged: number;
  /** Of the samples evaluated at every condition that fail somewhere: those failing here, and those failing here only. */
  readonly failing: number;
  readonly onlyFailing: number;
  readonly figures?: Float64Array;
}

/** The conditions' part of a Monte Carlo chunk result. */
export interface ConditionsResult {
  readonly perCondition: readonly ConditionChunk[];
  /** Samples evaluated at every condition, and those failing at one condition at least. */
  readonly evaluatedAll: number;
  readonly failuresAll: number;
  /** Of those: failing above +spec somewhere, below -spec somewhere (an instance may do both). */
  readonly failuresAllHigh: number;
  readonly failuresAllLow: number;
  readonly drift?: {
    /** Moments of the drift, V/K (or the figure's unit per K). */
    readonly moments: Moments;
    /** x = the figure at the `from` condition, y = the drift. */
    readonly pairs: CoMoments;
    readonly histogram: Histogram;
    /** Every sample's drift, NaN where it could not be evaluated. */
    readonly values?: Float64Array;
  };
}

/** The centres of G - 1 mirror-image failure regions over G groups of `groupSize` variables. */
export interface MirroredCentres {
  readonly groupSize: number;
  readonly groups: number;
  readonly fixed: readonly number[];
  readonly own: readonly number[];
  readonly rest: readonly number[];
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
  readonly mirrored?: MirroredCentres;
  /**
   * Instead of `shifts` or `mirrored`, with conditions: one set of mirror-image centres per
   * condition; the proposal is the equal mixture of the sets' mixtures.
   */
  readonly mirroredSets?: readonly MirroredCentres[];
  /**
   * Weights are accumulated as w e^{logScale}, so that at 26-37 sigma (w ~ e^{-b^2/2}) neither
   * w nor w^2 underflows; the caller divides the sums back.
   */
  readonly logScale: number;
  /**
   * Fail when the figure fails at one of `design.conditions` at least (the stage's figure at
   * each condition, from the same draws); absent: the design's own figure.
   */
  readonly union?: boolean;
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
  readonly conditions?: ConditionsResult;
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
  /** With `union`: the sums of w e^{logScale} 1{fails at condition c}, one per condition. */
  readonly byCondition?: readonly number[];
  readonly byConditionSquares?: readonly number[];
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

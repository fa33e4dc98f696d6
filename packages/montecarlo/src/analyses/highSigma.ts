import { compileConditions, compileStage, InputError, specLimit, variableDeviation, type Design, type Stage } from '@twinfet/core';
import { findDesignPoint, type DesignPoint } from './designPoint.js';
import type { ImportanceResult, ImportanceTask } from '../engine/messages.js';
import { normalQuantile, sigmaLevel, sigmaLevelOfTails } from '../stats/normal.js';
import { createExecutor, defaultWorkers, inThreadExecutor, type Executor } from '../engine/pool.js';
import { runChunks, taskList } from '../engine/schedule.js';
import { seedText } from '../random/seed.js';
import { chipFailure } from '../stats/yield.js';

/** Importance-sampling chunk size: small, so the stop rule can act after a few thousand samples. */
export const IMPORTANCE_CHUNK = 4096;
/** Remaining samples above which a worker pool is worth its start-up (~0.15 s). */
export const POOL_THRESHOLD = 200_000;

/** Options of `estimateHighSigma`. */
export interface HighSigmaOptions {
  /** |Vos| limit, volts (default: the design's spec). */
  readonly spec?: number;
  readonly seed?: string | number;
  /** Stop when the interval's half-width is at most this fraction of the estimate (default 0.05). */
  readonly relError?: number;
  /** Fixed sample count instead of the relative-error rule. */
  readonly samples?: number;
  /** Upper bound on samples under the relative-error rule (default 1e7). */
  readonly maxSamples?: number;
  /** Confidence level of the interval (default 0.95). */
  readonly confidence?: number;
  readonly workers?: number;
  readonly executor?: Executor;
  readonly signal?: AbortSignal;
  readonly onProgress?: (done: number, total: number) => void;
}

/** A design point as reported: its distance and coordinates by device and parameter. */
export interface ReportedDesignPoint {
  /** The failure region (`+spec`, `-spec`, or the stage's own label). */
  readonly side: string;
  /** With conditions: the condition whose failure region this is. */
  readonly condition?: string;
  readonly distance: number;
  readonly form: number;
  readonly method: DesignPoint['method'];
  readonly offset: number;
  readonly coordinates: readonly {
    device: string;
    role: string;
    parameter: string;
    /** Standard-normal coordinate (sigmas). */
    u: number;
    /** The physical deviation: dV_T in volts, or dbeta/beta as a fraction. */
    deviation: number;
  }[];
}

/** The high-sigma failure estimate. */
export interface HighSigmaReport {
  readonly spec: number;
  readonly failureProbability: number;
  readonly standardError: number;
  readonly interval: readonly [number, number];
  readonly confidence: number;
  /** Equivalent two-sided sigma level Phi^-1(1 - p/2), and at the interval ends. */
  readonly sigmaLevel: number | null;
  /** Sigma levels at the interval ends (null where that end is 0: unbounded). */
  readonly sigmaLevelInterval: readonly [number | null, number | null];
  /** z * SE / p (null when no failure was seen). */
  readonly relativeHalfWidth: number | null;
  /** Failure probability split by side. */
  readonly high: number;
  readonly low: number;
  readonly samples: number;
  readonly hits: number;
  readonly nonConverged: number;
  readonly seed: string;
  readonly stopRule: 'relative-error' | 'samples' | 'max-samples' | 'below-double-range';
  /**
   * True when the probability is below the smallest double (both design points beyond ~37.5
   * sigma): no sample could weigh it, so none is drawn; `failureProbability` is then 0 and
   * `sigmaLevel` and `form.sigmaLevel` come from the design points' distances.
   */
  readonly belowDoubleRange: boolean;
  /** Relative variance per sample, var(w 1{fail}) / p^2: the figure of merit. */
  readonly relativeVariancePerSample: number | null;
  /** Plain Monte Carlo samples for the same relative half-width h: z^2 (1 - p) / (p h^2). */
  readonly equivalentPlainSamples: number | null;
  readonly designPoints: readonly ReportedDesignPoint[];
  readonly form: { readonly failureProbability: number; readonly sigmaLevel: number };
  readonly chip: { readonly instances: number; readonly failure: number; readonly interval: readonly [number, number] };
  /**
   * With conditions: `all conditions`, and the failure above is P(fails at one condition at
   * least) from a mixture over every condition's design points; `high`/`low` are then P(beyond
   * +spec somewhere) and P(beyond -spec somewhere), and the FORM figure is the sum over points.
   */
  readonly over?: 'all conditions';
  /** With conditions: each condition's own failure probability from the same weighted samples. */
  readonly conditions?: readonly {
    readonly name: string;
    readonly failureProbability: number;
    readonly standardError: number;
    readonly interval: readonly [number, number];
    /** Sum of Phi(-distance) over this condition's design points. */
    readonly form: number;
  }[];
  readonly seconds: number;
}

/** A count beyond the range of doubles (p near the smallest doubles) is reported as not available. */
function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

function describePoint(stage: Stage, p: DesignPoint, condition?: string): ReportedDesignPoint {
  return {
    side: p.label,
    ...(condition === undefined ? {} : { condition }),
    distance: p.distance,
    form: p.form,
    method: p.method,
    offset: p.offset,
    coordinates: stage.variables.map((v, j) => ({
      device: v.device,
      role: v.role,
      parameter: v.parameter,
      u: p.u[j]!,
      deviation: variableDeviation(stage.variables, p.u, 0, j),
    })),
  };
}

function check(o: HighSigmaOptions): void {
  if (o.relError !== undefined && !(o.relError > 0 && o.relError < 1)) {
    throw new InputError('relError', `expected a fraction between 0 and 1 such as 0.05, got ${o.relError}`);
  }
  if (o.samples !== undefined && !(Number.isInteger(o.samples) && o.samples >= 100 && o.samples <= 1e10)) {
    throw new InputError('samples', `expected a whole number from 100 to 1e10, got ${o.samples}`);
  }
  if (o.confidence !== undefined && !(o.confidence > 0 && o.confidence < 1)) {
    throw new InputError('confidence', `expected a level between 0 and 1 such as 0.95, got ${o.confidence}`);
  }
  if (o.spec !== undefined && !(Number.isFinite(o.spec) && o.spec > 0)) {
    throw new InputError('spec', `expected a positive offset limit in volts, got ${o.spec}`);
  }
}

/**
 * Probability that |Vos| exceeds the spec, by mean-shift importance sampling on the exact model:
 * the design points u*+ and u*- (FORM), then samples from the equal mixture of N(u*+, I) and
 * N(u*-, I), weight phi(u)/q(u). Stops when the interval's relative half-width reaches
 * `relError`, or after `samples`. Deterministic for a seed: rounds are fixed sets of chunks.
 */
export async function estimateHighSigma(design: Design, options: HighSigmaOptions = {}): Promise<HighSigmaReport> {
  check(options);
  const started = performance.now();
  const stage = compileStage(design);
  const spec = options.spec ?? specLimit(stage.design);
  const confidence = options.confidence ?? 0.95;
  const relError = options.relError ?? 0.05;
  const seed = seedText(options.seed);
  const z = normalQuantile(1 - (1 - confidence) / 2);
  // With conditions the failure is the union over them: a mixture over every condition's design points.
  const atConditions = compileConditions(design);
  const union = atConditions.length > 0;
  const located = union
    ? atConditions.flatMap((cs, k) => cs.stage.failureComponents(spec).map((c) => ({ point: findDesignPoint(cs.stage, c), stage: cs.stage, k })))
    : stage.failureComponents(spec).map((c) => ({ point: findDesignPoint(stage, c), stage, k: -1 }));
  const points = located.map((x) => x.point);
  const byCondition = atConditions.map(() => 0);
  const byConditionSquares = atConditions.map(() => 0);
  const fixed = options.samples;
  const maxSamples = fixed ?? options.maxSamples ?? 1e7;

  // Most high-sigma estimates need only a few thousand samples: start in this thread and open a
  // worker pool only when the first round shows the job is big (the numbers do not depend on it).
  const ownExecutor = options.executor === undefined;
  let executor: Executor = options.executor ?? inThreadExecutor();
  const wantedWorkers = options.workers ?? defaultWorkers();
  let n = 0;
  let sum = 0;
  let sumSquares = 0;
  let sumHigh = 0;
  let sumLow = 0;
  let hits = 0;
  let nonConverged = 0;
  let chunk = 0;
  let stopRule: HighSigmaReport['stopRule'] = fixed === undefined ? 'relative-error' : 'samples';
  const consume = (r: ImportanceResult): void => {
    n += r.count;
    sum += r.sum;
    sumSquares += r.sumSquares;
    sumHigh += r.sumHigh;
    sumLow += r.sumLow;
    hits += r.hits;
    nonConverged += r.nonConverged;
    r.byCondition?.forEach((x, k) => (byCondition[k]! += x));
    r.byConditionSquares?.forEach((x, k) => (byConditionSquares[k]! += x));
  };
  // Sums are of w e^{logScale}: with the scale at the nearer design point's b^2/2 the scaled
  // weights near the failure region are of order 1 at any distance (see ImportanceTask).
  const logScale = 0.5 * Math.min(...points.map((p) => p.distance)) ** 2;
  const unscale = Math.exp(-logScale);
  /** Scaled estimate and variance (scale-free ratios are taken from these). */
  const stats = () => {
    const ps = sum / n;
    const variance = Math.max(0, sumSquares / n - ps * ps);
    return { ps, ses: Math.sqrt(variance / n), variance };
  };
  const formTails = points.reduce((acc, p) => acc + p.form, 0);
  const belowDoubleRange = formTails < 1e-300 && Math.exp(-logScale) === 0;
  if (belowDoubleRange) stopRule = 'below-double-range';
  try {
    let round = 1;
    while (!belowDoubleRange) {
      const remaining = maxSamples - n;
      if (remaining <= 0) break;
      // Round sizes double (1, 2, 4, ... chunks), capped, so that a run stops near the sample
      // count it needs; the schedule depends only on the results so far, never on timing.
      const tasks: ImportanceTask[] = [];
      let planned = 0;
      for (let c = 0; c < round && planned < remaining; c++) {
        const count = Math.min(IMPORTANCE_CHUNK, remaining - planned);
        tasks.push({ kind: 'importance', design, seed, chunk: chunk++, count, spec, shifts: points.map((p) => p.u), logScale, ...(union ? { union: true } : {}) });
        planned += count;
      }
      await runChunks(executor, taskList(tasks), consume, {
        signal: options.signal,
        onProgress: options.onProgress === undefined ? undefined : (d) => options.onProgress!(n + d, maxSamples),
      });
      const { ps, ses, variance } = stats();
      if (fixed === undefined && ps > 0 && hits >= 10 && (z * ses) / ps <= relError) break;
      if (ownExecutor && executor.threads === 0 && wantedWorkers > 1) {
        // Samples still needed: fixed count, or (z/E)^2 relVar from the estimate so far.
        const need = fixed ?? (ps > 0 ? ((z / relError) ** 2 * variance) / (ps * ps) : maxSamples);
        if (need - n > POOL_THRESHOLD) executor = createExecutor(wantedWorkers);
      }
      if (n >= maxSamples && fixed === undefined) stopRule = 'max-samples';
      round = Math.min(round * 2, 64);
    }
  } finally {
    if (ownExecutor) await executor.close();
  }
  const { ps, ses, variance } = n > 0 ? stats() : { ps: 0, ses: 0, variance: 0 };
  // An unbiased estimate may exceed 1 by a hair when nearly every sample fails: clamp, so
  // the sigma level and the chip failure stay defined.
  const p = Math.min(1, ps * unscale);
  const se = ses * unscale;
  const lo = Math.max(0, p - z * se);
  const hi = Math.min(1, p + z * se);
  const formP = formTails;
  const instances = stage.design.spec.instances;
  const has = ps > 0;
  const relHalf = has ? (z * ses) / ps : null;
  const formLevel = sigmaLevelOfTails(points.map((p) => p.distance));
  return {
    spec,
    failureProbability: p,
    standardError: se,
    interval: [lo, hi],
    confidence,
    sigmaLevel: belowDoubleRange ? formLevel : has && p > 0 ? sigmaLevel(p) : null,
    sigmaLevelInterval: [hi > 0 ? sigmaLevel(hi) : null, lo > 0 ? sigmaLevel(lo) : null],
    relativeHalfWidth: relHalf,
    high: n > 0 ? (sumHigh / n) * unscale : 0,
    low: n > 0 ? (sumLow / n) * unscale : 0,
    samples: n,
    hits,
    nonConverged,
    seed,
    stopRule,
    belowDoubleRange,
    relativeVariancePerSample: has ? variance / (ps * ps) : null,
    equivalentPlainSamples: relHalf !== null && relHalf > 0 && p > 0 ? finiteOrNull((z * z * (1 - p)) / p / relHalf / relHalf) : null,
    designPoints: located.map((x) => describePoint(x.stage, x.point, x.k < 0 ? undefined : atConditions[x.k]!.condition.name)),
    // From the distances, not from formP: beyond ~38 sigma formP underflows to 0 and its level would be Infinity.
    form: { failureProbability: formP, sigmaLevel: formLevel },
    chip: {
      instances,
      failure: chipFailure(p, instances),
      interval: [chipFailure(lo, instances), chipFailure(hi, instances)],
    },
    ...(union
      ? {
          over: 'all conditions' as const,
          conditions: atConditions.map((cs, k) => {
            const pk = n > 0 ? byCondition[k]! / n : 0;
            const vk = n > 0 ? Math.max(0, byConditionSquares[k]! / n - pk * pk) : 0;
            const estimate = Math.min(1, pk * unscale);
            const sek = Math.sqrt(vk / Math.max(1, n)) * unscale;
            return {
              name: cs.condition.name,
              failureProbability: estimate,
              standardError: sek,
              interval: [Math.max(0, estimate - z * sek), Math.min(1, estimate + z * sek)] as const,
              form: located.filter((x) => x.k === k).reduce((a, x) => a + x.point.form, 0),
            };
          }),
        }
      : {}),
    seconds: (performance.now() - started) / 1000,
  };
}

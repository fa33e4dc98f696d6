import { compileConditions, compileStage, InputError, specLimit, variableDeviation, type Design, type Stage } from '@twinfet/core';
import { findDesignPoint, type DesignPoint } from './designPoint.js';
import { findMirroredDesignPoint, type MirroredDesignPoint } from './mirroredDesignPoint.js';
import type { ImportanceResult, ImportanceTask, MirroredCentres } from '../engine/messages.js';
import { normalQuantile, sigmaLevel, sigmaLevelOfTails } from '../stats/normal.js';
import { createExecutor, defaultWorkers, inThreadExecutor, type Executor } from '../engine/pool.js';
import { runChunks, taskList } from '../engine/schedule.js';
import { seedText } from '../random/seed.js';
import { chipFailure, chipYieldFromFailure } from '../stats/yield.js';
import { BULK_DISTANCE, BULK_FAILURE, bulkFailure } from './bulkFailure.js';
import { clopperPearson } from '../stats/clopperPearson.js';

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
  /**
   * How the failure probability was estimated: importance sampling, or plain Monte Carlo with a
   * Clopper-Pearson interval when the spec lies inside the bulk of the distribution (a failure
   * point closer than 1.5 sigma, or a failure probability above 0.1), where importance sampling
   * gains nothing and its normal interval degenerates near p = 1.
   */
  readonly method: 'importance-sampling' | 'monte-carlo';
  /** Why plain Monte Carlo was used (null for importance sampling). */
  readonly methodReason: string | null;
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
  /** Relative variance per sample, var(w 1{fail}) / p^2: the figure of merit ((1 - p) / p for plain Monte Carlo). */
  readonly relativeVariancePerSample: number | null;
  /** Plain Monte Carlo samples for the same relative half-width h: z^2 (1 - p) / (p h^2) (null when this is plain Monte Carlo). */
  readonly equivalentPlainSamples: number | null;
  readonly designPoints: readonly ReportedDesignPoint[];
  /**
   * Set when the failure regions are mirror images of one another (a selector's competitors):
   * how many there are. `designPoints` then holds the first region's point only; every other
   * region's is its mirror image, at the same distance, and the mixture has one centre per region.
   */
  readonly mirrorRegions?: number;
  readonly form: { readonly failureProbability: number; readonly sigmaLevel: number };
  /**
   * Chip failure 1 - (1 - p)^M over M instances and its interval; the chip yield (1 - p)^M and
   * its interval, computed directly so that a chip yield of 1e-80 is not lost as 1 - failure.
   */
  readonly chip: {
    readonly instances: number;
    readonly failure: number;
    readonly interval: readonly [number, number];
    readonly yield: number;
    readonly yieldInterval: readonly [number, number];
  };
  /**
   * With conditions: `all conditions`, and the failure above is P(fails at one condition at
   * least) from a mixture over every condition's design points; `high`/`low` are then P(beyond
   * +spec somewhere) and P(beyond -spec somewhere), and the FORM figure is the sum over points.
   */
  readonly over?: 'all conditions';
  /** With conditions: each condition's own failure probability from the same samples. */
  readonly conditions?: readonly {
    readonly name: string;
    readonly failureProbability: number;
    readonly standardError: number;
    readonly interval: readonly [number, number];
    /** Sum of Phi(-distance) over this condition's failure regions. */
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

/** A failure region's design points at one condition (k = -1: the design itself). */
interface Located {
  readonly stage: Stage;
  /** Index of the condition (-1: the design itself). */
  readonly k: number;
  readonly regions: number;
  readonly points: DesignPoint[];
  readonly mirrored?: MirroredDesignPoint;
}

/** The importance-sampling proposal: the design points of every failure region (at every condition) and the mixture over them. */
interface Proposal {
  readonly atConditions: ReturnType<typeof compileConditions>;
  readonly union: boolean;
  readonly symmetry: Stage['failureSymmetry'];
  readonly located: Located[];
  readonly points: DesignPoint[];
  readonly mixture: Pick<ImportanceTask, 'shifts' | 'mirrored' | 'mirroredSets'>;
  /** FORM failure probability of one condition's regions. */
  readonly formOf: (x: Located) => number;
  /** Distances of one condition's regions (a mirrored set repeats its first point's). */
  readonly distancesOf: (x: Located) => number[];
  readonly regions: number;
  readonly reportedPoints: () => ReportedDesignPoint[];
  /** FORM failure probability summed over every region and condition. */
  readonly formTails: number;
}

/** Finds the design points of the failure at `spec` (over every condition, if the design has them) and builds the mixture proposal. */
function locateFailures(design: Design, stage: Stage, spec: number): Proposal {
  // With conditions the failure is the union over them: a mixture over every condition's design
  // points (for mirror-image regions, the equal mixture of each condition's mirrored mixture).
  const atConditions = compileConditions(design);
  const union = atConditions.length > 0;
  const symmetry = stage.failureSymmetry;
  const located: Located[] = (union ? atConditions.map((cs, k) => ({ stage: cs.stage, k })) : [{ stage, k: -1 }]).map((at) => {
    const components = at.stage.failureComponents(spec);
    if (symmetry === undefined) return { ...at, regions: components.length, points: components.map((c) => findDesignPoint(at.stage, c)) };
    const mirrored = findMirroredDesignPoint(at.stage, components[0]!, symmetry.groupSize);
    return { ...at, regions: components.length, points: [mirrored.point], mirrored };
  });
  const points: DesignPoint[] = located.flatMap((x) => x.points);
  const centres = (m: MirroredDesignPoint): MirroredCentres => ({ groupSize: m.groupSize, groups: m.groups, fixed: m.fixed, own: m.own, rest: m.rest });
  const mirrorSets = located.flatMap((x) => (x.mirrored === undefined ? [] : [centres(x.mirrored)]));
  const mixture: Pick<ImportanceTask, 'shifts' | 'mirrored' | 'mirroredSets'> =
    symmetry === undefined ? { shifts: points.map((p) => p.u) } : union ? { shifts: [], mirroredSets: mirrorSets } : { shifts: [], mirrored: mirrorSets[0]! };
  // Every mirror image has the same distance, so a set's FORM sum is copies of its first point's.
  const formOf = (x: Located): number => (x.mirrored === undefined ? x.points.reduce((acc, p) => acc + p.form, 0) : x.regions * x.points[0]!.form);
  const distancesOf = (x: Located): number[] =>
    x.mirrored === undefined ? x.points.map((p) => p.distance) : new Array<number>(x.regions).fill(x.points[0]!.distance);
  const regions = located[0]!.regions;
  const reportedPoints = (): ReportedDesignPoint[] =>
    located.flatMap((x) => x.points.map((pt) => describePoint(x.stage, pt, x.k < 0 ? undefined : atConditions[x.k]!.condition.name)));
  const formTails = located.reduce((acc, x) => acc + formOf(x), 0);
  return { atConditions, union, symmetry, located, points, mixture, formOf, distancesOf, regions, reportedPoints, formTails };
}

/** The report of a failure estimated by plain Monte Carlo (the spec lies in the bulk). */
function plainReport(
  b: Awaited<ReturnType<typeof bulkFailure>>,
  c: { readonly spec: number; readonly reason: string; readonly confidence: number; readonly seed: string; readonly instances: number; readonly started: number },
  proposal: Proposal,
): HighSigmaReport {
  const { spec, reason, confidence, seed, instances, started } = c;
  const { atConditions, symmetry, located, formOf, distancesOf, regions, reportedPoints, formTails } = proposal;
  const p = b.failures / b.samples;
  const [lo, hi] = b.interval;
  return {
    spec,
    method: 'monte-carlo',
    methodReason: reason,
    failureProbability: p,
    standardError: Math.sqrt((p * (1 - p)) / b.samples),
    interval: [lo, hi],
    confidence,
    sigmaLevel: p > 0 ? sigmaLevel(p) : null,
    sigmaLevelInterval: [hi > 0 ? sigmaLevel(hi) : null, lo > 0 ? sigmaLevel(lo) : null],
    relativeHalfWidth: p > 0 ? (hi - lo) / 2 / p : null,
    high: b.failuresHigh / b.samples,
    low: b.failuresLow / b.samples,
    samples: b.samples,
    hits: b.failures,
    nonConverged: b.nonConverged,
    seed,
    stopRule: b.stopRule,
    belowDoubleRange: false,
    relativeVariancePerSample: p > 0 ? (1 - p) / p : null,
    equivalentPlainSamples: null,
    designPoints: reportedPoints(),
    ...(symmetry === undefined ? {} : { mirrorRegions: regions }),
    form: { failureProbability: formTails, sigmaLevel: sigmaLevelOfTails(located.flatMap(distancesOf)) },
    chip: chipFigures(p, lo, hi, instances),
    ...(b.byCondition === undefined
      ? {}
      : {
          over: 'all conditions' as const,
          conditions: b.byCondition.map((c, k) => {
            const pk = c.samples > 0 ? c.failures / c.samples : 0;
            return {
              name: atConditions[k]!.condition.name,
              failureProbability: pk,
              standardError: c.samples > 0 ? Math.sqrt((pk * (1 - pk)) / c.samples) : 0,
              interval: c.samples > 0 ? clopperPearson(c.failures, c.samples, confidence) : ([0, 1] as const),
              form: formOf(located[k]!),
            };
          }),
        }),
    seconds: (performance.now() - started) / 1000,
  };
}

/** What an importance-sampling run accumulated: counts, scaled sums and the scaled estimate. */
interface ImportanceSums {
  readonly n: number;
  readonly sumHigh: number;
  readonly sumLow: number;
  readonly hits: number;
  readonly nonConverged: number;
  readonly byCondition: readonly number[];
  readonly byConditionSquares: readonly number[];
  readonly stopRule: HighSigmaReport['stopRule'];
  readonly belowDoubleRange: boolean;
  /** exp(-logScale): turns the scaled sums into probabilities. */
  readonly unscale: number;
  /** Scaled estimate, its standard error and variance per sample. */
  readonly ps: number;
  readonly ses: number;
  readonly variance: number;
}

/** The report of an importance-sampling estimate from its sums. */
function importanceReport(
  t: ImportanceSums,
  c: { readonly spec: number; readonly confidence: number; readonly seed: string; readonly instances: number; readonly started: number; readonly z: number },
  proposal: Proposal,
): HighSigmaReport {
  const { n, sumHigh, sumLow, hits, nonConverged, byCondition, byConditionSquares, stopRule, belowDoubleRange, unscale, ps, ses, variance } = t;
  const { spec, confidence, seed, instances, started, z } = c;
  const { atConditions, union, symmetry, located, formOf, distancesOf, regions, reportedPoints, formTails } = proposal;
  // An unbiased estimate may exceed 1 by a hair when nearly every sample fails: clamp, so
  // the sigma level and the chip failure stay defined.
  const p = Math.min(1, ps * unscale);
  const se = ses * unscale;
  const lo = Math.max(0, p - z * se);
  const hi = Math.min(1, p + z * se);
  const formP = formTails;
  const has = ps > 0;
  const relHalf = has ? (z * ses) / ps : null;
  const formLevel = sigmaLevelOfTails(located.flatMap(distancesOf));
  return {
    spec,
    method: 'importance-sampling',
    methodReason: null,
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
    designPoints: reportedPoints(),
    ...(symmetry === undefined ? {} : { mirrorRegions: regions }),
    // From the distances, not from formP: beyond ~38 sigma formP underflows to 0 and its level would be Infinity.
    form: { failureProbability: formP, sigmaLevel: formLevel },
    chip: chipFigures(p, lo, hi, instances),
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
              form: formOf(located[k]!),
            };
          }),
        }
      : {}),
    seconds: (performance.now() - started) / 1000,
  };
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
  const proposal = locateFailures(design, stage, spec);
  const { atConditions, union, symmetry, located, points, mixture, formOf, distancesOf, regions, reportedPoints, formTails } = proposal;
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
  const nearest = Math.min(...points.map((p) => p.distance));
  const inBulk = nearest < BULK_DISTANCE || formTails > BULK_FAILURE;
  const belowDoubleRange = !inBulk && formTails < 1e-300 && Math.exp(-logScale) === 0;
  if (belowDoubleRange) stopRule = 'below-double-range';
  const instances = stage.design.spec.instances;
  const plain = async (reason: string): Promise<HighSigmaReport> => {
    const b = await bulkFailure(design, {
      spec,
      seed,
      confidence,
      relError,
      samples: fixed,
      maxSamples,
      executor,
      mayOpenPool: ownExecutor,
      workers: wantedWorkers,
      signal: options.signal,
      onProgress: options.onProgress,
      union,
    });
    executor = b.executor;
    return plainReport(b, { spec, reason, confidence, seed, instances, started }, proposal);
  };
  try {
    if (inBulk) {
      const why = nearest < BULK_DISTANCE ? `a failure point is ${nearest.toPrecision(3)} sigma from the origin` : `the FORM failure probability is ${formTails.toPrecision(3)}`;
      return await plain(`the spec lies inside the bulk of the offset distribution (${why}; below ${BULK_DISTANCE} sigma or above ${BULK_FAILURE} importance sampling gains nothing)`);
    }
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
        tasks.push({ kind: 'importance', design, seed, chunk: chunk++, count, spec, ...mixture, logScale, ...(union ? { union: true } : {}) });
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
    if (n > 0 && (sum / n) * unscale > BULK_FAILURE) {
      // The failure points looked far enough, but the estimate says the spec is in the bulk.
      return await plain(`the importance-sampling estimate ${((sum / n) * unscale).toPrecision(3)} is above ${BULK_FAILURE}: the spec lies inside the bulk of the offset distribution`);
    }
  } finally {
    if (ownExecutor) await executor.close();
  }
  return importanceReport(
    { n, sumHigh, sumLow, hits, nonConverged, byCondition, byConditionSquares, stopRule, belowDoubleRange, unscale, ...(n > 0 ? stats() : { ps: 0, ses: 0, variance: 0 }) },
    { spec, confidence, seed, instances, started, z },
    proposal,
  );
}

function chipFigures(p: number, lo: number, hi: number, instances: number): HighSigmaReport['chip'] {
  return {
    instances,
    failure: chipFailure(p, instances),
    interval: [chipFailure(lo, instances), chipFailure(hi, instances)],
    yield: chipYieldFromFailure(p, instances),
    yieldInterval: [chipYieldFromFailure(hi, instances), chipYieldFromFailure(lo, instances)],
  };
}

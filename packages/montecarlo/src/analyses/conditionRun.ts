/**
 * The operating-conditions part of a Monte Carlo run: what each chunk is asked to do at the
 * conditions, how the chunks' results merge (in chunk order), and the report: per condition,
 * over all conditions (an instance passes only if it passes at every one), and the drift.
 */
import { conditionSummary, defaultDriftPair, InputError, namedDriftPair, type ConditionStage, type Design, type DriftPair, type Stage } from '@twinfet/core';
import type { ConditionsPlan, ConditionsResult } from '../engine/messages.js';
import { clopperPearson } from '../stats/clopperPearson.js';
import { correlation, emptyCoMoments, mergeCoMoments, type CoMoments } from '../stats/comoments.js';
import { createHistogram, mergeHistograms, quantileFromHistogram, type Histogram } from '../stats/histogram.js';
import { emptyMoments, kurtosis, mergeMoments, type Moments } from '../stats/moments.js';
import { selectQuantiles, withoutNaN } from '../stats/selectQuantiles.js';
import { sigmaIntervalBonett, sigmaIntervalChiSquare } from '../stats/sigmaInterval.js';
import { wilson } from '../stats/wilson.js';
import { linearisedEstimate, linearisedSummary } from './linearisedSummary.js';
import { BONETT_FROM } from './runReport.js';

/** Histogram bins of the drift (used for its quantiles only when the drifts are not kept). */
export const DRIFT_HISTOGRAM_BINS = 2000;
/** The drift histogram spans this many linearised drift sigmas each side. */
export const DRIFT_HISTOGRAM_SIGMAS = 10;
/** Quantile levels of the drift. */
export const DRIFT_QUANTILE_LEVELS = [0.001, 0.01, 0.5, 0.99, 0.999] as const;

/** One condition's figures in a run report. Units: the figure's (volts for an offset). */
export type ConditionResult = {
  readonly name: string;
  /** Temperature, K. */
  readonly temperature: number;
  /** Samples whose figure was evaluated at this condition. */
  readonly evaluated: number;
  readonly nonConverged: number;
  readonly offset: SigmaFigures & {
    readonly mean: number;
    readonly min: number;
    readonly max: number;
  };
  readonly yield: {
    readonly failures: number;
    readonly failuresHigh: number;
    readonly failuresLow: number;
    readonly estimate: number;
    readonly interval: readonly [number, number];
  };
  /** Of the instances failing at some condition: how many fail here, and how many fail here only. */
  readonly failing: number;
  readonly onlyFailing: number;
  /** The linearised sigma, and the yield and failure of the figure's linearised law (Gaussian, Bechhofer) at this condition. */
  readonly linearised: { readonly sigma: number; readonly law: string; readonly yield: number; readonly failure: number };
} & Readonly<Record<string, unknown>>;

/** Sigma, its interval (Bonett's as in the run report, chi-square below BONETT_FROM samples or for a constant figure) and the kurtosis. */
export interface SigmaFigures {
  readonly sigma: number;
  readonly sigmaInterval: readonly [number, number];
  readonly sigmaIntervalMethod: 'bonett' | 'chi-square';
  /** n M4 / M2^2 (null when the figure does not vary). */
  readonly kurtosis: number | null;
}

/** Per-sample drift between two conditions, (x_to - x_from) / (T_to - T_from), in the figure's unit per kelvin. */
export interface DriftReport extends SigmaFigures {
  readonly from: string;
  readonly to: string;
  /** Temperatures of the two conditions, K. */
  readonly fromTemperature: number;
  readonly toTemperature: number;
  readonly samples: number;
  readonly mean: number;
  readonly min: number;
  readonly max: number;
  readonly quantileMethod: 'exact' | 'histogram';
  readonly quantiles: readonly { readonly p: number; readonly value: number | null }[];
  /** Pearson correlation between the figure at `from` and the drift (null when either does not vary). */
  readonly correlation: number | null;
  /** First-order drift sigma from the two conditions' sensitivities. */
  readonly linearisedSigma: number;
}

/** Running totals of the conditions' chunk results. */
export interface ConditionTotals {
  readonly per: {
    moments: Moments;
    high: number;
    low: number;
    nonConverged: number;
    failing: number;
    only: number;
    figures?: Float64Array;
  }[];
  evaluatedAll: number;
  failuresAll: number;
  failuresAllHigh: number;
  failuresAllLow: number;
  drift?: { moments: Moments; pairs: CoMoments; histogram: Histogram; values?: Float64Array };
}

/** The drift pair of a run: named by the caller, else the default (or none). */
export function driftPairFor(design: Design, names: readonly [string, string] | undefined, option = 'drift'): DriftPair | null {
  if (names !== undefined) return namedDriftPair(design, names, option);
  return defaultDriftPair(design);
}

/** First-order sigma of (x_to - x_from) / (T_to - T_from): the norm of the sensitivities' difference over the span. */
export function linearisedDriftSigma(from: Stage, to: Stage): number {
  let s = 0;
  for (let j = 0; j < from.sensitivities.length; j++) s += (to.sensitivities[j]! - from.sensitivities[j]!) ** 2;
  return Math.sqrt(s) / Math.abs(to.design.temperature - from.design.temperature);
}

/** What each chunk is asked to do at the conditions. */
export function conditionsPlan(stages: readonly ConditionStage[], pair: DriftPair | null, keepDrift: boolean, keepFigures: boolean): ConditionsPlan {
  if (pair === null) return { keepFigures, drift: null };
  const a = stages[pair.from]!.stage;
  const b = stages[pair.to]!.stage;
  const sigma = linearisedDriftSigma(a, b);
  // A drift sigma of 0 (no term moves with temperature) still needs a histogram range.
  const range = sigma > 0 ? DRIFT_HISTOGRAM_SIGMAS * sigma : 1e-12;
  return {
    keepFigures,
    drift: {
      from: pair.from,
      to: pair.to,
      inverseSpan: 1 / (b.design.temperature - a.design.temperature),
      histogram: { lo: -range, hi: range, bins: DRIFT_HISTOGRAM_BINS },
      keep: keepDrift,
    },
  };
}

/** Empty totals for `count` conditions and `samples` samples. */
export function emptyConditionTotals(count: number, plan: ConditionsPlan, samples: number): ConditionTotals {
  const d = plan.drift;
  return {
    per: Array.from({ length: count }, () => ({
      moments: emptyMoments(),
      high: 0,
      low: 0,
      nonConverged: 0,
      failing: 0,
      only: 0,
      ...(plan.keepFigures ? { figures: new Float64Array(samples) } : {}),
    })),
    evaluatedAll: 0,
    failuresAll: 0,
    failuresAllHigh: 0,
    failuresAllLow: 0,
    ...(d === null
      ? {}
      : {
          drift: {
            moments: emptyMoments(),
            pairs: emptyCoMoments(),
            histogram: createHistogram(d.histogram.lo, d.histogram.hi, d.histogram.bins),
            ...(d.keep ? { values: new Float64Array(samples) } : {}),
          },
        }),
  };
}

/** Merges one chunk's result (the chunk starting at sample `offset`), in chunk order. */
export function addConditionChunk(t: ConditionTotals, r: ConditionsResult, offset: number): void {
  r.perCondition.forEach((c, i) => {
    const p = t.per[i]!;
    p.moments = mergeMoments(p.moments, c.moments);
    p.high += c.failuresHigh;
    p.low += c.failuresLow;
    p.nonConverged += c.nonConverged;
    p.failing += c.failing;
    p.only += c.onlyFailing;
    if (p.figures !== undefined && c.figures !== undefined) p.figures.set(c.figures, offset);
  });
  t.evaluatedAll += r.evaluatedAll;
  t.failuresAll += r.failuresAll;
  t.failuresAllHigh += r.failuresAllHigh;
  t.failuresAllLow += r.failuresAllLow;
  if (t.drift !== undefined && r.drift !== undefined) {
    t.drift.moments = mergeMoments(t.drift.moments, r.drift.moments);
    t.drift.pairs = mergeCoMoments(t.drift.pairs, r.drift.pairs);
    t.drift.histogram = mergeHistograms(t.drift.histogram, r.drift.histogram);
    if (t.drift.values !== undefined && r.drift.values !== undefined) t.drift.values.set(r.drift.values, offset);
  }
}

/** The statistics a run reports at the conditions. */
export interface ConditionsOutcome {
  readonly conditions: readonly ConditionResult[];
  /** The all-conditions yield: failures, estimate and interval over the samples evaluated at every condition. */
  readonly all: {
    readonly evaluated: number;
    readonly failures: number;
    readonly failuresHigh: number;
    readonly failuresLow: number;
    readonly estimate: number;
    readonly interval: readonly [number, number];
    readonly failure: { readonly estimate: number; readonly interval: readonly [number, number] };
    /** The condition with the lowest yield (ties: the larger sigma, then the name). */
    readonly worst: string;
  };
  readonly drift: DriftReport | null;
}

/** Sigma of moments (n - 1 in the denominator); 0 below two samples. */
function sd(m: Moments): number {
  return m.count < 2 ? 0 : Math.sqrt(m.m2 / (m.count - 1));
}

/** Sigma of moments of at least two samples, with its interval as the run report gives the design's. */
function sigmaFigures(m: Moments, confidence: number): SigmaFigures {
  const sigma = sd(m);
  const n = m.count;
  if (!(sigma > 0)) return { sigma, sigmaInterval: [sigma, sigma], sigmaIntervalMethod: 'chi-square', kurtosis: null };
  const k = kurtosis(m);
  if (n >= BONETT_FROM && Number.isFinite(k)) return { sigma, sigmaInterval: sigmaIntervalBonett(sigma, n, k, confidence), sigmaIntervalMethod: 'bonett', kurtosis: k };
  return { sigma, sigmaInterval: sigmaIntervalChiSquare(sigma, n, confidence), sigmaIntervalMethod: 'chi-square', kurtosis: Number.isFinite(k) ? k : null };
}

/**
 * The report at the conditions from the merged totals.
 * @throws InputError when fewer than two samples could be evaluated at some condition
 */
export function conditionsOutcome(
  design: Design,
  stages: readonly ConditionStage[],
  t: ConditionTotals,
  pair: DriftPair | null,
  spec: number,
  confidence: number,
  method: 'clopper-pearson' | 'wilson',
  done: number,
): ConditionsOutcome {
  const interval = (x: number, n: number): [number, number] => (method === 'wilson' ? wilson(x, n, confidence) : clopperPearson(x, n, confidence));
  const conditions: ConditionResult[] = stages.map((cs, i) => {
    const p = t.per[i]!;
    const n = p.moments.count;
    if (n < 2) {
      throw new InputError(`conditions[${i}]`, `only ${n} figure(s) could be evaluated at condition ${cs.condition.name} (the balance solve failed); check its bias and temperature`);
    }
    const spread = sigmaFigures(p.moments, confidence);
    const failures = p.high + p.low;
    const fi = interval(failures, n);
    const summary = linearisedSummary(cs.stage, spec);
    const lin = linearisedEstimate(summary);
    return {
      ...conditionSummary(design, cs.condition),
      name: cs.condition.name,
      temperature: cs.design.temperature,
      evaluated: n,
      nonConverged: p.nonConverged,
      offset: { mean: p.moments.mean, ...spread, min: p.moments.min, max: p.moments.max },
      yield: { failures, failuresHigh: p.high, failuresLow: p.low, estimate: 1 - failures / n, interval: [1 - fi[1], 1 - fi[0]] },
      failing: p.failing,
      onlyFailing: p.only,
      linearised: { sigma: summary.sigma, law: lin.name, yield: 1 - lin.failure, failure: lin.failure },
    };
  });
  const nAll = t.evaluatedAll;
  if (nAll < 2) throw new InputError('conditions', `only ${nAll} sample(s) could be evaluated at every condition (the balance solve failed); check the bias and temperatures`);
  const fAll = interval(t.failuresAll, nAll);
  let worst = conditions[0]!;
  for (const c of conditions.slice(1)) {
    const a = c.yield.estimate;
    const b = worst.yield.estimate;
    if (a < b || (a === b && (c.offset.sigma > worst.offset.sigma || (c.offset.sigma === worst.offset.sigma && c.name < worst.name)))) worst = c;
  }
  return {
    conditions,
    all: {
      evaluated: nAll,
      failures: t.failuresAll,
      failuresHigh: t.failuresAllHigh,
      failuresLow: t.failuresAllLow,
      estimate: 1 - t.failuresAll / nAll,
      interval: [1 - fAll[1], 1 - fAll[0]],
      failure: { estimate: t.failuresAll / nAll, interval: fAll },
      worst: worst.name,
    },
    drift: pair === null || t.drift === undefined ? null : driftReport(stages, pair, t.drift, confidence, done),
  };
}

function driftReport(stages: readonly ConditionStage[], pair: DriftPair, d: NonNullable<ConditionTotals['drift']>, confidence: number, done: number): DriftReport {
  const a = stages[pair.from]!;
  const b = stages[pair.to]!;
  const m = d.moments;
  const n = m.count;
  if (n < 2) throw new InputError('drift', `only ${n} sample(s) could be evaluated at both ${a.condition.name} and ${b.condition.name}; no drift can be given`);
  let quantileMethod: DriftReport['quantileMethod'] = 'histogram';
  let quantiles: { p: number; value: number | null }[];
  if (d.values !== undefined) {
    quantileMethod = 'exact';
    const values = selectQuantiles(withoutNaN(d.values.subarray(0, done)), DRIFT_QUANTILE_LEVELS);
    quantiles = DRIFT_QUANTILE_LEVELS.map((p, i) => ({ p, value: values[i]! }));
  } else {
    quantiles = DRIFT_QUANTILE_LEVELS.map((p) => {
      const v = quantileFromHistogram(d.histogram, p);
      return { p, value: Number.isFinite(v) ? v : null };
    });
  }
  return {
    from: a.condition.name,
    to: b.condition.name,
    fromTemperature: a.design.temperature,
    toTemperature: b.design.temperature,
    samples: n,
    mean: m.mean,
    ...sigmaFigures(m, confidence),
    min: m.min,
    max: m.max,
    quantileMethod,
    quantiles,
    correlation: correlation(d.pairs),
    linearisedSigma: linearisedDriftSigma(a.stage, b.stage),
  };
}

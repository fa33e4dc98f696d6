/**
 * The report of a Monte Carlo run, assembled from the merged chunk results: the figure's moments,
 * kurtosis and sigma interval (Bonett's, which holds for non-Gaussian figures), exact or histogram quantiles, the yield with its interval, the chip yield,
 * and the linearised picture beside it.
 */
import type { ConditionStage, Stage } from '@twinfet/core';
import { clopperPearson } from '../stats/clopperPearson.js';
import { binWidth, createHistogram, quantileFromHistogram, type Histogram } from '../stats/histogram.js';
import { selectSignedAndAbsolute, withoutNaN } from '../stats/selectQuantiles.js';
import { kurtosis, type Moments } from '../stats/moments.js';
import { normalQuantile } from '../stats/normal.js';
import { sigmaIntervalBonett, sigmaIntervalChiSquare } from '../stats/sigmaInterval.js';
import { wilson } from '../stats/wilson.js';
import { CHUNK_SIZE } from '../engine/schedule.js';
import type { HighSigmaReport } from './highSigma.js';
import type { LinearisedSummary } from './linearisedSummary.js';
import type { ConditionResult, ConditionsOutcome, DriftReport } from './conditionRun.js';
import type { ResponseSummary } from './response.js';

/** Quantile levels reported for the signed figure and for its magnitude. */
export const QUANTILE_LEVELS = [0.001, 0.01, 0.5, 0.99, 0.999] as const;
/** A Monte Carlo sigma is flagged when it is this many standard errors from the linearised one. */
export const AGREEMENT_Z = 4;
/** Fewer failures than this make the yield estimate sample-limited. */
export const FEW_FAILURES = 10;
/** From this many evaluated samples the sigma interval is Bonett's; below, the chi-square one (too few for a kurtosis). */
export const BONETT_FROM = 10;

/** Interval method for the yield. */
export type IntervalMethod = 'clopper-pearson' | 'wilson';

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
    /**
     * Interval on sigma by `sigmaIntervalMethod`: Bonett's (2006), which holds for
     * non-Gaussian offsets, from 10 evaluated samples on; chi-square below.
     */
    readonly sigmaInterval: readonly [number, number];
    readonly sigmaIntervalMethod: 'bonett' | 'chi-square';
    /** The chi-square interval (exact for Gaussian offsets only), for comparison. */
    readonly sigmaIntervalChiSquare: readonly [number, number];
    /** Sample kurtosis n M4 / M2^2 of the offset (3 for a Gaussian; larger means heavier tails). */
    readonly kurtosis: number;
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
    /**
     * With conditions: `all conditions`. The yield is then over the samples evaluated at every
     * condition (`evaluated`), an instance failing when it fails at one condition at least; the
     * high and low counts are of instances beyond +spec (or -spec) somewhere, and may overlap.
     */
    readonly over?: 'all conditions';
    readonly evaluated?: number;
    /** With conditions: the condition with the lowest yield. */
    readonly worst?: string;
  };
  readonly chip: { readonly instances: number; readonly estimate: number; readonly interval: readonly [number, number] };
  readonly importance?: HighSigmaReport;
  /**
   * With conditions: every condition's figures from the same draws. The `offset`, `histogram`
   * and `analytic` blocks above then describe the design at its own temperature and bias.
   */
  readonly conditions?: readonly ConditionResult[];
  /** With conditions at two temperatures: the per-sample drift (null when none was taken). */
  readonly drift?: DriftReport | null;
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

/** The merged chunk results and the settings of a run, as `assembleRunReport` takes them. */
export interface RunTally {
  readonly samples: number;
  readonly seed: string;
  readonly workers: number;
  readonly partial: boolean;
  readonly spec: number;
  readonly confidence: number;
  readonly method: IntervalMethod;
  readonly analytic: LinearisedSummary;
  /** Half-width of the histogram range, in the figure's unit. */
  readonly range: number;
  readonly moments: Moments;
  readonly histogram: Histogram;
  readonly failuresHigh: number;
  readonly failuresLow: number;
  readonly nonConverged: number;
  /** Every finished sample's figure (NaN where a solve failed), when kept. */
  readonly kept: Float64Array | undefined;
  readonly importance: HighSigmaReport | undefined;
  /** The stage's transfer curve at the spec, for a stage that has one. */
  readonly response?: ResponseSummary | undefined;
  /** performance.now() at the start of the run. */
  readonly started: number;
  /** With conditions: their statistics, and their compiled stages (for their warnings). */
  readonly atConditions?: ConditionsOutcome;
  readonly conditionStages?: readonly ConditionStage[];
}

/** The quantile levels paired with their values. */
function atLevels(values: readonly number[]): QuantileValue[] {
  return QUANTILE_LEVELS.map((p, i) => ({ p, value: values[i]! }));
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

/** The run report from the merged chunk results (at least two evaluated samples). */
export function assembleRunReport(stage: Stage, t: RunTally): RunReport {
  const { moments, histogram, failuresHigh, failuresLow, nonConverged, confidence, method, spec, analytic, range, samples, seed, partial, importance } = t;
  const fig = stage.definition.figure;
  const offsets = t.kept;
  const done = offsets?.length ?? 0;
  const n = moments.count;
  const sigma = Math.sqrt(moments.m2 / (n - 1));
  const z = normalQuantile(1 - (1 - confidence) / 2);
  const atAll = t.atConditions;
  // With conditions the yield is the all-conditions yield: an instance passes only if it passes at every one.
  const failures = atAll === undefined ? failuresHigh + failuresLow : atAll.all.failures;
  const nYield = atAll === undefined ? n : atAll.all.evaluated;
  const failInterval = method === 'wilson' ? wilson(failures, nYield, confidence) : clopperPearson(failures, nYield, confidence);
  const y = 1 - failures / nYield;
  const yLo = 1 - failInterval[1];
  const yHi = 1 - failInterval[0];
  const m = stage.design.spec.instances;
  const chip = (v: number): number => Math.exp(m * Math.log(v));

  let quantileMethod: 'exact' | 'histogram' = 'histogram';
  let signed: QuantileValue[];
  let absolute: QuantileValue[];
  if (offsets !== undefined) {
    quantileMethod = 'exact';
    // The non-converged samples (NaN, already counted) are left out of the quantiles.
    // Exact quantiles of the figures and of their magnitudes, as a full sort would give them;
    // the run's own minimum and maximum lay out the selection's bins.
    const kept = withoutNaN(offsets.subarray(0, done));
    const exact = selectSignedAndAbsolute(kept, QUANTILE_LEVELS, moments);
    signed = atLevels(exact.signed);
    absolute = atLevels(exact.absolute);
  } else {
    signed = histogramQuantiles(histogram);
    absolute = histogramQuantiles(folded(histogram));
  }

  const k = kurtosis(moments);
  const chiSquare = sigmaIntervalChiSquare(sigma, n, confidence);
  const bonett = n >= BONETT_FROM;
  // Standard error of s by the delta method on Var(ln s^2) = (kurtosis - (n-3)/n) / (n-1)
  // (Bonett 2006): sigma / sqrt(2 (n-1)) for a Gaussian, wider for heavy tails.
  const se = 0.5 * sigma * Math.sqrt(Math.max(0, k - (n - 3) / n) / (n - 1));
  const standardErrors = (sigma - analytic.sigma) / se;
  let yieldAgreement: NonNullable<RunReport['analytic']['yieldAgreement']> | undefined;
  if (!('gaussian' in analytic)) {
    // The law is the design's own: compare it with the design's own yield, not the all-conditions one.
    const p = analytic.yield.estimate;
    const own = 1 - (failuresHigh + failuresLow) / n;
    const zy = (own - p) / Math.sqrt((p * (1 - p)) / n);
    yieldAgreement = { difference: own - p, standardErrors: zy, consistent: Math.abs(zy) <= AGREEMENT_Z };
  }
  const response = t.response;
  const warnings = [...stage.warnings];
  if (nonConverged > 0) warnings.push(`${nonConverged} sample(s) whose balance solve did not converge were left out of every statistic`);
  for (const c of atAll?.conditions ?? []) {
    if (c.nonConverged > 0) warnings.push(`at condition ${c.name}: ${c.nonConverged} sample(s) whose balance solve did not converge were left out of its statistics and of the all-conditions yield`);
  }
  for (const cs of t.conditionStages ?? []) for (const w of cs.stage.warnings) if (!stage.warnings.includes(w)) warnings.push(`at condition ${cs.condition.name}: ${w}`);
  if (histogram.underflow + histogram.overflow > 0) {
    warnings.push(`${histogram.underflow + histogram.overflow} sample(s) fell outside the histogram range +-${range.toExponential(3)}${fig.unit === "" ? "" : ` ${fig.unit}`} (counted in every other statistic)`);
  }
  const seconds = (performance.now() - t.started) / 1000;
  const report: RunReport = {
    samples,
    evaluated: n,
    seed,
    workers: t.workers,
    chunkSize: CHUNK_SIZE,
    partial,
    design: { name: stage.design.name, topology: stage.design.topology },
    offset: {
      mean: moments.mean,
      meanInterval: [moments.mean - (z * sigma) / Math.sqrt(n), moments.mean + (z * sigma) / Math.sqrt(n)],
      sigma,
      sigmaInterval: bonett ? sigmaIntervalBonett(sigma, n, k, confidence) : chiSquare,
      sigmaIntervalMethod: bonett ? 'bonett' : 'chi-square',
      sigmaIntervalChiSquare: chiSquare,
      kurtosis: k,
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
      failuresHigh: atAll === undefined ? failuresHigh : atAll.all.failuresHigh,
      failuresLow: atAll === undefined ? failuresLow : atAll.all.failuresLow,
      estimate: y,
      interval: [yLo, yHi],
      confidence,
      method,
      failure: { estimate: failures / nYield, interval: failInterval },
      limitedBySamples: failures < FEW_FAILURES,
      ...(atAll === undefined ? {} : { over: 'all conditions' as const, evaluated: nYield, worst: atAll.all.worst }),
    },
    chip: { instances: m, estimate: chip(y), interval: [chip(yLo), chip(yHi)] },
    ...(importance === undefined ? {} : { importance }),
    ...(atAll === undefined ? {} : { conditions: atAll.conditions, drift: atAll.drift }),
    ...(response === undefined ? {} : { response }),
    nonConverged,
    seconds,
    samplesPerSecond: n / seconds,
    warnings,
    figure: { name: fig.name, label: fig.label, symbol: fig.symbol, unit: fig.unit, sided: fig.sided },
  };
  return report;
}

/**
 * The shape of the sampled figure's distribution beyond mean and sigma: its kurtosis and the
 * points of a normal-probability plot (sample quantiles against normal quantiles), from the kept
 * samples and the run's histogram (the histogram alone for runs too large to keep).
 */
import { createHistogram, normalCdf, normalPdf, normalQuantile, quantileFromHistogram, type RunReport } from '@twinfet/montecarlo';

/** Kurtosis m4 / m2^2 (3 for a Gaussian) and how it was computed. */
export interface Kurtosis {
  readonly value: number;
  /** Standard error under normality, sqrt(24 / n) (Fisher's large-sample variance of the sample kurtosis). */
  readonly standardError: number;
  readonly method: 'samples' | 'histogram';
}

/** One point of the normal-probability plot: normal quantile z (sigmas) and sample quantile (SI). */
export interface ProbabilityPoint {
  readonly z: number;
  readonly value: number;
}

/** How far a tail quantile lies from the fitted Gaussian line, in standard errors of the quantile. */
export interface TailCheck {
  /** Probability level, e.g. 0.001. */
  readonly p: number;
  /** Sample quantile, SI. */
  readonly value: number;
  /** The fitted Gaussian's quantile mean + sigma z_p, SI. */
  readonly gaussian: number;
  /** (value - gaussian) / (sigma z_p): the relative excursion beyond (> 0) or inside the line. */
  readonly relative: number;
  /** (value - gaussian) / standard error of the sample quantile. */
  readonly standardErrors: number;
}

/** The distribution study of a run. */
export interface DistributionStudy {
  readonly kurtosis: Kurtosis;
  /**
   * 'samples': the END_POINTS order statistics at each end are exact and the points between come
   * from the histogram (bins `binWidth` wide); 'histogram': every point from the histogram.
   */
  readonly probabilityPlot: { readonly method: 'samples' | 'histogram'; readonly points: readonly ProbabilityPoint[]; readonly binWidth: number };
  /** The 0.1% and 99.9% quantiles against the Gaussian line (at 1e4 samples or more). */
  readonly tails: readonly TailCheck[];
}

/** Order statistics drawn individually at each end, then about this many more spread in z. */
export const END_POINTS = 40;
const MIDDLE_POINTS = 240;
/** Tail quantiles checked against the fitted Gaussian. */
const TAIL_LEVELS = [0.001, 0.999] as const;
/** Samples needed before the 0.1% quantiles are checked (10 samples beyond each). */
const TAIL_MIN_SAMPLES = 10_000;

/** Blom's plotting position of rank i (1-based) of n: (i - 3/8) / (n + 1/4) (Blom, Statistical Estimates and Transformed Beta-Variables, 1958). */
function blom(i: number, n: number): number {
  return (i - 0.375) / (n + 0.25);
}

/** Ranks to plot: every rank near the two ends, and ranks evenly spaced in normal quantile between. */
function plotRanks(n: number): number[] {
  const ranks = new Set<number>();
  const ends = Math.min(END_POINTS, Math.floor(n / 2));
  for (let i = 1; i <= ends; i++) {
    ranks.add(i);
    ranks.add(n + 1 - i);
  }
  const zLo = normalQuantile(blom(ends, n));
  const zHi = -zLo;
  for (let k = 0; k <= MIDDLE_POINTS; k++) {
    const z = zLo + ((zHi - zLo) * k) / MIDDLE_POINTS;
    const i = Math.round(normalCdf(z) * (n + 0.25) + 0.375);
    if (i >= 1 && i <= n) ranks.add(i);
  }
  return [...ranks].sort((a, b) => a - b);
}

/** The `k` smallest finite values of `x`, ascending (one pass; insertions are rare after the first k). */
export function smallest(x: Float64Array, k: number, sign = 1): Float64Array {
  const buf = new Float64Array(k);
  let m = 0;
  for (let i = 0; i < x.length; i++) {
    const v = sign * x[i]!;
    if (!(v === v) || (m === k && v >= buf[k - 1]!)) continue;
    let j = m < k ? m++ : k - 1;
    while (j > 0 && buf[j - 1]! > v) {
      buf[j] = buf[j - 1]!;
      j--;
    }
    buf[j] = v;
  }
  const out = buf.subarray(0, m);
  return sign === 1 ? out : out.map((v) => -v);
}

/** The run's histogram as the stats module's Histogram (for its quantiles). */
function runHistogram(report: RunReport) {
  const r = report.histogram;
  const h = createHistogram(r.lo, r.hi, r.counts.length);
  h.counts.set(r.counts);
  h.underflow = r.underflow;
  h.overflow = r.overflow;
  return h;
}

/** Moments about the mean from the histogram's bin centres: [n, mean, m2, m4]. */
function histogramMoments(report: RunReport): [number, number, number, number] {
  const r = report.histogram;
  let n = 0;
  let mean = 0;
  r.counts.forEach((c, i) => {
    n += c;
    mean += c * (r.lo + (i + 0.5) * r.binWidth);
  });
  mean /= n;
  let m2 = 0;
  let m4 = 0;
  r.counts.forEach((c, i) => {
    const d = r.lo + (i + 0.5) * r.binWidth - mean;
    m2 += c * d * d;
    m4 += c * d * d * d * d;
  });
  return [n, mean, m2 / n, m4 / n];
}

/** Moments about the mean of every finite kept sample (two passes): [n, mean, m2, m4]. */
function sampleMoments(offsets: Float64Array): [number, number, number, number] {
  let n = 0;
  let mean = 0;
  for (let i = 0; i < offsets.length; i++) {
    const v = offsets[i]!;
    if (v === v) {
      n++;
      mean += v;
    }
  }
  mean /= n;
  let m2 = 0;
  let m4 = 0;
  for (let i = 0; i < offsets.length; i++) {
    const v = offsets[i]!;
    if (v === v) {
      const d2 = (v - mean) * (v - mean);
      m2 += d2;
      m4 += d2 * d2;
    }
  }
  return [n, mean, m2 / n, m4 / n];
}

/**
 * The distribution study of a run. With the samples kept (`offsets`, NaN where a solve failed):
 * the kurtosis from every sample, and the probability plot's END_POINTS smallest and largest
 * order statistics exact; the points between come from the run's histogram (within one bin
 * width, far below what the plot can show), so no sort of the samples is needed. The 0.1% and
 * 99.9% quantiles are the run's own (exact when it kept its samples).
 */
export function distributionOfRun(report: RunReport, offsets?: Float64Array): DistributionStudy {
  const h = runHistogram(report);
  const [n, , m2, m4] = offsets === undefined ? histogramMoments(report) : sampleMoments(offsets);
  const total = offsets === undefined ? n + report.histogram.underflow + report.histogram.overflow : n;
  const lows = offsets === undefined ? undefined : smallest(offsets, Math.min(END_POINTS, n));
  const highs = offsets === undefined ? undefined : smallest(offsets, Math.min(END_POINTS, n), -1);
  const points = plotRanks(total)
    .map((i) => {
      const p = blom(i, total);
      let value: number;
      if (lows !== undefined && i <= lows.length) value = lows[i - 1]!;
      else if (highs !== undefined && total - i < highs.length) value = highs[total - i]!;
      else value = quantileFromHistogram(h, p);
      return { z: normalQuantile(p), value };
    })
    .filter((q) => Number.isFinite(q.value));
  const signed = report.offset.quantiles.signed;
  const quantile = (p: number): number => signed.find((q) => q.p === p)?.value ?? Number.NaN;
  const method = offsets === undefined ? 'histogram' : 'samples';
  return {
    kurtosis: { value: m4 / (m2 * m2), standardError: Math.sqrt(24 / n), method },
    probabilityPlot: { method, points, binWidth: report.histogram.binWidth },
    tails: tailChecks(report, quantile, total),
  };
}

/**
 * The tail quantiles against the fitted line. The standard error of a sample p-quantile is
 * sqrt(p (1 - p) / n) / phi(z_p) sigma for a Gaussian (the asymptotic variance of a sample
 * quantile; David & Nagaraja, Order Statistics, 3rd ed., 2003, sec. 10.3).
 */
function tailChecks(report: RunReport, quantile: (p: number) => number, n: number): TailCheck[] {
  if (n < TAIL_MIN_SAMPLES) return [];
  const { mean, sigma } = report.offset;
  return TAIL_LEVELS.flatMap((p) => {
    const value = quantile(p);
    if (!Number.isFinite(value)) return [];
    const z = normalQuantile(p);
    const gaussian = mean + sigma * z;
    const se = (Math.sqrt((p * (1 - p)) / n) / normalPdf(z)) * sigma;
    return [{ p, value, gaussian, relative: (value - gaussian) / (sigma * z), standardErrors: (value - gaussian) / se }];
  });
}

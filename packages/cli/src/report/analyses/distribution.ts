/**
 * The shape of the sampled figure's distribution beyond mean and sigma: its kurtosis and the
 * points of a normal-probability plot (sample quantiles against normal quantiles), from every
 * kept sample or, for runs too large to keep, from the run's histogram.
 */
import { createHistogram, exactQuantile, normalCdf, normalPdf, normalQuantile, quantileFromHistogram, type RunReport } from '@twinfet/montecarlo';

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
  readonly probabilityPlot: { readonly method: 'samples' | 'histogram'; readonly points: readonly ProbabilityPoint[] };
  /** The 0.1% and 99.9% quantiles against the Gaussian line (at 1e4 samples or more). */
  readonly tails: readonly TailCheck[];
}

/** Order statistics drawn individually at each end, then about this many more spread in z. */
const END_POINTS = 40;
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

/**
 * Kurtosis and probability-plot points from the kept samples of a run (NaN entries, where a
 * solve failed, are left out as in every other statistic).
 */
export function distributionFromSamples(report: RunReport, offsets: Float64Array): DistributionStudy {
  const kept = new Float64Array(offsets.length);
  let n = 0;
  for (let i = 0; i < offsets.length; i++) {
    const x = offsets[i]!;
    if (x === x) kept[n++] = x;
  }
  const sorted = kept.subarray(0, n).sort();
  let mean = 0;
  for (let i = 0; i < n; i++) mean += sorted[i]!;
  mean /= n;
  let m2 = 0;
  let m4 = 0;
  for (let i = 0; i < n; i++) {
    const d = sorted[i]! - mean;
    const d2 = d * d;
    m2 += d2;
    m4 += d2 * d2;
  }
  m2 /= n;
  m4 /= n;
  const points = plotRanks(n).map((i) => ({ z: normalQuantile(blom(i, n)), value: sorted[i - 1]! }));
  return {
    kurtosis: { value: m4 / (m2 * m2), standardError: Math.sqrt(24 / n), method: 'samples' },
    probabilityPlot: { method: 'samples', points },
    tails: tailChecks(report, (p) => exactQuantile(sorted, p), n),
  };
}

/** The same from the run's histogram (bin centres; values outside its range are left out). */
export function distributionFromHistogram(report: RunReport): DistributionStudy {
  const r = report.histogram;
  const h = createHistogram(r.lo, r.hi, r.counts.length);
  h.counts.set(r.counts);
  h.underflow = r.underflow;
  h.overflow = r.overflow;
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
  m2 /= n;
  m4 /= n;
  const total = n + r.underflow + r.overflow;
  const points = plotRanks(total)
    .map((i) => {
      const p = blom(i, total);
      return { z: normalQuantile(p), value: quantileFromHistogram(h, p) };
    })
    .filter((q) => Number.isFinite(q.value));
  return {
    kurtosis: { value: m4 / (m2 * m2), standardError: Math.sqrt(24 / n), method: 'histogram' },
    probabilityPlot: { method: 'histogram', points },
    tails: tailChecks(report, (p) => quantileFromHistogram(h, p), total),
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

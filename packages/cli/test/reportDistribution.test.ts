import { exactQuantile, normalCdf, normalQuantile, simulateWithSamples, type RunReport } from '@twinfet/montecarlo';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { linearSimple } from '../../montecarlo/test/designs.js';
import { distributionOfRun, END_POINTS, smallest } from '../src/report/analyses/distribution.js';

/**
 * A run report holding what the distribution study reads, made from `data` directly: a
 * 2000-bin histogram over the data's range and the exact type-7 quantiles.
 */
function reportOf(data: Float64Array): RunReport {
  const finite = Float64Array.from(data.filter((x) => x === x)).sort();
  const lo = finite[0]! - 1e-9;
  const hi = finite[finite.length - 1]! + 1e-9;
  const bins = 2000;
  const binWidth = (hi - lo) / bins;
  const counts = new Array<number>(bins).fill(0);
  for (const x of finite) counts[Math.min(bins - 1, Math.floor((x - lo) / binWidth))]!++;
  const n = finite.length;
  const mean = finite.reduce((a, b) => a + b, 0) / n;
  const sigma = Math.sqrt(finite.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1));
  const levels = [0.001, 0.01, 0.5, 0.99, 0.999];
  return {
    evaluated: n,
    offset: { mean, sigma, quantileMethod: 'exact', quantiles: { signed: levels.map((p) => ({ p, value: exactQuantile(finite, p) })), absolute: [] } },
    histogram: { lo, hi, binWidth, counts, underflow: 0, overflow: 0 },
  } as unknown as RunReport;
}

describe('distribution shape', () => {
  it('gives the kurtosis of two equal point masses as 1 and of a discrete uniform as its closed form', () => {
    // {-1, +1}: m2 = 1, m4 = 1, so m4 / m2^2 = 1 exactly.
    const two = Float64Array.from({ length: 1000 }, (_, i) => (i % 2 === 0 ? -1 : 1));
    expect(distributionOfRun(reportOf(two), two).kurtosis.value).toBe(1);
    // 1..n equally weighted: kurtosis = 3 - 6(n^2 + 1) / (5(n^2 - 1)) = (3/5)(3n^2 - 7)/(n^2 - 1),
    // the discrete uniform's excess kurtosis (from memory; it follows from the power sums of 1..n).
    const n = 100;
    const uni = Float64Array.from({ length: n }, (_, i) => i + 1);
    expect(distributionOfRun(reportOf(uni), uni).kurtosis.value).toBeCloseTo((0.6 * (3 * n * n - 7)) / (n * n - 1), 12);
  });

  it('leaves out NaN samples (failed solves) as every other statistic does', () => {
    const data = Float64Array.from({ length: 1000 }, (_, i) => (i % 2 === 0 ? -1 : i % 3 === 0 ? Number.NaN : 1));
    const s = distributionOfRun(reportOf(data), data);
    expect(Number.isFinite(s.kurtosis.value)).toBe(true);
    expect(s.probabilityPlot.points.every((p) => Number.isFinite(p.value))).toBe(true);
  });

  it('finds the k smallest and largest values without sorting (identity with a sort)', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 300 }), fc.integer({ min: 1, max: 50 }), (xs, k) => {
        const a = Float64Array.from(xs);
        const sorted = Float64Array.from(xs).sort();
        const m = Math.min(k, xs.length);
        expect(Array.from(smallest(a, k))).toEqual(Array.from(sorted.subarray(0, m)));
        expect(Array.from(smallest(a, k, -1))).toEqual(Array.from(sorted.subarray(sorted.length - m)).reverse());
      }),
      { numRuns: 200, seed: 4040 },
    );
  });

  it('plots rank i of n at Blom\'s position (i - 3/8) / (n + 1/4) (Blom 1958): exact at the ends, within a bin between', () => {
    const data = Float64Array.from({ length: 5000 }, (_, i) => (i * 7919) % 5000); // 0..4999, shuffled
    const report = reportOf(data);
    const pts = distributionOfRun(report, data).probabilityPlot.points;
    // The first point is the smallest sample, at z = Phi^-1(0.625 / 5000.25); exact to the quantile function.
    expect(pts[0]!.value).toBe(0);
    expect(pts[0]!.z).toBeCloseTo(normalQuantile(0.625 / 5000.25), 14);
    expect(pts.at(-1)!.value).toBe(4999);
    expect(pts.at(-1)!.z).toBeCloseTo(-normalQuantile(0.625 / 5000.25), 10);
    expect(pts.slice(0, END_POINTS).map((p) => p.value)).toEqual(Array.from({ length: END_POINTS }, (_, i) => i));
    expect(pts.slice(-END_POINTS).map((p) => p.value)).toEqual(Array.from({ length: END_POINTS }, (_, i) => 4960 + i));
    // Between the ends, the histogram quantile of rank i lies within one bin (plus the one-rank
    // step of the data) of the order statistic i - 1 (the data are the integers 0..4999).
    for (const p of pts.slice(END_POINTS, -END_POINTS)) {
      const rank = Math.round(normalCdf(p.z) * 5000.25 + 0.375);
      expect(Math.abs(p.value - (rank - 1))).toBeLessThanOrEqual(report.histogram.binWidth + 1);
    }
    for (let i = 1; i < pts.length; i++) expect(pts[i]!.z).toBeGreaterThan(pts[i - 1]!.z);
    expect(pts.length).toBeGreaterThan(250);
    expect(pts.length).toBeLessThan(330);
  });

  it('finds Gaussian tails Gaussian: a near-linear pair has kurtosis 3 and tail quantiles on the line', async () => {
    const out = await simulateWithSamples(linearSimple, { samples: 400_000, seed: 'shape', workers: 1, keepOffsets: true });
    const study = distributionOfRun(out.report, out.offsets!);
    const k = study.kurtosis;
    // The sample kurtosis of Gaussian data has standard error sqrt(24/n) (Fisher); 4 standard errors.
    expect(k.standardError).toBeCloseTo(Math.sqrt(24 / 400_000), 15);
    expect(Math.abs(k.value - 3)).toBeLessThan(4 * k.standardError);
    expect(study.tails.map((t) => t.p)).toEqual([0.001, 0.999]);
    for (const t of study.tails) expect(Math.abs(t.standardErrors)).toBeLessThan(4);
    // Without the samples the histogram (2000 bins over +-10 sigma, bin 0.01 sigma) gives the same
    // kurtosis: binning moves m4/m2^2 by about 2 (h/sigma)^2 / 12 relative (Sheppard), 2e-5 here.
    const fromHistogram = distributionOfRun(out.report);
    expect(fromHistogram.kurtosis.method).toBe('histogram');
    expect(Math.abs(fromHistogram.kurtosis.value - k.value)).toBeLessThan(1e-3);
  });

  it('checks no tail below 10000 samples (too few beyond the 0.1% quantiles)', () => {
    const data = Float64Array.from({ length: 5000 }, (_, i) => i);
    expect(distributionOfRun(reportOf(data), data).tails).toEqual([]);
  });
});

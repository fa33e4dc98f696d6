import { simulateWithSamples, normalQuantile, type RunReport } from '@twinfet/montecarlo';
import { describe, expect, it } from 'vitest';
import { linearSimple } from '../../montecarlo/test/designs.js';
import { distributionFromHistogram, distributionFromSamples } from '../src/report/analyses/distribution.js';

/** A run report with only the fields the distribution study reads. */
function fakeReport(mean: number, sigma: number): RunReport {
  return { offset: { mean, sigma } } as unknown as RunReport;
}

describe('distribution shape', () => {
  it('gives the kurtosis of two equal point masses as 1 and of a discrete uniform as its closed form', () => {
    // {-1, +1}: m2 = 1, m4 = 1, so m4 / m2^2 = 1 exactly.
    const two = Float64Array.from({ length: 1000 }, (_, i) => (i % 2 === 0 ? -1 : 1));
    expect(distributionFromSamples(fakeReport(0, 1), two).kurtosis.value).toBe(1);
    // 1..n equally weighted: kurtosis = 3 - 6(n^2 + 1) / (5(n^2 - 1)) = (3/5)(3n^2 - 7)/(n^2 - 1),
    // the discrete uniform's excess kurtosis (from memory; it follows from the power sums of 1..n).
    const n = 100;
    const uni = Float64Array.from({ length: n }, (_, i) => i + 1);
    expect(distributionFromSamples(fakeReport(50.5, 29), uni).kurtosis.value).toBeCloseTo((0.6 * (3 * n * n - 7)) / (n * n - 1), 12);
  });

  it('leaves out NaN samples (failed solves) as every other statistic does', () => {
    const two = Float64Array.from({ length: 1000 }, (_, i) => (i % 2 === 0 ? -1 : i % 3 === 0 ? Number.NaN : 1));
    const s = distributionFromSamples(fakeReport(0, 1), two);
    expect(Number.isFinite(s.kurtosis.value)).toBe(true);
    expect(s.probabilityPlot.points.every((p) => Number.isFinite(p.value))).toBe(true);
  });

  it('plots rank i of n at the normal quantile of Blom\'s position (i - 3/8) / (n + 1/4) (Blom 1958)', () => {
    const data = Float64Array.from({ length: 5000 }, (_, i) => i);
    const pts = distributionFromSamples(fakeReport(2500, 1443), data).probabilityPlot.points;
    // The first point is the smallest sample, at z = Phi^-1(0.625 / 5000.25); exact to the quantile function.
    expect(pts[0]!.value).toBe(0);
    expect(pts[0]!.z).toBeCloseTo(normalQuantile(0.625 / 5000.25), 14);
    expect(pts.at(-1)!.value).toBe(4999);
    expect(pts.at(-1)!.z).toBeCloseTo(-normalQuantile(0.625 / 5000.25), 10);
    // Increasing in both coordinates, every end rank drawn, a few hundred points in all.
    for (let i = 1; i < pts.length; i++) {
      expect(pts[i]!.z).toBeGreaterThan(pts[i - 1]!.z);
      expect(pts[i]!.value).toBeGreaterThan(pts[i - 1]!.value);
    }
    expect(pts.slice(0, 40).map((p) => p.value)).toEqual(Array.from({ length: 40 }, (_, i) => i));
    expect(pts.length).toBeGreaterThan(250);
    expect(pts.length).toBeLessThan(330);
  });

  it('finds Gaussian tails Gaussian: a near-linear pair has kurtosis 3 and tail quantiles on the line', async () => {
    const out = await simulateWithSamples(linearSimple, { samples: 400_000, seed: 'shape', workers: 1, keepOffsets: true });
    const fromSamples = distributionFromSamples(out.report, out.offsets!);
    const k = fromSamples.kurtosis;
    // The sample kurtosis of Gaussian data has standard error sqrt(24/n) (Fisher); 4 standard errors.
    expect(k.standardError).toBeCloseTo(Math.sqrt(24 / 400_000), 15);
    expect(Math.abs(k.value - 3)).toBeLessThan(4 * k.standardError);
    expect(fromSamples.tails.map((t) => t.p)).toEqual([0.001, 0.999]);
    for (const t of fromSamples.tails) expect(Math.abs(t.standardErrors)).toBeLessThan(4);
    // The histogram (2000 bins over +-10 sigma, bin 0.01 sigma) gives the same kurtosis: binning
    // moves m4/m2^2 by about 2 (h/sigma)^2 / 12 relative (Sheppard's corrections), 2e-5 here.
    const fromHistogram = distributionFromHistogram(out.report);
    expect(fromHistogram.kurtosis.method).toBe('histogram');
    expect(Math.abs(fromHistogram.kurtosis.value - k.value)).toBeLessThan(1e-3);
    // Histogram quantiles are within one bin width (0.01 sigma) of the exact ones.
    const bin = out.report.histogram.binWidth;
    fromHistogram.tails.forEach((t, i) => expect(Math.abs(t.value - fromSamples.tails[i]!.value)).toBeLessThan(2 * bin));
  });

  it('checks no tail below 10000 samples (too few beyond the 0.1% quantiles)', () => {
    const data = Float64Array.from({ length: 5000 }, (_, i) => i);
    expect(distributionFromSamples(fakeReport(2500, 1443), data).tails).toEqual([]);
  });
});

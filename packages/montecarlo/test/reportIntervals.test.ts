/**
 * The intervals of a Monte Carlo report (mean, sigma, yield, chip yield) against computations
 * made here from the kept samples and the counts, by the textbook formulas, with quantiles
 * from tables or from an independent implementation: none goes through the library's own
 * statistics functions. All runs are seeded and in this thread (workers: 1).
 */
import { compileStage, linearisedSigma } from '@twinfet/core';
import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import { simulate, simulateWithSamples } from '../src/analyses/simulate.js';
import { bigMirror, bigSimple } from './designs.js';

describe('the report\'s intervals against independent computations', () => {
  // The kept offsets are summed here, in the test, by the textbook two-pass formulas, and the
  // normal quantiles come from the table (Abramowitz & Stegun 1964, table 26.1 / 26.2:
  // z(0.975) = 1.959963984540054, z(0.995) = 2.5758293035489004), not from the library.
  it.each([
    [0.95, 1.959963984540054],
    [0.99, 2.5758293035489004],
  ] as const)('mean interval at %f: mean +- z s / sqrt(n) (1e-12 relative: rounding of the sums)', async (confidence, z) => {
    const { report, offsets } = await simulateWithSamples(bigSimple, { samples: 150_000, seed: 'mean-ci', workers: 1, confidence });
    const x = offsets!;
    const n = x.length;
    let sum = 0;
    for (const v of x) sum += v;
    const mean = sum / n;
    let ss = 0;
    for (const v of x) ss += (v - mean) ** 2;
    const s = Math.sqrt(ss / (n - 1));
    const half = (z * s) / Math.sqrt(n);
    const [lo, hi] = report.offset.meanInterval;
    expect(report.evaluated).toBe(n);
    // The interval is about the mean (the mean itself is of order 1e-3 sigma here, so it is
    // compared to the half-width's scale).
    expect(Math.abs(report.offset.mean - mean)).toBeLessThan(1e-12 * s);
    expect(Math.abs((hi - lo) / 2 / half - 1)).toBeLessThan(1e-12);
    expect(Math.abs((hi + lo) / 2 - mean)).toBeLessThan(1e-12 * s);
    expect(Math.abs(report.offset.sigma / s - 1)).toBeLessThan(1e-12);
  });

  it('sigma interval: s sqrt((n - 1) / chi2inv) with the chi-square quantiles of jStat (1e-12 relative)', async () => {
    const { report, offsets } = await simulateWithSamples(bigSimple, { samples: 5000, seed: 'sigma-ci', workers: 1 });
    const n = offsets!.length;
    const s = report.offset.sigma;
    // chi-square interval on (n - 1) s^2 / sigma^2 (e.g. Johnson & Kotz, Continuous Univariate
    // Distributions 1, ch. 18); jStat is an independent implementation of the quantile.
    const lo = s * Math.sqrt((n - 1) / jStat.chisquare.inv(0.975, n - 1));
    const hi = s * Math.sqrt((n - 1) / jStat.chisquare.inv(0.025, n - 1));
    // The chi-square interval is kept by name beside the reported (Bonett) one.
    expect(Math.abs(report.offset.sigmaIntervalChiSquare[0] / lo - 1)).toBeLessThan(1e-12);
    expect(Math.abs(report.offset.sigmaIntervalChiSquare[1] / hi - 1)).toBeLessThan(1e-12);
  });

  it('yield and chip intervals: Clopper-Pearson from the binomial tails, mapped through Y^M (1e-12 relative)', async () => {
    const design = { ...bigMirror, spec: { offset: 2.5 * linearisedSigma(compileStage(bigMirror)), instances: 4 } };
    const r = await simulate(design, { samples: 20_000, seed: 'yield-ci', workers: 1 });
    const n = r.evaluated;
    const x = r.yield.failures;
    expect(x).toBe(r.yield.failuresHigh + r.yield.failuresLow);
    expect(x).toBeGreaterThan(10);
    // Clopper & Pearson (Biometrika 26(4), 1934): the lower bound solves P(X >= x; p) = a/2, the
    // upper P(X <= x; p) = a/2, X binomial(n, p). Solved here by bisection on the binomial sum
    // written out term by term in logs (200 halvings). Both solve the same equation; the sums'
    // rounding (~1e-16 per term, 1e-14 after 1 - cdf) moves the root by ~1e-13: bound 1e-12.
    const cdf = (k: number, p: number): number => {
      let log = n * Math.log1p(-p);
      let sum = Math.exp(log);
      for (let j = 1; j <= k; j++) {
        log += Math.log(n - j + 1) - Math.log(j) + Math.log(p) - Math.log1p(-p);
        sum += Math.exp(log);
      }
      return sum;
    };
    const root = (f: (p: number) => number): number => {
      let a = 0;
      let b = 1;
      for (let i = 0; i < 200; i++) {
        const m = 0.5 * (a + b);
        if (f(m) > 0) a = m;
        else b = m;
      }
      return 0.5 * (a + b);
    };
    const pLo = root((p) => 1 - cdf(x - 1, p) < 0.025 ? 1 : -1);
    const pHi = root((p) => cdf(x, p) > 0.025 ? 1 : -1);
    expect(Math.abs(r.yield.failure.interval[0] / pLo - 1)).toBeLessThan(1e-12);
    expect(Math.abs(r.yield.failure.interval[1] / pHi - 1)).toBeLessThan(1e-12);
    expect(r.yield.estimate).toBe(1 - x / n);
    expect(Math.abs(r.yield.interval[0] - (1 - pHi))).toBeLessThan(1e-12);
    expect(Math.abs(r.yield.interval[1] - (1 - pLo))).toBeLessThan(1e-12);
    // Chip of M = 4 instances: Y^4 at each end (exact to rounding, 1e-12).
    expect(Math.abs(r.chip.estimate / (1 - x / n) ** 4 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(r.chip.interval[0] / (1 - pHi) ** 4 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(r.chip.interval[1] / (1 - pLo) ** 4 - 1)).toBeLessThan(1e-12);
  });
});

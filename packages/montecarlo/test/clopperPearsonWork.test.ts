/**
 * The cost of the Clopper-Pearson bounds: binomial-tail evaluations of the bracketed Newton solve,
 * continued-fraction (Lentz) terms and summed binomial terms, counted by clopperPearson.ts itself
 * (takeBoundWork). Every bound stops on its own tolerance, so a spoilt starting guess, a wrong
 * Newton slope, a dropped closed form or a moved switch between the tail's representations
 * changes how much work a bound takes, not the bound (the reference tests in
 * clopperPearson.test.ts and binomialEdges.test.ts hold the values). This file holds the work.
 *
 * Why about two tail evaluations per bound: jStat's Beta quantile (the starting guess) is
 * accurate to ~1e-7 relative or better, and Newton's method doubles the correct digits per step,
 * so the first step lands within the 1e-14 stop and the second evaluation confirms it. The
 * closed forms (x = 0 for the upper bound, x = n for the lower) take no evaluation at all.
 * The budgets are cost budgets (common practice, no source), set about 5% above the counts
 * measured on this fixed grid (the counts are deterministic: same inputs, same integers).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { clopperPearson, oneSidedUpper, takeBoundWork } from '../src/stats/clopperPearson.js';

/** 60-digit bounds by bisection on exact binomial sums: test/fixtures/clopper_pearson_fallback.py. */
const fallback = JSON.parse(readFileSync(new URL('../../../test/fixtures/clopper-pearson-fallback.json', import.meta.url), 'utf8')) as {
  failures: number;
  n: number;
  confidence: number;
  lower: string;
  upper: string;
  oneSidedUpper: string;
}[];

const rel = (actual: number, expected: string): number => Math.abs(actual - Number(expected)) / Number(expected);

/** Failure counts from none to all, through the small-count, small-p and near-half regions. */
function failureCounts(n: number): number[] {
  const at = [0, 1, 3, 10, 30, 0.003 * n, 0.03 * n, 0.1 * n, n / 2, n - 3, n - 1, n];
  return [...new Set(at.map(Math.floor))].filter((f) => f >= 0 && f <= n);
}

interface Work {
  tails: number;
  fractionTerms: number;
  sumTerms: number;
  maxTails: number;
  bounds: number;
}

/** Work of every two-sided interval and one-sided bound on the grid for n, at 95% and 99.73%. */
function gridWork(n: number): Work {
  const total: Work = { tails: 0, fractionTerms: 0, sumTerms: 0, maxTails: 0, bounds: 0 };
  takeBoundWork();
  for (const confidence of [0.95, 0.9973]) {
    for (const failures of failureCounts(n)) {
      for (const solve of [() => clopperPearson(failures, n, confidence), () => oneSidedUpper(failures, n, confidence)]) {
        solve();
        const w = takeBoundWork();
        total.tails += w.tails;
        total.fractionTerms += w.fractionTerms;
        total.sumTerms += w.sumTerms;
        total.maxTails = Math.max(total.maxTails, w.tails);
      }
      // Bounds solved or closed: the lower bound unless failures = 0, two upper bounds unless failures = n.
      total.bounds += (failures > 0 ? 1 : 0) + (failures < n ? 2 : 0);
    }
  }
  return total;
}

describe('clopperPearson: work per bound (cost budget)', () => {
  // Measured on this grid: tails 69 / 87 / 108 / 108, fraction terms 279 / 935 / 1925 / 2557,
  // summed terms 0 / 20 / 1224 / 27540 for n = 20, 1e3, 1e5, 1e8; at most 4 tail evaluations
  // for any one call (two bounds).
  it.each([
    [20, 73, 295, 0],
    [1000, 92, 985, 22],
    [100000, 114, 2025, 1290],
    [1e8, 114, 2690, 28920],
  ])('n = %s: at most %s tail evaluations, %s fraction terms, %s summed terms', (n, tails, fraction, sum) => {
    const w = gridWork(n);
    expect(w.tails).toBeLessThanOrEqual(tails);
    expect(w.fractionTerms).toBeLessThanOrEqual(fraction);
    expect(w.sumTerms).toBeLessThanOrEqual(sum);
    // From n = 1e3 on the grid has upper bounds below p = 0.01, whose lower tails are summed.
    if (n >= 1000) expect(w.sumTerms).toBeGreaterThan(0);
    else expect(w.sumTerms).toBe(0);
    expect(w.maxTails).toBeLessThanOrEqual(4);
    // Every call that solves a bound evaluates the tail at least once; the closed forms do not.
    expect(w.tails).toBeGreaterThan(0);
    expect(w.tails).toBeLessThan(2 * w.bounds);
  });

  it('the closed forms take no tail evaluation: 0 failures (upper) and n failures (lower)', () => {
    takeBoundWork();
    const [lo0, hi0] = clopperPearson(0, 1000, 0.95);
    const [loN, hiN] = clopperPearson(1000, 1000, 0.95);
    const up0 = oneSidedUpper(0, 1e8, 0.9973);
    expect(takeBoundWork()).toEqual({ tails: 0, fractionTerms: 0, sumTerms: 0 });
    // (1 - p)^n = 0.025 and p^n = 0.025 (Clopper & Pearson 1934 at the edges): hi = 1 - 0.025^(1/n).
    expect([lo0, hiN]).toEqual([0, 1]);
    expect(Math.abs(hi0 - -Math.expm1(Math.log(0.025) / 1000))).toBeLessThanOrEqual(1e-18);
    expect(Math.abs(loN - Math.exp(Math.log(0.025) / 1000))).toBeLessThanOrEqual(1e-16);
    expect(Math.abs(up0 - -Math.expm1(Math.log(1 - 0.9973) / 1e8)) / up0).toBeLessThanOrEqual(1e-15);
  });

  it('counts the work of one solved bound and resets on reading', () => {
    takeBoundWork();
    oneSidedUpper(5, 1000, 0.95);
    const w = takeBoundWork();
    expect(w.tails).toBeGreaterThanOrEqual(1);
    expect(w.fractionTerms + w.sumTerms).toBeGreaterThanOrEqual(w.tails);
    expect(takeBoundWork()).toEqual({ tails: 0, fractionTerms: 0, sumTerms: 0 });
  });
});

describe('clopperPearson: where jStat gives no usable start (the solve starts at 1/2 and bisects)', () => {
  // At confidence 1 - 2^-53 the upper bound's quantile argument 1 - a/2 rounds to 1 (jStat
  // returns 1); at n = 1e15 and 2^53 - 1 with 10 failures jStat returns NaN, and with 1 or 3
  // failures a start 14 or 4 times too high. Tolerance 1e-12 relative, as for the 60-digit
  // table of clopperPearson.test.ts: the tails hold ~1e-13 relative (Loader's saddle point and
  // the continued fraction), and a bound moves by the tail's relative error divided by
  // |d ln tail / d ln p|, which is at least 1 at every bound here (measured within 5e-16).
  it.each(fallback.map((c) => [c.failures, c.n, c.confidence, c] as const))(
    '%s failures in %s at confidence %s: both bounds and the one-sided bound to 1e-12',
    (failures, n, confidence, c) => {
      const [lo, hi] = clopperPearson(failures, n, confidence);
      expect(rel(lo, c.lower)).toBeLessThan(1e-12);
      expect(rel(hi, c.upper)).toBeLessThan(1e-12);
      expect(rel(oneSidedUpper(failures, n, confidence), c.oneSidedUpper)).toBeLessThan(1e-12);
    },
  );

  it('the fallback costs tens of tail evaluations, not hundreds (cost budget)', () => {
    // Measured: 35, 58, 20, 19, 113 and 120 tail evaluations for the six cases above (the two-
    // sided interval and the one-sided bound), 365 in all; budget 375, 2.7% above (common
    // practice, no source). A bisection of [0, 1] to a root near 1e-15 at 1e-15 relative width
    // takes about 100 halvings per bound, so the Newton steps inside the bracket do the work;
    // halving arithmetically where the bracket's lower end is above 0 (instead of taking the
    // geometric mean) costs 17 more evaluations on the 2^53 - 1 case, 382 in all.
    takeBoundWork();
    for (const c of fallback) {
      clopperPearson(c.failures, c.n, c.confidence);
      oneSidedUpper(c.failures, c.n, c.confidence);
    }
    const w = takeBoundWork();
    expect(w.tails).toBeLessThanOrEqual(375);
    // More than the two evaluations per bound of a good start (six cases, three bounds each):
    // the fallback path is the one taken.
    expect(w.tails).toBeGreaterThan(6 * 3 * 2);
  });
});

/**
 * The binomial tails and Clopper-Pearson bounds at the edges of their branches: the closed
 * forms at k = 0, k = n - 1, k < 0, k >= n, p = 0 and p = 1, and the small-n sums on both sides
 * of the Stirling-error switch (n <= 15 exact factorials, n >= 16 the series). References:
 * test/fixtures/binomial-edges.json, computed in 60 digits by test/fixtures/binomial_edges.py
 * (mpmath 1.3.0), and the closed forms written out below.
 */
import { describe, expect, it } from 'vitest';
import { binomialCdf, binomialSurvival, clopperPearson, oneSidedUpper } from '../src/stats/clopperPearson.js';
import { readFileSync } from 'node:fs';

interface Edge { k: number; n: number; p: number; value: string }
const ref = JSON.parse(readFileSync(new URL('../../../test/fixtures/binomial-edges.json', import.meta.url), 'utf8')) as {
  cdf0_sum: Edge;
  cdf0_fraction: Edge;
  sfTop: Edge;
  smallN: { k: number; n: number; p: number; cdf: string; sf: string }[];
  allFail: { n: number; confidence: number; lower: string };
};

const rel = (a: number, b: string): number => Math.abs(a / Number(b) - 1);

describe('binomial tails: closed forms at the edges (binomial_edges.py)', () => {
  it('P(X <= 0) = (1 - p)^n on the summed tail, n = 1e9, p = 1e-8, to 1e-13 relative', () => {
    // Through q = fl(1 - p) instead of log1p(-p) the exponent n log q would carry
    // n p * 5e-9 = 5e-8 relative error (the rounding of 1 - p, printed by the script).
    const c = ref.cdf0_sum;
    expect(rel(binomialCdf(c.k, c.n, c.p), c.value)).toBeLessThan(1e-13);
  });

  it('P(X <= 0) = (1 - p)^n on the fraction in q, n = 5e4, p = 0.0123, to 2e-13 relative', () => {
    // Measured error 2.7e-14 (the fraction and the exp of a -615 exponent); taking the power
    // through fl(1 - p) would add n * 2.3e-17 = 1.1e-12.
    const c = ref.cdf0_fraction;
    expect(rel(binomialCdf(c.k, c.n, c.p), c.value)).toBeLessThan(2e-13);
  });

  it('P(X > n - 1) = p^n at n = 20, p = 1e-6, to 1e-13 relative', () => {
    // Through log1p(-fl(1 - p)) the power would carry 20 * 2.9e-11 = 6e-10 relative error.
    const c = ref.sfTop;
    expect(rel(binomialSurvival(c.k, c.n, c.p), c.value)).toBeLessThan(1e-13);
  });

  it('k < 0, k >= n, p = 0 and p = 1 give the exact 0 and 1 of the definition', () => {
    // P(X <= -1) = 0, P(X <= n) = 1; p = 0: X = 0 surely; p = 1: X = n surely.
    expect(binomialCdf(-1, 10, 0.3)).toBe(0);
    expect(binomialSurvival(-1, 10, 0.3)).toBe(1);
    expect(binomialCdf(10, 10, 0.3)).toBe(1);
    expect(binomialSurvival(10, 10, 0.3)).toBe(0);
    expect(binomialCdf(3, 10, 0)).toBe(1);
    expect(binomialSurvival(3, 10, 0)).toBe(0);
    expect(binomialCdf(3, 10, 1)).toBe(0);
    expect(binomialSurvival(3, 10, 1)).toBe(1);
    // n = 0 trials is allowed: X = 0, so P(X <= 0) = 1.
    expect(binomialCdf(0, 0, 0.5)).toBe(1);
  });

  it('small n on both sides of the Stirling switch (n = 15 | 16..20): exact sums to 1e-14 relative', () => {
    // Measured errors are below 4.5e-15. Dropping or mis-signing the last Stirling-series term
    // 1/(1188 n^9) (A&S 6.1.40) moves the probability by 2.4e-14 at n = 16.
    for (const c of ref.smallN) {
      expect(rel(binomialCdf(c.k, c.n, c.p), c.cdf)).toBeLessThan(1e-14);
      expect(rel(binomialSurvival(c.k, c.n, c.p), c.sf)).toBeLessThan(1e-14);
    }
  });
});

describe('Clopper-Pearson at x = n (Clopper & Pearson 1934)', () => {
  it('10 failures in 10: [0.025^(1/10), 1] at 95%, to 1e-14 relative; one-sided upper bound 1', () => {
    const [lo, hi] = clopperPearson(ref.allFail.n, ref.allFail.n, ref.allFail.confidence);
    expect(rel(lo, ref.allFail.lower)).toBeLessThan(1e-14);
    expect(hi).toBe(1);
    expect(oneSidedUpper(10, 10, 0.95)).toBe(1);
  });
});

describe('binomial and Clopper-Pearson argument checks name the function and the argument', () => {
  it.each([
    ['binomialCdf', binomialCdf],
    ['binomialSurvival', binomialSurvival],
  ] as const)('%s', (name, fn) => {
    for (const n of [-1, 1.5, Number.NaN, 2 ** 53]) expect(() => fn(0, n, 0.5)).toThrow(new RegExp(`^${name}: n must`));
    for (const k of [0.5, Number.NaN]) expect(() => fn(k, 10, 0.5)).toThrow(new RegExp(`^${name}: k must`));
    for (const p of [-0.1, 1.1, Number.NaN]) expect(() => fn(1, 10, p)).toThrow(new RegExp(`^${name}: p must`));
    expect(() => fn(1, 10, -0.1)).toThrow(RangeError);
  });

  it.each([
    ['clopperPearson', (x: number, n: number, c: number) => clopperPearson(x, n, c)[0]],
    ['oneSidedUpper', oneSidedUpper],
  ] as const)('%s', (name, fn) => {
    for (const n of [0, 1.5, 2 ** 53]) expect(() => fn(0, n, 0.95)).toThrow(new RegExp(`^${name}: n must`));
    for (const x of [-1, 11, 0.5]) expect(() => fn(x, 10, 0.95)).toThrow(new RegExp(`^${name}: failures must`));
    for (const c of [0, 1, -0.5, 2, Number.NaN]) expect(() => fn(1, 10, c)).toThrow(new RegExp(`^${name}: confidence must`));
    expect(() => fn(1, 10, 0)).toThrow(RangeError);
    // The edges of the valid range are accepted: one trial, no failures and all failures.
    expect(Number.isFinite(fn(0, 1, 0.95))).toBe(true);
    expect(Number.isFinite(fn(10, 10, 0.95))).toBe(true);
  });
});

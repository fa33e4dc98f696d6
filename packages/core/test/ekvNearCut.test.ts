/**
 * The truncation bound of the near-balance difference (ekvNearCutBound): the relative change of
 * v1 - v2 from the terms of G above degree 10, (1/2) sum_{k=11}^{60} k |c_k| (1/32)^{k-1}, with
 * c_k from the series ln(expm1(s)/s) = s/2 + sum_n B_2n s^2n / (2n (2n)!) (Abramowitz & Stegun
 * 4.5.64 and 23.1). Reference: test/fixtures/ekv_near_cut_bound.py (mpmath, 50 digits, exact
 * Bernoulli numbers), output test/fixtures/ekv-near-cut-bound.json.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ekvInverseDifferenceNear, ekvNearCutBound } from '../src/ekv.js';

const ref = JSON.parse(readFileSync(new URL('../../../test/fixtures/ekv-near-cut-bound.json', import.meta.url), 'utf8')) as {
  grid: { s0: number; bound: string }[];
  largest: { s0: number; bound: string };
  beyond60Relative: string;
};

describe('ekvNearCutBound (the near form\'s truncation bound)', () => {
  it('matches the 50-digit sum over s0 = 1e-6 .. 0.969 to 1e-13 relative', () => {
    // Tolerance: the bound is a sum of 50 positive terms, each |c_k| a sum of ten terms of mixed
    // sign computed in doubles from the rounded g_n (about 1e-16 each); in the k = 11 term,
    // which dominates, the terms of c_11 cancel by up to a factor of 37 (at s0 = 0.969), so
    // errors of several 1e-15 are the rounding scale; 1e-13 leaves room. Seen: 4.3e-15.
    expect(ref.grid.length).toBe(9);
    for (const r of ref.grid) {
      const b = ekvNearCutBound(r.s0);
      expect(Math.abs(b - Number(r.bound)) / Number(r.bound)).toBeLessThan(1e-13);
    }
  });

  it('is at most 1.83e-20 over the near form\'s whole range, far below its 2^-60 acceptance', () => {
    // The largest over 400 points of (0, e^{-1/32}] is at s0 = 0.843 (reference); the terms
    // from k = 61 on add 2e-92 of it, so stopping the sum at 60 changes nothing.
    const b = ekvNearCutBound(ref.largest.s0);
    expect(Math.abs(b - Number(ref.largest.bound)) / Number(ref.largest.bound)).toBeLessThan(1e-13);
    expect(b).toBeLessThan(1.83e-20);
    expect(Number(ref.beyond60Relative)).toBeLessThan(1e-90);
    expect(b).toBeLessThan(2 ** -60);
    expect(ekvInverseDifferenceNear(ref.largest.s0)).toBeDefined();
  });
});

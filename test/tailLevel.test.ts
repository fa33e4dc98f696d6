/**
 * The log-space tail helpers added for designs whose failure probability underflows
 * (montecarlo/src/normal.ts: logNormalUpperTail, sigmaLevelOfTails). Identities and one value
 * from memory; each check states its tolerance.
 */
import { logNormalUpperTail, normalUpperTail, sigmaLevel, sigmaLevelOfTails } from '@twinfet/montecarlo';
import { describe, expect, it } from 'vitest';

describe('logNormalUpperTail', () => {
  it.each([5, 20, 36.9, 37, 37.5])('agrees with ln(erfc form) at %s, on both sides of the series switch at 37', (x) => {
    // Both are accurate to ~1e-13 relative in ln here; measured gap 2.3e-13 at 37 (A&S 26.2.12 series
    // against the stdlib erfc): 1e-11 absolute in ln Phi(-x) (values of -12 to -708).
    expect(Math.abs(logNormalUpperTail(x) - Math.log(normalUpperTail(x)))).toBeLessThan(1e-11);
  });

  it('at 40 sigma: Phi(-40) = 3.6558935e-350 (from memory), where the double underflows', () => {
    expect(normalUpperTail(40)).toBe(0); // exact: below the smallest subnormal
    // ln(3.6558935e-350) = -804.608442; 1e-6 covers the 8 digits remembered.
    expect(Math.abs(logNormalUpperTail(40) - (Math.log(3.6558935) - 350 * Math.LN10))).toBeLessThan(1e-6);
  });

  it('refuses a negative or non-finite argument (RangeError, a programming error)', () => {
    expect(() => logNormalUpperTail(-1)).toThrow(RangeError);
    expect(() => logNormalUpperTail(Infinity)).toThrow(RangeError);
  });
});

describe('sigmaLevelOfTails', () => {
  it.each([1, 3, 6, 20, 36.9, 37.9, 38.6, 40, 100, 600, 4e8])('two equal sides at %s give that level (2 Phi(-k) = 2 Phi(-d))', (d) => {
    // Identity; 1e-12 relative covers erfcinv below 37 and the Newton stop (1e-15) above.
    expect(Math.abs(sigmaLevelOfTails([d, d]) / d - 1)).toBeLessThan(1e-12);
  });

  it('below the underflow it is the ordinary sigma level of the summed tails', () => {
    // Identity with sigmaLevel (normal.ts); exact to rounding, 1e-14 relative.
    const want = sigmaLevel(normalUpperTail(5) + normalUpperTail(6));
    expect(Math.abs(sigmaLevelOfTails([5, 6]) / want - 1)).toBeLessThan(1e-14);
  });

  it('one side dominating: 2 Phi(-k) = Phi(-40) + Phi(-45) gives k = 40 + ln 2 / 40 to first order', () => {
    // Computed from Phi(-x) ~ phi(x)/x: halving the tail moves k by ln 2 / k (1 + O(1/k^2));
    // Phi(-45)/Phi(-40) ~ e^-425 is negligible. 1e-4 absolute covers the O(1/k^3) terms.
    expect(Math.abs(sigmaLevelOfTails([40, 45]) - (40 + Math.LN2 / 40))).toBeLessThan(1e-4);
    // Exact bound: the summed tail is below 2 Phi(-40), so k lies above 40.
    expect(sigmaLevelOfTails([40, 45])).toBeGreaterThan(40);
  });
});

import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { allowedFailure, chipYield, chipYieldFromFailure } from '../src/stats/yield.js';
import { sigmaLevel } from '../src/stats/normal.js';

function relErr(actual: number, expected: number): number {
  return Math.abs(actual - expected) / Math.abs(expected);
}

describe('yield: check values computed from Y_chip = Y^M (test/fixtures/check_values.py)', () => {
  it('63 comparators at 99% chip yield allow p = 1.595e-4 per comparator (3.776 sigma)', () => {
    // Quoted to 4 significant figures: tolerance half a unit in the 4th.
    const p = allowedFailure(0.99, 63);
    expect(Math.abs(p - 1.595e-4)).toBeLessThanOrEqual(0.5e-7);
    expect(Math.abs(sigmaLevel(p) - 3.776)).toBeLessThanOrEqual(0.5e-3);
    // mpmath 1.3.0, 40 digits (test/fixtures/check_values.py): 1 - 0.99^(1/63) = 1.5951641643506e-4; 1e-13 relative
    // (one log, one division, one expm1).
    expect(relErr(p, 1.5951641643506e-4)).toBeLessThan(1e-13);
  });

  it('1e6 instances at 99.9% allow p = 1.0e-9 (6.109 sigma two-sided)', () => {
    // Quoted to 2 figures for p (tolerance half a unit in the 2nd) and 4 for the sigma.
    const p = allowedFailure(0.999, 1e6);
    expect(Math.abs(p - 1.0e-9)).toBeLessThanOrEqual(0.05e-9);
    expect(Math.abs(sigmaLevel(p) - 6.109)).toBeLessThanOrEqual(0.5e-3);
    // mpmath 1.3.0, 40 digits (test/fixtures/check_values.py): 1 - 0.999^(1e-6) = 1.00050033308303e-9; the naive
    // 1 - 0.999 ** 1e-6 keeps only ~7 digits here, the expm1 form ~15. Tolerance 1e-13.
    expect(relErr(p, 1.00050033308303e-9)).toBeLessThan(1e-13);
  });

  it('chip yield of 1e6 instances at p = 1e-9 is 0.999000499833 (and 63 at 99.9% is 0.93891)', () => {
    // mpmath 1.3.0, 40 digits (test/fixtures/check_values.py): (1 - 1e-9)^1e6 = 0.99900049983287549142,
    // 0.999^63 = 0.93891387770354909968. Tolerance 1e-13 relative.
    expect(relErr(chipYieldFromFailure(1e-9, 1e6), 0.99900049983287549142)).toBeLessThan(1e-13);
    expect(relErr(chipYield(0.999, 63), 0.93891387770354909968)).toBeLessThan(1e-13);
  });
});

describe('yield: identities', () => {
  it('allowedFailure inverts chipYieldFromFailure: p -> Y_chip -> p, to 1e-9 relative', () => {
    // Round trip. Y_chip = exp(-M p) near 1 holds M p only to ~1e-16 absolute, so the
    // recovered p carries 1e-16 / (M p) relative error; with M p >= 1e-6 that is <= 1e-10.
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1e9 }),
        fc.double({ min: -6, max: 2, noNaN: true }),
        (m, e) => {
          const p = Math.min(0.5, 10 ** e / m); // M p between 1e-6 and 100
          return relErr(allowedFailure(chipYieldFromFailure(p, m), m), p) < 1e-9;
        },
      ),
      { seed: 17, numRuns: 500 },
    );
  });

  it('chipYield(Y, M) equals chipYieldFromFailure(1 - Y, M) to 1e-14 and Y ** M to 1e-12 (Y >= 0.5)', () => {
    // Identity (1 - Y is exact for Y in [0.5, 1]); Math.pow as an independent evaluation.
    fc.assert(
      fc.property(fc.double({ min: 0.5, max: 1, noNaN: true }), fc.integer({ min: 1, max: 1000 }), (y, m) => {
        const a = chipYield(y, m);
        return relErr(a, chipYieldFromFailure(1 - y, m)) < 1e-14 && relErr(a, y ** m) < 1e-12;
      }),
      { seed: 18, numRuns: 300 },
    );
  });

  it('rejects bad arguments, naming the field', () => {
    expect(() => chipYield(1.1, 3)).toThrow(/instanceYield/);
    expect(() => chipYield(0.9, 0)).toThrow(/instances/);
    expect(() => allowedFailure(0.99, 2.5)).toThrow(/instances/);
  });
});

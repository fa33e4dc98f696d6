import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  normalCdf,
  normalPdf,
  normalQuantile,
  normalUpperTail,
  sigmaLevel,
  twoSidedTail,
} from '../src/stats/normal.js';

function relErr(actual: number, expected: number): number {
  return Math.abs(actual - expected) / Math.abs(expected);
}

describe('normal: Gaussian table (Abramowitz & Stegun 1964, table 26.1; test/fixtures/check_values.py)', () => {
  // Yield within +-k sigma, quoted to 10 decimals: tolerance 1e-9 absolute (the brief's
  // bound; the quoted rounding alone is 5e-11).
  const within: [number, number][] = [
    [1, 0.6826894921],
    [2, 0.9544997361],
    [3, 0.9973002039],
    [4, 0.9999366575],
    [5, 0.9999994267],
  ];
  for (const [k, y] of within) {
    it(`P(|Z| <= ${k}) = ${y}`, () => {
      expect(Math.abs(1 - twoSidedTail(k) - y)).toBeLessThanOrEqual(1e-9);
      // Same quantity from the CDF: Phi(k) - Phi(-k).
      expect(Math.abs(normalCdf(k) - normalCdf(-k) - y)).toBeLessThanOrEqual(1e-9);
    });
  }

  it('two-sided tails at 6 and 7 sigma: 1.973175290e-9 and 2.559625088e-12', () => {
    // Quoted to 10 significant figures; tolerance 1e-6 relative as required (tails come
    // from erfc, never 1 - erf, which could not resolve 2.6e-12 to better than 4%).
    expect(relErr(twoSidedTail(6), 1.97317529e-9)).toBeLessThan(1e-6);
    expect(relErr(twoSidedTail(7), 2.559625088e-12)).toBeLessThan(1e-6);
    expect(relErr(2 * normalUpperTail(7), 2.559625088e-12)).toBeLessThan(1e-6);
  });

  it('a 63-comparator chip at 99% allows p = 1.595e-4, i.e. 3.776 sigma', () => {
    // Computed from Y_chip = Y^M (test/fixtures/check_values.py: 3.7757664); quoted to 4 figures: tolerance half a unit in the 4th.
    expect(Math.abs(sigmaLevel(1.595e-4) - 3.776)).toBeLessThanOrEqual(0.5e-3);
  });

  it('1e6 instances at 99.9% allow p = 1.0e-9, i.e. 6.109 sigma two-sided', () => {
    // Computed from Y_chip = Y^M (test/fixtures/check_values.py: 6.1093304). p is quoted to 2 figures, so the sigma level is checked
    // on the unrounded p = -expm1(ln(0.999)/1e6) = 1.0005003e-9, to half a unit in the 4th.
    const p = -Math.expm1(Math.log(0.999) / 1e6);
    expect(Math.abs(sigmaLevel(p) - 6.109)).toBeLessThanOrEqual(0.5e-3);
    expect(Math.abs(twoSidedTail(6.109) - 1.0e-9)).toBeLessThanOrEqual(0.05e-9);
  });
});

describe('normal: quantile reference values', () => {
  // Computed with mpmath 1.3.0 at 40 digits (root of ln Phi(x) = ln p;
  // test/fixtures/normal_quantiles.py). The tolerance
  // 1e-13 relative covers erfcinv's error: a few ulps for p >= 1e-100, 7e-14 measured at
  // p = 1e-300 (the worst case; that is the accuracy limit of the stdlib erfcinv there).
  const table: [number, number][] = [
    [1e-300, -37.047096299361199237],
    [1e-100, -21.273453560965324295],
    [1e-20, -9.2623400897984075737],
    [1e-9, -5.9978070150076868716],
    [0.025, -1.9599639845400542355],
    [0.975, 1.9599639845400542355],
  ];
  for (const [p, x] of table) {
    it(`Phi^-1(${p}) = ${x}`, () => {
      expect(relErr(normalQuantile(p), x)).toBeLessThan(1e-13);
    });
  }

  it('Phi^-1(0.999999) = 4.7534243088228989482, limited by the double nearest 0.999999', () => {
    // mpmath 1.3.0, 40 digits, for the decimal 0.999999 (test/fixtures/normal_quantiles.py).
    // The double nearest it differs by up to 5.6e-17, i.e. 5.6e-11 relative in 1 - p, which moves the quantile by
    // 5.6e-11 / x^2 = 2.5e-12 relative: tolerance 5e-12. (An upper tail known as such should
    // be passed as -normalQuantile(1e-6) instead.)
    expect(relErr(normalQuantile(0.999999), 4.7534243088228989482)).toBeLessThan(5e-12);
    expect(relErr(-normalQuantile(1e-6), 4.7534243088228989482)).toBeLessThan(1e-13);
  });

  it('Phi^-1(0.5) = 0 and the edges are infinite', () => {
    // Definition: median of a symmetric law; tolerance 1e-16 absolute (rounding only).
    expect(Math.abs(normalQuantile(0.5))).toBeLessThanOrEqual(1e-16);
    expect(normalQuantile(0)).toBe(-Infinity);
    expect(normalQuantile(1)).toBe(Infinity);
  });

  it('sigma levels at p = 1e-12, 1e-9 and 1.595e-4 (two-sided)', () => {
    // mpmath 1.3.0, 40 digits, root of erfc(k/sqrt 2) = p (test/fixtures/normal_quantiles.py): 7.130506848171324458,
    // 6.1094102048693971399, 3.7757920798340017881. Tolerance 1e-13 relative (erfcinv ulps).
    expect(relErr(sigmaLevel(1e-12), 7.130506848171324458)).toBeLessThan(1e-13);
    expect(relErr(sigmaLevel(1e-9), 6.1094102048693971399)).toBeLessThan(1e-13);
    expect(relErr(sigmaLevel(1.595e-4), 3.7757920798340017881)).toBeLessThan(1e-13);
    // sqrt(2) erfcinv(p) rather than Phi^-1(1 - p/2): the latter would see 1 - 5e-13 rounded.
  });

  it('normalPdf(0) = 1/sqrt(2 pi) and normalPdf(1) = 0.24197072451914335', () => {
    // A&S 26.2.1 (definition; test/fixtures/normal_quantiles.py); tolerance 1e-15 relative (one exp and a product).
    expect(relErr(normalPdf(0), 0.3989422804014327)).toBeLessThan(1e-15);
    expect(relErr(normalPdf(1), 0.24197072451914335)).toBeLessThan(1e-15);
  });
});

describe('normal: identities and round trips', () => {
  it('sigmaLevel(twoSidedTail(k)) = k for k in [0.01, 37], to 1e-12 relative', () => {
    // Round trip; the inverse is well conditioned (relative dk/k = (dp/p) / k^2 for large k),
    // so the erfc/erfcinv ulps give < 1e-13; 1e-12 is the margin.
    fc.assert(
      fc.property(fc.double({ min: 0.01, max: 37, noNaN: true }), (k) => {
        return relErr(sigmaLevel(twoSidedTail(k)), k) < 1e-12;
      }),
      { seed: 1, numRuns: 500 },
    );
  });

  it('normalCdf(normalQuantile(p)) = p in the lower tail, p down to 1e-300', () => {
    // Round trip. A relative error e in x becomes x^2 e in p (d ln Phi / d ln|x| ~ x^2), and
    // erfc itself is good to ~1e-16 x^2; erfcinv is good to 7e-14 relative at worst (p = 1e-300),
    // so the bound is 1e-13 (1 + x^2): 1.4e-10 at p = 1e-300 (9.6e-11 measured), 1e-13 near 0.5.
    fc.assert(
      fc.property(fc.double({ min: -300, max: Math.log10(0.5), noNaN: true }), (e) => {
        const p = 10 ** e;
        const x = normalQuantile(p);
        return relErr(normalCdf(x), p) < 1e-13 * (1 + x * x);
      }),
      { seed: 2, numRuns: 500 },
    );
  });

  it('symmetry: normalCdf(x) + normalCdf(-x) = 1 and upper tail = Phi(-x), to 1e-16', () => {
    // Identity; absolute tolerance of one rounding.
    fc.assert(
      fc.property(fc.double({ min: -10, max: 10, noNaN: true }), (x) => {
        return (
          Math.abs(normalCdf(x) + normalCdf(-x) - 1) <= 2.3e-16 &&
          normalUpperTail(x) === normalCdf(-x)
        );
      }),
      { seed: 3, numRuns: 500 },
    );
  });

  it('rejects out-of-range probabilities and negative sigma', () => {
    expect(() => normalQuantile(1.5)).toThrow(/p must be/);
    expect(() => sigmaLevel(-1)).toThrow(/pTwoSided/);
    expect(() => twoSidedTail(-1)).toThrow(/k must be/);
    expect(() => twoSidedTail(Number.NaN)).toThrow(/k must be/);
  });
});

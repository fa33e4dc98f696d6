import { describe, it, expect } from 'vitest';
import { mulberry32, relErr } from './testRandom.js';
import {
  KS_EXACT_MAX_ORDER,
  kolmogorovCdf,
  kolmogorovSurvival,
  ksAsymptoticPValue,
  ksExactCdf,
  ksStatistic,
} from '../src/stats/ks.js';


const uniformCdf = (x: number): number => (x <= 0 ? 0 : x >= 1 ? 1 : x);

describe('ksStatistic', () => {
  it('three points 0.1, 0.4, 0.7 against U(0,1): D = 0.3', () => {
    // By hand: D+ = max(1/3 - 0.1, 2/3 - 0.4, 1 - 0.7) = 0.3; D- = max(0.1, 0.4 - 1/3,
    // 0.7 - 2/3) = 0.1. Tolerance 1e-15 absolute (a subtraction of values below 1).
    expect(Math.abs(ksStatistic(Float64Array.of(0.7, 0.1, 0.4), uniformCdf) - 0.3)).toBeLessThan(1e-15);
  });

  it('four points 0.9, 0.05, 0.3, 0.2 (unsorted) against U(0,1): D = 0.45', () => {
    // By hand on the sorted 0.05, 0.2, 0.3, 0.9: D+ = max(0.2, 0.3, 0.45, 0.1) = 0.45;
    // D- = max(0.05, -0.05, -0.2, 0.15) = 0.15. Tolerance 1e-15 absolute.
    expect(Math.abs(ksStatistic(Float64Array.of(0.9, 0.05, 0.3, 0.2), uniformCdf) - 0.45)).toBeLessThan(1e-15);
  });

  it('a below-the-CDF deviation is caught: 0.6, 0.8 against U(0,1): D = 0.6', () => {
    // By hand: D- = max(0.6 - 0, 0.8 - 0.5) = 0.6; D+ = max(0.5 - 0.6, 1 - 0.8) = 0.2.
    expect(Math.abs(ksStatistic(Float64Array.of(0.6, 0.8), uniformCdf) - 0.6)).toBeLessThan(1e-15);
  });

  it('rejects empty samples, NaN and a CDF that is not a probability', () => {
    expect(() => ksStatistic(new Float64Array(0), uniformCdf)).toThrow(/empty/);
    expect(() => ksStatistic(Float64Array.of(0.2, Number.NaN), uniformCdf)).toThrow(/NaN/);
    expect(() => ksStatistic(Float64Array.of(0.2), () => 2)).toThrow(/not a probability/);
  });
});

describe('Kolmogorov limit distribution', () => {
  // Standard table, from memory: the 10%, 5%, 1% critical values of sqrt(n) D_n are about
  // 1.22, 1.36, 1.63. Precise values computed with SciPy 1.17.1 scipy.special.kolmogorov
  // (its survival function); K(0.3) and K(0.5), where 1 - survival loses digits, are the
  // 50-digit values of the series; all recomputed from both series in 50 digits by
  // test/fixtures/kolmogorov_table.py. Tolerance 1e-13 absolute: both series are summed until the
  // next term is below 1e-17 of the sum.
  const table: [number, number][] = [
    [0.3, 9.305801334566623e-6],
    [0.5, 0.036054756335124906],
    [0.8, 0.45585758842580193],
    [1.0, 0.7300003283226455],
    [1.2238, 0.8999765721643221],
    [1.36, 0.9505141232446221],
    [1.63, 0.9901536351115134],
    [2.0, 0.9993290747442203],
  ];
  for (const [x, k] of table) {
    it(`K(${x}) = ${k}`, () => {
      expect(Math.abs(kolmogorovCdf(x) - k)).toBeLessThan(1e-13);
      expect(Math.abs(kolmogorovSurvival(x) - (1 - k))).toBeLessThan(1e-13);
    });
  }

  it('tails keep relative accuracy: 1 - K(3) = 3.045995948942526e-8, K(0.2) small', () => {
    // SciPy 1.17.1 scipy.special.kolmogorov(3.0) (test/fixtures/kolmogorov_table.py).
    // Tolerance 1e-12 relative: the tail series
    // is computed directly, not as 1 - K. K(0.2) = 1 - 0.999999999999495 = 5.05e-13 (SciPy),
    // checked to 1e-3 relative since SciPy's own value is a difference near 1.
    expect(relErr(kolmogorovSurvival(3), 3.045995948942526e-8)).toBeLessThan(1e-12);
    expect(relErr(kolmogorovCdf(0.2), 1 - 0.999999999999495)).toBeLessThan(1e-3);
  });

  it('the two series agree where they meet (x = 1.18)', () => {
    // Identity: both are exact expansions of the same function (Jacobi theta transform).
    // The points are 1e-13 apart and K' = 0.58 there (derivative of the tail series), so a
    // consistent pair differs by 5.8e-14; tolerance 1e-13 (any switch error would be larger).
    const below = kolmogorovCdf(1.18 - 1e-13);
    const above = kolmogorovCdf(1.18);
    expect(Math.abs(above - below)).toBeLessThan(1e-13);
    expect(above).toBeGreaterThan(below);
  });

  it('asymptotic p-value of D = 0.043 at n = 1000 lies between the 1.35 and 1.36 table rows', () => {
    // sqrt(1000) * 0.043 = 1.35978, so 1 - K falls between 1 - K(1.36) = 0.0494859 and
    // 1 - K(1.35) = 0.0522419 (SciPy 1.17.1 scipy.special.kolmogorov;
    // test/fixtures/kolmogorov_table.py). Ordering check, exact.
    const p = ksAsymptoticPValue(0.043, 1000);
    expect(p).toBeGreaterThan(0.0494858);
    expect(p).toBeLessThan(0.0522419);
  });
});

describe('ksExactCdf (Marsaglia, Tsang & Wang 2003)', () => {
  it('P(D_10 < 0.274) = 0.6284796154565043', () => {
    // The worked example of the 2003 paper (from memory); SciPy 1.17.1 kstwo.cdf(0.274, 10)
    // gives the same 16 digits, as does the matrix in test/fixtures/kolmogorov_table.py.
    // Tolerance 1e-13 relative (the paper claims ~13 digits).
    expect(relErr(ksExactCdf(10, 0.274), 0.6284796154565043)).toBeLessThan(1e-13);
  });

  it('matches the exact matrix formula at n = 50 and 100 (SciPy 1.17.1 kstwo.cdf agrees to 14 digits)', () => {
    // The Marsaglia-Tsang-Wang matrix in exact fractions and at 50 digits
    // (test/fixtures/kolmogorov_table.py); scipy.stats.kstwo.cdf agrees to about 2e-15.
    // Tolerance 1e-13 relative (the paper's ~13 digits).
    expect(relErr(ksExactCdf(50, 0.2), 0.96856122223046549)).toBeLessThan(1e-13);
    expect(relErr(ksExactCdf(100, 0.05), 0.0467840289364275)).toBeLessThan(1e-13);
  });

  it('matches the matrix formula in 50-digit arithmetic at n = 200 and 1000', () => {
    // Computed with mpmath 1.3.0 at 50 digits from the same Marsaglia-Tsang-Wang matrix
    // (exact decimal d; test/fixtures/kolmogorov_table.py): a check of the double-precision implementation and its exponent
    // scaling. SciPy 1.17.1 kstwo.cdf differs here by up to 3e-7 relative (for n > 140 it
    // switches to an asymptotic approximation), so it is not used as the reference.
    // Tolerance 1e-12 relative (1000 scaled steps of n!/n^n and 10 matrix squarings).
    expect(relErr(ksExactCdf(200, 0.1), 0.96588992921851502)).toBeLessThan(1e-12);
    expect(relErr(ksExactCdf(1000, 0.02), 0.18910286892978785)).toBeLessThan(1e-12);
    expect(relErr(ksExactCdf(1000, 0.04), 0.92066044502459877)).toBeLessThan(1e-12);
  });

  it('closed forms: n = 1 gives 2d - 1; 1/(2n) <= d <= 1/n gives n! (2d - 1/n)^n', () => {
    // D_1 = max(U, 1 - U), so P(D_1 < d) = 2d - 1 for d in [1/2, 1] (computed by hand);
    // the small-d formula is classical (e.g. Marsaglia, Tsang & Wang 2003, section 1, from
    // memory; SciPy 1.17.1 kstwo.cdf(0.25, 3) = 0.027777777777777776 = 1/36 agrees, as does
    // test/fixtures/kolmogorov_table.py).
    // Tolerance 1e-14 absolute (a handful of operations on small matrices).
    expect(Math.abs(ksExactCdf(1, 0.7) - 0.4)).toBeLessThan(1e-14);
    expect(Math.abs(ksExactCdf(3, 0.25) - 1 / 36)).toBeLessThan(1e-14);
    expect(ksExactCdf(3, 1 / 6)).toBe(0); // d <= 1/(2n): impossible, exactly 0
    expect(ksExactCdf(3, 1)).toBe(1);
  });

  it('the exact and asymptotic laws agree to O(1/sqrt n) at n = 1000 (Kolmogorov 1933)', () => {
    // Exact 0.920660445 (50-digit value above) vs K(0.04 sqrt 1000) = 0.9184811136
    // (test/fixtures/kolmogorov_table.py), a
    // difference of 0.0022; the bound 0.7/sqrt(n) = 0.022 is the usual first-order correction
    // size (common practice, no source), so the check is loose by design but not vacuous.
    const exact = ksExactCdf(1000, 0.04);
    const limit = kolmogorovCdf(0.04 * Math.sqrt(1000));
    expect(Math.abs(exact - limit)).toBeLessThan(0.7 / Math.sqrt(1000));
    expect(relErr(limit, 0.9184811135877903)).toBeLessThan(1e-12); // SciPy 1 - kolmogorov(1.2649)
  });

  it('refuses matrices beyond the size limit instead of running for minutes', () => {
    expect(KS_EXACT_MAX_ORDER).toBe(501); // regression guard on the documented limit
    expect(() => ksExactCdf(100_000, 0.01)).toThrow(/ksAsymptoticPValue/);
  });
});

describe('KS end to end on seeded samples', () => {
  it('exact p-values of uniform samples are uniform: P(p < 0.05) within 4 SE of 0.05', () => {
    // 1000 experiments of n = 50 draws (test-local mulberry32, seed 77). Under the null the
    // p-value 1 - P(D_n < d) is uniform, so the rejection count is Binomial(1000, 0.05):
    // SE = sqrt(0.05 * 0.95 / 1000) = 0.00689; threshold 4 SE = 0.0276.
    const rand = mulberry32(77);
    const sample = new Float64Array(50);
    const experiments = 1000;
    let rejected = 0;
    for (let e = 0; e < experiments; e++) {
      for (let i = 0; i < sample.length; i++) sample[i] = rand();
      const d = ksStatistic(sample, uniformCdf);
      if (1 - ksExactCdf(sample.length, d) < 0.05) rejected++;
    }
    const se = Math.sqrt((0.05 * 0.95) / experiments);
    expect(Math.abs(rejected / experiments - 0.05)).toBeLessThan(4 * se);
  });

  it('a shifted sample is rejected: U(0.1, 1.1) against U(0, 1), n = 500', () => {
    // D >= 0.1 - sampling noise; sqrt(500) * 0.1 = 2.24 gives an asymptotic p-value of
    // about 1e-4 (table above); the threshold 0.01 leaves a wide margin for seed noise.
    const rand = mulberry32(3);
    const sample = Float64Array.from({ length: 500 }, () => 0.1 + rand());
    const d = ksStatistic(sample, uniformCdf);
    expect(ksAsymptoticPValue(d, sample.length)).toBeLessThan(0.01);
  });
});

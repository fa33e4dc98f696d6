import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import jStat from 'jstat';
import {
  binomialCdf,
  binomialSurvival,
  clopperPearson,
  oneSidedUpper,
} from '../src/stats/clopperPearson.js';

function relErr(actual: number, expected: number): number {
  return Math.abs(actual - expected) / Math.abs(expected);
}

/** Reference binomial CDF by direct summation of C(n, j) p^j (1 - p)^(n - j), small n only. */
function directBinomialCdf(k: number, n: number, p: number): number {
  let sum = 0;
  let coefficient = 1; // C(n, 0)
  for (let j = 0; j <= k; j++) {
    sum += coefficient * p ** j * (1 - p) ** (n - j);
    coefficient = (coefficient * (n - j)) / (j + 1);
  }
  return sum;
}

describe('clopperPearson: reference values', () => {
  // Computed from the Clopper & Pearson (Biometrika 26(4), 1934) definition by
  // test/fixtures/check_values.py. Checked to 4 significant figures (half a unit in the 4th): the 5/1000
  // upper bound 0.011630 is a rounding of 0.0116295 (the exact value is 0.01162947, see the
  // 60-digit table below), so its 5th figure cannot be held to.
  it('0/1000 failures gives [0, 0.003682]', () => {
    const [lo, hi] = clopperPearson(0, 1000, 0.95);
    expect(lo).toBe(0); // exact by definition: lower bound is 0 at zero failures
    expect(Math.abs(hi - 0.0036821)).toBeLessThanOrEqual(0.5e-6);
  });

  it('5/1000 failures gives [0.001625, 0.01163]', () => {
    const [lo, hi] = clopperPearson(5, 1000, 0.95);
    expect(Math.abs(lo - 0.0016254)).toBeLessThanOrEqual(0.5e-6);
    expect(Math.abs(hi - 0.01163)).toBeLessThanOrEqual(0.5e-5);
  });

  it('98/100 passes gives a pass-rate interval [0.9296, 0.9976]', () => {
    // 2 failures in 100; the pass-rate interval is 1 minus the failure interval, reversed.
    const [lo, hi] = clopperPearson(2, 100, 0.95);
    expect(Math.abs(1 - hi - 0.92962)).toBeLessThanOrEqual(0.5e-4);
    expect(Math.abs(1 - lo - 0.99757)).toBeLessThanOrEqual(0.5e-4);
  });

  it('one-sided 95% upper bound at 0/1000 is 0.0029912 (rule of three ~ 3/n)', () => {
    // Computed (test/fixtures/check_values.py); Hanley & Lippman-Hand, JAMA 249(13), 1983 for 1 - 0.05^(1/n).
    const u = oneSidedUpper(0, 1000, 0.95);
    expect(Math.abs(u - 0.0029912)).toBeLessThanOrEqual(0.5e-6); // 4 significant figures
    // Closed form 1 - 0.05^(1/n), computed: the zero-failure path must match it to rounding.
    expect(relErr(u, 1 - 0.05 ** (1 / 1000))).toBeLessThan(1e-12);
  });

  // Computed with mpmath 1.3.0 at 60 digits from the Clopper-Pearson definition by
  // test/fixtures/clopper_pearson_table.py (binomial tails by exact summation / the A&S 26.5.8
  // continued fraction in 60-digit arithmetic, roots by Newton steps inside a bisection
  // bracket; SciPy beta.ppf printed beside them as a check). Columns: failures, n, lower, upper (95% two-sided),
  // one-sided 95% upper. The code is built to keep ~1e-13 relative; the tolerance 1e-12
  // leaves room for the root solve, which stops at a 1e-14 relative step.
  const referenceTable: [number, number, number, number, number][] = [
    [0, 1000, 0, 0.0036820838968656721, 0.0029912495450952962],
    [5, 1000, 0.0016254195175627603, 0.011629470559812149, 0.010484076911415654],
    [2, 100, 0.0024313368239425423, 0.07038393247107013, 0.061619200396040708],
    [3, 1e8, 6.1867212716854659e-9, 8.7672728169260399e-8, 7.7536563436416288e-8],
    [0, 1e8, 0, 3.688879386074779e-8, 2.9957322286819322e-8],
    [1, 1e8, 2.5317807981084918e-10, 5.5716432635810668e-8, 4.743864429588649e-8],
    [30, 1e8, 2.0240874907882837e-7, 4.2826862648135401e-7, 4.0690505419438575e-7],
    [3, 1e9, 6.1867212332289581e-10, 8.7672730444606971e-9, 7.7536565095036169e-9],
    [10000, 1e8, 9.8049619806391448e-5, 0.00010197941530911171, 0.00010166051695034907],
    [5e8, 1e9, 0.49996900974842228, 0.50003099025157772, 0.50002600791936968],
    [99999997, 1e8, 0.99999991232727183, 0.99999999381327873, 0.99999999182308548],
    [1, 1, 0.025, 1, 1],
    [0, 1, 0, 0.975, 0.95],
  ];
  for (const [x, n, lo, hi, one] of referenceTable) {
    it(`${x}/${n} matches the 60-digit reference to 1e-12 relative`, () => {
      const [l, h] = clopperPearson(x, n, 0.95);
      if (lo === 0) expect(l).toBe(0);
      else expect(relErr(l, lo)).toBeLessThan(1e-12);
      expect(relErr(h, hi)).toBeLessThan(1e-12);
      expect(relErr(oneSidedUpper(x, n, 0.95), one)).toBeLessThan(1e-12);
    });
  }
});

describe('clopperPearson: jStat.beta.inv accuracy limit (why the bounds are re-solved)', () => {
  it('jStat alone is off by more than 1e-8 relative at 3 failures in 1e8 (and we are not)', () => {
    // Reference: the 60-digit value above (test/fixtures/clopper_pearson_table.py). This
    // documents the limit that motivated the re-solve; if a future jStat fixes it, this check fails and the guard can be revisited.
    const reference = 6.1867212716854659e-9;
    const jstatLower = jStat.beta.inv(0.025, 3, 1e8 - 2);
    expect(relErr(jstatLower, reference)).toBeGreaterThan(1e-8);
    expect(relErr(clopperPearson(3, 1e8, 0.95)[0], reference)).toBeLessThan(1e-12);
  });
});

describe('binomial tails', () => {
  it('binomialCdf matches direct summation for small n to 1e-13 relative', () => {
    // Computed from the binomial sum itself (direct summation in the test); n <= 60 keeps the
    // summation's own rounding below ~1e-14, so 1e-13 relative is a fair bound.
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 60 }),
        fc.double({ min: 1e-4, max: 0.9999, noNaN: true }),
        fc.integer({ min: 0, max: 60 }),
        (n, p, kRaw) => {
          const k = kRaw % (n + 1);
          const expected = directBinomialCdf(k, n, p);
          if (expected < 1e-200) return true; // summation reference underflows
          return relErr(binomialCdf(k, n, p), expected) < 1e-13;
        },
      ),
      { seed: 20240501, numRuns: 500 },
    );
  });

  it('P(X <= 0) at n = 1000, p = 0.001 equals 0.999^1000 = 0.36769542477096', () => {
    // Computed from (1 - p)^n (the title's value: test/fixtures/clopper_pearson_table.py);
    // tolerance 1e-14 relative (one closed-form evaluation).
    expect(relErr(binomialCdf(0, 1000, 0.001), Math.exp(1000 * Math.log1p(-0.001)))).toBeLessThan(
      1e-14,
    );
  });

  it('far upper tail P(X > 100), n = 1e6, p = 2e-4, matches the 60-digit value', () => {
    // mpmath 1.3.0, 60 digits, A&S 26.5.8 continued fraction (test/fixtures/clopper_pearson_table.py):
    // P(X <= 100) = 3.704888008803004767e-15 (p taken as the double the code receives),
    // i.e. a lower tail of 3.7e-15 that 1 - (upper) could never resolve. Tolerance 1e-12 rel.
    expect(relErr(binomialCdf(100, 1e6, 2e-4), 3.704888008803004767e-15)).toBeLessThan(1e-12);
  });

  it('small-p lower tail at n = 1e9 keeps full precision (summation path)', () => {
    // mpmath 1.3.0, 60 digits (test/fixtures/clopper_pearson_table.py):
    // P(X <= 1000 | n = 1e9, p = 1.2e-6) = 1.553115184039338274e-9 (p as the double),
    // P(X <= 0 | n = 1e9, p = 3e-9) = 0.04978706814382213538. The continued fraction in
    // q = 1 - p would lose 1e-16/p relative here (~1e-9, ~3e-8). Tolerance 1e-12 relative.
    expect(relErr(binomialCdf(1000, 1e9, 1.2e-6), 1.553115184039338274e-9)).toBeLessThan(1e-12);
    expect(relErr(binomialCdf(0, 1e9, 3e-9), 0.04978706814382213538)).toBeLessThan(1e-12);
  });

  it('cdf and survival add to 1 (identity), to 1e-15 absolute', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1e7 }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (n, p, u) => {
          const k = Math.floor(u * n);
          return Math.abs(binomialCdf(k, n, p) + binomialSurvival(k, n, p) - 1) <= 1e-15;
        },
      ),
      { seed: 7, numRuns: 300 },
    );
  });
});

describe('clopperPearson: properties', () => {
  it('agrees with jStat.beta.inv to 1e-6 relative for n <= 1e4 (independent implementation)', () => {
    // jStat 1.9.6 is accurate to ~1e-9 relative at these sizes (measured); 1e-6 leaves margin
    // while still catching a wrong tail, parameter or side.
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 10000 }), fc.double({ min: 0, max: 1, noNaN: true }), (n, u) => {
        const x = 1 + Math.floor(u * (n - 2)); // 1..n-1: both bounds are Beta quantiles
        const [lo, hi] = clopperPearson(x, n, 0.95);
        return (
          relErr(lo, jStat.beta.inv(0.025, x, n - x + 1)) < 1e-6 &&
          relErr(hi, jStat.beta.inv(0.975, x + 1, n - x)) < 1e-6
        );
      }),
      { seed: 42, numRuns: 200 },
    );
  });

  it('the binomial tails at the bounds equal alpha/2 (definition), to 1e-10 relative', () => {
    // Identity. The tail's elasticity d ln T / d ln p is up to ~sqrt(n) = 1e3 near the mean at
    // n <= 1e6, so the 1e-14 relative stopping step of the solve and the rounding of p alone
    // allow ~1e-11; 1e-10 adds margin for the tails' own ~1e-13 error.
    // x <= n/2 only: a bound near 1 is a double with ~1e-16 absolute precision, so 1 - p and
    // any tail in it carry a relative error 1e-16/(1 - p) that is representation, not method
    // (the mirror-symmetry test covers x > n/2).
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 1e6 }), fc.double({ min: 0, max: 1, noNaN: true }), (n, u) => {
        const x = 1 + Math.floor(u * (n / 2 - 1));
        const [lo, hi] = clopperPearson(x, n, 0.95);
        return (
          relErr(binomialSurvival(x - 1, n, lo), 0.025) < 1e-10 &&
          relErr(binomialCdf(x, n, hi), 0.025) < 1e-10
        );
      }),
      { seed: 3, numRuns: 200 },
    );
  });

  it('...and to 1e-12 for few failures in up to 1e9 trials (the high-yield use)', () => {
    // Identity. With x <= 50 failures the elasticity is at most ~x + 2 sqrt(x) < 70, so
    // rounding and the solve's stopping step allow < 1e-12.
    fc.assert(
      fc.property(fc.integer({ min: 100, max: 1e9 }), fc.integer({ min: 1, max: 50 }), (n, x) => {
        const [lo, hi] = clopperPearson(x, n, 0.95);
        return (
          relErr(binomialSurvival(x - 1, n, lo), 0.025) < 1e-12 &&
          relErr(binomialCdf(x, n, hi), 0.025) < 1e-12
        );
      }),
      { seed: 11, numRuns: 200 },
    );
  });

  it('failures and passes are symmetric: CP(n - x) = 1 - reversed CP(x), to 1e-12', () => {
    // Identity of the definition; tolerance covers absolute rounding of values near 1.
    for (const [x, n] of [
      [3, 1000],
      [17, 250],
      [1, 2],
    ] as const) {
      const [lo, hi] = clopperPearson(x, n, 0.9);
      const [mlo, mhi] = clopperPearson(n - x, n, 0.9);
      expect(Math.abs(1 - mhi - lo)).toBeLessThan(1e-12);
      expect(Math.abs(1 - mlo - hi)).toBeLessThan(1e-12);
    }
  });

  it('rejects bad arguments, naming the field', () => {
    expect(() => clopperPearson(5, 4, 0.95)).toThrow(/failures/);
    expect(() => clopperPearson(1, 0, 0.95)).toThrow(/n must/);
    expect(() => clopperPearson(1, 10, 95)).toThrow(/confidence/);
    expect(() => oneSidedUpper(1.5, 10, 0.95)).toThrow(/failures/);
  });
});

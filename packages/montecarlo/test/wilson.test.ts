import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { wilson } from '../src/stats/wilson.js';

function relErr(actual: number, expected: number): number {
  return Math.abs(actual - expected) / Math.abs(expected);
}

describe('wilson: reference values', () => {
  // Computed from Wilson, JASA 22:209-212, 1927 by test/fixtures/check_values.py, checked to
  // 4 significant figures as quoted there: tolerance half a unit in the 4th figure.
  it('0/1000 failures gives [0, 0.003827]', () => {
    const [lo, hi] = wilson(0, 1000, 0.95);
    expect(lo).toBe(0); // exact: the lower root is 0 at zero failures
    expect(Math.abs(hi - 0.0038268)).toBeLessThanOrEqual(0.5e-6);
  });

  it('5/1000 failures gives [0.002138, 0.01165]', () => {
    const [lo, hi] = wilson(5, 1000, 0.95);
    expect(Math.abs(lo - 0.0021375)).toBeLessThanOrEqual(0.5e-6);
    expect(Math.abs(hi - 0.011651)).toBeLessThanOrEqual(0.5e-5);
  });

  // Computed with mpmath 1.3.0 at 40 digits from the Wilson quadratic (test/fixtures/wilson_table.py)
  // p^2 (1 + z^2/n) - p (2 x/n + z^2/n) + (x/n)^2 = 0, z = sqrt(2) erfinv(0.95).
  // Tolerance 1e-13 relative: a handful of roundings in a closed form without cancellation.
  const table: [number, number, number, number][] = [
    [5, 1000, 0.0021375355273244599, 0.011650955373375113],
    [3, 1e8, 1.0202707334903529e-8, 8.8211877091481996e-8],
    [2, 100, 0.0055019675501623481, 0.070011790728543909],
    [98, 100, 0.92998820927145609, 0.99449803244983765],
  ];
  for (const [x, n, lo, hi] of table) {
    it(`${x}/${n} matches the 40-digit roots to 1e-13 relative`, () => {
      const [l, h] = wilson(x, n, 0.95);
      expect(relErr(l, lo)).toBeLessThan(1e-13);
      expect(relErr(h, hi)).toBeLessThan(1e-13);
    });
  }

  it('all failures gives [0.996173, 1] at n = 1000 (mirror of 0/1000)', () => {
    // mpmath 1.3.0, 40 digits, same quadratic (test/fixtures/wilson_table.py): lower root
    // 0.99617324151444488; upper exactly 1.
    const [lo, hi] = wilson(1000, 1000, 0.95);
    expect(hi).toBe(1);
    expect(Math.abs(lo - 0.99617324151444488)).toBeLessThan(1e-15); // absolute, value near 1
  });
});

describe('wilson: properties', () => {
  it('the bounds solve the Wilson quadratic (definition) to 1e-12 relative residual', () => {
    // Identity: (x/n - p)^2 - z^2 p (1 - p)/n = 0 at both roots. The residual is scaled by
    // the size of its terms, (x/n)^2 + p^2 + z^2 p/n, so 1e-12 allows for rounding only.
    const z = 1.959963984540054; // Phi^-1(0.975), standard table / A&S 26.2
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e9 }), fc.double({ min: 0, max: 1, noNaN: true }), (n, u) => {
        const x = Math.floor(u * n);
        const ph = x / n;
        return wilson(x, n, 0.95).every((p) => {
          const residual = (ph - p) ** 2 - (z * z * p * (1 - p)) / n;
          const scale = ph * ph + p * p + (z * z * p) / n;
          return Math.abs(residual) <= 1e-12 * scale;
        });
      }),
      { seed: 99, numRuns: 300 },
    );
  });

  it('failures and passes mirror: W(n - x) = 1 - reversed W(x), to 1e-15 absolute', () => {
    // Identity of the definition (swap p and 1 - p); absolute tolerance since values near 1
    // hold ~1e-16 absolute precision.
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e7 }), fc.double({ min: 0, max: 1, noNaN: true }), (n, u) => {
        const x = Math.floor(u * n);
        const [lo, hi] = wilson(x, n, 0.9);
        const [mlo, mhi] = wilson(n - x, n, 0.9);
        return Math.abs(1 - mhi - lo) <= 1e-15 && Math.abs(1 - mlo - hi) <= 1e-15;
      }),
      { seed: 5, numRuns: 300 },
    );
  });

  it('rejects bad arguments, naming the field', () => {
    expect(() => wilson(-1, 10, 0.95)).toThrow(/failures/);
    expect(() => wilson(1, 10, 1)).toThrow(/confidence/);
  });
});

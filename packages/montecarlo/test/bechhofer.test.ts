/**
 * Bechhofer's probability of a correct selection (Bechhofer, Ann. Math. Statist. 25(1), 1954)
 * and the moments of the largest of m normals, against published and computed values.
 */
import { describe, expect, it } from 'vitest';
import { correctSelection, lnWrongSelection, maxOfNormals, selectionSeparation, wrongSelection } from '../src/stats/bechhofer.js';
import { normalUpperTail } from '../src/stats/normal.js';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('Bechhofer 1954, Table I: tau = D/sigma for a probability of correct selection P', () => {
  // Values recalled from the table (from memory) and confirmed by quadrature:
  // test/fixtures/bechhofer_table.py reproduces every one to within its rounding (5e-5).
  const table: [number, [number, number, number]][] = [
    [2, [1.8124, 2.3262, 3.29]],
    [3, [2.2302, 2.7101, 3.6173]],
    [4, [2.4516, 2.9162, 3.797]],
    [5, [2.5997, 3.0552, 3.9196]],
    [10, [2.9829, 3.4182, 4.2456]],
  ];
  it.each(table)('k = %i: P = 0.90, 0.95, 0.99 reproduced to 1e-4 (the table gives 4 decimals)', (k, taus) => {
    [0.9, 0.95, 0.99].forEach((p, i) => {
      expect(Math.abs(selectionSeparation(k, 1 - p) - taus[i]!)).toBeLessThan(1e-4);
      expect(Math.abs(correctSelection(k, taus[i]!) - p)).toBeLessThan(1e-4);
    });
  });

  it('k = 16 and 64 against test/fixtures/bechhofer_table.py (computed: trapezoid on [-14, 14], step 1/400) to 2e-6 (the script prints 6 decimals)', () => {
    const fixture: [number, [number, number, number]][] = [
      [16, [3.202134, 3.627939, 4.437401]],
      [64, [3.747476, 4.155333, 4.929519]],
    ];
    for (const [k, taus] of fixture) [0.1, 0.05, 0.01].forEach((q, i) => expect(Math.abs(selectionSeparation(k, q) - taus[i]!)).toBeLessThan(2e-6));
  });
});

describe('identities', () => {
  it('k = 2: 1 - P = Phi(-tau/sqrt 2) (the difference of two normals), 1e-13 relative from tau 0.1 to 50 (down to 1e-272)', () => {
    for (let tau = 0.1; tau <= 50; tau *= 1.3) expect(rel(wrongSelection(2, tau), normalUpperTail(tau / Math.SQRT2))).toBeLessThan(1e-13);
  });

  it('the log form stays finite where the probability underflows, and matches ln Phi(-tau/sqrt2) for k = 2 (asymptotic series of the normal tail, 1e-10 relative)', () => {
    const tau = 80; // Phi(-56.6) ~ 1e-698
    const x = tau / Math.SQRT2;
    const lnQ = -0.5 * x * x - Math.log(x * Math.sqrt(2 * Math.PI)) + Math.log1p(-1 / (x * x) + 3 / x ** 4);
    expect(wrongSelection(2, tau)).toBe(0);
    expect(rel(lnWrongSelection(2, tau), lnQ)).toBeLessThan(1e-10);
  });

  it('P(k, 0) = 1/k (all populations equal: each is the largest with the same chance), 1e-13', () => {
    for (const k of [2, 3, 7, 64, 4096]) expect(Math.abs(correctSelection(k, 0) - 1 / k)).toBeLessThan(1e-13);
  });

  it('far in the tail 1 - P lies between the union bound and the Bonferroni bound, for k = 64', () => {
    // Wrong selection is the union of A_j = {Z_j > tau/sqrt2}, Z_j = (X_j - X_1)/(sigma sqrt2), pairwise
    // correlation 1/2. Bonferroni: sum P(A_j) - sum_{i<j} P(A_i and A_j) <= P(union) <= sum P(A_j), and
    // P(A_i and A_j) <= P(Z_i + Z_j > 2h) = Phi(-2h/sqrt3) (var(Z_i + Z_j) = 3), h = tau/sqrt2.
    for (const tau of [8, 10, 12]) {
      const h = tau / Math.SQRT2;
      const f = wrongSelection(64, tau);
      expect(f).toBeLessThanOrEqual(63 * normalUpperTail(h));
      expect(f).toBeGreaterThanOrEqual(63 * normalUpperTail(h) - ((63 * 62) / 2) * normalUpperTail((2 * h) / Math.sqrt(3)));
    }
  });

  it('selectionSeparation inverts wrongSelection: tau comes back to 1e-12 relative, for failures from 0.4 down to 1e-200', () => {
    for (const k of [2, 16, 4096]) {
      for (const tau of [0.3, 2, 5, 10, 30]) {
        const p = wrongSelection(k, tau);
        if (p >= 1 - 1 / k) continue;
        expect(rel(selectionSeparation(k, p), tau)).toBeLessThan(1e-12);
      }
    }
    expect(selectionSeparation(4, 0.8)).toBe(0); // 1 - 1/4 = 0.75 < 0.8: met with no separation
  });
});

describe('the largest of m standard normals', () => {
  it('m = 2 and 3: mean 1/sqrt(pi) and 3/(2 sqrt(pi)), second moments 1 and 1 + sqrt(3)/(2 pi) (closed forms, from memory), 1e-12', () => {
    const two = maxOfNormals(2);
    expect(Math.abs(two.mean - 1 / Math.sqrt(Math.PI))).toBeLessThan(1e-12);
    expect(Math.abs(two.variance - (1 - 1 / Math.PI))).toBeLessThan(1e-12);
    const three = maxOfNormals(3);
    expect(Math.abs(three.mean - 3 / (2 * Math.sqrt(Math.PI)))).toBeLessThan(1e-12);
    expect(Math.abs(three.variance + three.mean ** 2 - (1 + Math.sqrt(3) / (2 * Math.PI)))).toBeLessThan(1e-12);
    expect(maxOfNormals(1)).toEqual({ mean: 0, variance: 1 });
  });

  it('m = 4, 5, 9, 15 against test/fixtures/bechhofer_table.py (printed to 1e-10) to 2e-10', () => {
    const fixture: [number, number, number][] = [
      [4, 1.029375373, 0.4917152369],
      [5, 1.1629644736, 0.447534069],
      [9, 1.4850131622, 0.3573533264],
      [15, 1.7359134449, 0.3010415703],
    ];
    for (const [m, mean, variance] of fixture) {
      const r = maxOfNormals(m);
      expect(Math.abs(r.mean - mean)).toBeLessThan(2e-10);
      expect(Math.abs(r.variance - variance)).toBeLessThan(2e-10);
    }
  });
});

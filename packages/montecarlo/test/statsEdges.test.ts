/**
 * Edges of the Wilson and sigma intervals and of the streaming moments: the smallest valid
 * arguments, the first invalid ones (each error names its function and argument), and the
 * cases where a branch of the formula is chosen. References beside each check.
 */
import { describe, expect, it } from 'vitest';
import { wilson } from '../src/stats/wilson.js';
import { chiSquareQuantile, sigmaIntervalBonett, sigmaIntervalChiSquare } from '../src/stats/sigmaInterval.js';
import { addBlock, addSamples, emptyMoments, kurtosis, mergeMoments, variance, type Moments } from '../src/stats/moments.js';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('wilson: argument checks', () => {
  it('n, failures and confidence out of range throw a RangeError naming them', () => {
    for (const n of [0, -1, 1.5, Number.NaN, 2 ** 53]) {
      expect(() => wilson(0, n, 0.95)).toThrow(RangeError);
      expect(() => wilson(0, n, 0.95)).toThrow(/^wilson: n must/);
    }
    for (const x of [-1, 11, 0.5, Number.NaN]) expect(() => wilson(x, 10, 0.95)).toThrow(/^wilson: failures must/);
    for (const c of [0, 1, -0.5, 2, Number.NaN]) expect(() => wilson(1, 10, c)).toThrow(/^wilson: confidence must/);
  });

  it('one trial is valid: 0/1 at 95% gives [0, z^2 / (1 + z^2)] (Wilson 1927, x = 0)', () => {
    // z = 1.959963984540054 (A&S 1964 table 26.1); z^2 / (1 + z^2) = 0.7934...; 1e-14 relative.
    const z2 = 1.959963984540054 ** 2;
    const [lo, hi] = wilson(0, 1, 0.95);
    expect(lo).toBe(0);
    expect(rel(hi, z2 / (1 + z2))).toBeLessThan(1e-14);
  });
});

describe('wilson: all failures', () => {
  it('x = n gives an upper bound of exactly 1 (n = 999, 1000, 12345)', () => {
    // At x = n the quadratic (1 - p)^2 = z^2 p (1 - p) / n has the root p = 1 (Wilson 1927);
    // computed from the passes (0 of n) it is 1 - 0, exactly 1. Direct evaluation of the
    // upper root from the failures rounds to 1 - 1.1e-16 at n = 999 (checked by hand in node).
    for (const n of [999, 1000, 12345]) expect(wilson(n, n, 0.95)[1]).toBe(1);
  });
});

describe('chi-square and Bonett sigma intervals: edges', () => {
  it('chiSquareQuantile rejects p outside (0, 1) and a dof that is not a positive finite number', () => {
    for (const p of [0, 1, -0.1, Number.NaN]) expect(() => chiSquareQuantile(p, 3)).toThrow(/^chiSquareQuantile: p must/);
    for (const dof of [0, -1, Number.NaN, Infinity]) {
      expect(() => chiSquareQuantile(0.5, dof)).toThrow(RangeError);
      expect(() => chiSquareQuantile(0.5, dof)).toThrow(/^chiSquareQuantile: dof must/);
    }
  });

  it('N = 2 (one dof) is valid: s = 1 at 95% gives [0.446149184920709, 31.9101593496440] (sigma_edges.py)', () => {
    // Tolerance 1e-10 relative: jStat's chi-square quantile is good to ~1e-11 (measured
    // against SciPy in sigmaInterval.test.ts).
    const [lo, hi] = sigmaIntervalChiSquare(1, 2, 0.95);
    expect(rel(lo, 0.446149184920708858)).toBeLessThan(1e-10);
    expect(rel(hi, 31.9101593496439636)).toBeLessThan(1e-10);
  });

  it('s = 0 is valid (every sample equal): the chi-square interval is [0, 0]', () => {
    // The interval scales with s (Johnson & Kotz 1970, ch. 17): s = 0 gives exactly 0.
    expect(sigmaIntervalChiSquare(0, 10, 0.95)).toEqual([0, 0]);
  });

  it.each([
    ['sigmaIntervalChiSquare', (s: number, n: number, c: number) => sigmaIntervalChiSquare(s, n, c)],
    ['sigmaIntervalBonett', (s: number, n: number, c: number) => sigmaIntervalBonett(s, n, 3, c)],
  ] as const)('%s names itself and the argument', (name, fn) => {
    for (const s of [-1, Number.NaN, Infinity]) expect(() => fn(s, 10, 0.95)).toThrow(new RegExp(`^${name}: sampleStdDev must`));
    for (const n of [1, 10.5, Number.NaN]) expect(() => fn(1, n, 0.95)).toThrow(new RegExp(`^${name}: count must`));
    for (const c of [0, 1, -0.5, 2, Number.NaN]) expect(() => fn(1, 10, c)).toThrow(new RegExp(`^${name}: confidence must`));
  });

  it('Bonett at kurtosis 1 (the least any sample has) matches the formula (bonett_interval.py)', () => {
    // 1e-12 relative, as for the other Bonett reference values.
    const [lo, hi] = sigmaIntervalBonett(1, 100, 1, 0.95);
    expect(rel(lo, 0.9925248716240856)).toBeLessThan(1e-12);
    expect(rel(hi, 1.0276734563815388)).toBeLessThan(1e-12);
  });

  it('Bonett needs count > z: at 99.999% (z = 4.4172) 4 samples throw, 5 give the formula', () => {
    // c = n / (n - z) must be positive (Bonett 2006). 5 samples: bonett_interval.py, 1e-10
    // relative (the interval spans 13 decades, so exp(z se) amplifies the roundings).
    expect(() => sigmaIntervalBonett(1, 4, 3, 0.99999)).toThrow(/^sigmaIntervalBonett: count 4 must exceed z = 4.417/);
    const [lo, hi] = sigmaIntervalBonett(1, 5, 3, 0.99999);
    expect(rel(lo, 6.800690427471223e-7)).toBeLessThan(1e-10);
    expect(rel(hi, 12614720.832332155)).toBeLessThan(1e-10);
  });
});

const of = (...xs: number[]): Moments => addSamples(emptyMoments(), Float64Array.from(xs), 0, xs.length);

describe('moments: edges', () => {
  it('addSamples rejects a slice that is not 0 <= start <= end, naming both', () => {
    const v = new Float64Array(5);
    for (const [s, e] of [[-1, 2], [3, 2], [0.5, 2], [0, 2.5], [Number.NaN, 2]] as const) {
      expect(() => addSamples(emptyMoments(), v, s, e)).toThrow(RangeError);
      expect(() => addSamples(emptyMoments(), v, s, e)).toThrow(/^addSamples: need integers 0 <= start <= end, got start=/);
    }
    // The edges are valid: an empty slice at 0, and a slice to the end.
    expect(addSamples(emptyMoments(), v, 0, 0).count).toBe(0);
    expect(addSamples(emptyMoments(), v, 2, 5).count).toBe(3);
  });

  it('a fourth moment that overflows throws though the mean and M2 are finite (+-1e100)', () => {
    // Mean 0, M2 = 2e200 (finite), M4 = 2e400 = Infinity: the statistics would be silently wrong.
    const v = Float64Array.of(1e100, -1e100);
    expect(() => addSamples(emptyMoments(), v, 0, 2)).toThrow(/^addSamples: values\[0\.\.2\) contain a NaN or infinite value; the sampler must produce finite numbers$/);
    expect(() => addBlock(emptyMoments(), v, 0, 2)).toThrow(/^addBlock: values\[0\.\.2\) contain a NaN or infinite value/);
    expect(() => addBlock(emptyMoments(), Float64Array.of(1, Number.NaN), 0, 2)).toThrow(/^addBlock: .*NaN or infinite/);
    expect(() => addBlock(emptyMoments(), Float64Array.of(1, Infinity), 0, 2)).toThrow(RangeError);
  });

  it('addBlock tracks min and max: [3, -2, 7, 1] gives -2 and 7, and keeps an earlier extreme', () => {
    // By inspection of the data.
    const m = addBlock(emptyMoments(), Float64Array.of(3, -2, 7, 1), 0, 4);
    expect(m.min).toBe(-2);
    expect(m.max).toBe(7);
    addBlock(m, Float64Array.of(0, 5), 0, 2);
    expect(m.min).toBe(-2);
    expect(m.max).toBe(7);
    addBlock(m, Float64Array.of(-9, 8, 4), 0, 3);
    expect(m.min).toBe(-9);
    expect(m.max).toBe(8);
    // Its first value may be the extreme: [-4, 0] and [4, 0].
    expect(addBlock(emptyMoments(), Float64Array.of(-4, 0), 0, 2).min).toBe(-4);
    expect(addBlock(emptyMoments(), Float64Array.of(4, 0), 0, 2).max).toBe(4);
  });

  it('the empty state is the identity of the merge, even for a state whose mean is 1e100', () => {
    // Chan, Golub & LeVeque 1983: merging with nothing changes nothing. Written out for an
    // empty side, the merge's d^4 n_a n_b / n term would be Infinity * 0 = NaN here.
    const s = of(1e100, 1e100);
    expect(mergeMoments(emptyMoments(), s)).toEqual(s);
    expect(mergeMoments(s, emptyMoments())).toEqual(s);
  });

  it('two samples are enough for the variance and the kurtosis: [1, 3] gives 2 and 1', () => {
    // Variance ((1-2)^2 + (3-2)^2) / (2 - 1) = 2; kurtosis n M4 / M2^2 = 2 * 2 / 2^2 = 1.
    expect(variance(of(1, 3))).toBe(2);
    expect(kurtosis(of(1, 3))).toBe(1);
  });

  it('kurtosis of fewer than 2 samples, or of equal samples, throws naming the cause', () => {
    expect(() => kurtosis(of(1))).toThrow(/^kurtosis: need at least 2 samples, got count=1$/);
    expect(() => kurtosis(emptyMoments())).toThrow(/^kurtosis: need at least 2 samples, got count=0$/);
    expect(() => kurtosis(of(5, 5, 5))).toThrow(/^kurtosis: every sample is equal \(M2 = 0\), so the kurtosis is not defined$/);
  });
});

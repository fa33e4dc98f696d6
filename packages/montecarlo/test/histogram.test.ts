import { describe, it, expect } from 'vitest';
import { mulberry32 } from './testRandom.js';
import fc from 'fast-check';
import {
  addToHistogram,
  binWidth,
  createHistogram,
  exactQuantile,
  histogramTotal,
  mergeHistograms,
  quantileFromHistogram,
} from '../src/stats/histogram.js';
import { normalPdf, normalQuantile } from '../src/stats/normal.js';


/** Test-only Box-Muller normals (Box & Muller, Ann. Math. Stat. 29, 1958). */
function seededNormals(n: number, seed: number): Float64Array {
  const rand = mulberry32(seed);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i += 2) {
    const r = Math.sqrt(-2 * Math.log(1 - rand()));
    const t = 2 * Math.PI * rand();
    out[i] = r * Math.cos(t);
    if (i + 1 < n) out[i + 1] = r * Math.sin(t);
  }
  return out;
}

describe('exactQuantile (type 7)', () => {
  const data = Float64Array.of(3, 6, 7, 8, 8, 10, 13, 15, 16, 20);
  it('hand-computed values on ten points', () => {
    // Computed by hand from h = (n - 1) p: p = 0.25 -> h = 2.25 -> 7 + 0.25 (8 - 7) = 7.25;
    // p = 0.5 -> h = 4.5 -> 8 + 0.5 (10 - 8) = 9; p = 0.75 -> h = 6.75 -> 13 + 0.75 (15 - 13)
    // = 14.5 (R's quantile() gives the same, from memory). Tolerance 1e-15 absolute
    // (one multiply-add on small numbers).
    expect(Math.abs(exactQuantile(data, 0.25) - 7.25)).toBeLessThan(1e-15);
    expect(Math.abs(exactQuantile(data, 0.5) - 9)).toBeLessThan(1e-15);
    expect(Math.abs(exactQuantile(data, 0.75) - 14.5)).toBeLessThan(1e-14);
    expect(Math.abs(exactQuantile(data, 0.1) - 5.7)).toBeLessThan(1e-14); // h = 0.9: 3 + 0.9 * 3
  });

  it('endpoints are the extremes, a single value is every quantile', () => {
    // Definition (h = 0 and h = n - 1); exact.
    expect(exactQuantile(data, 0)).toBe(3);
    expect(exactQuantile(data, 1)).toBe(20);
    expect(exactQuantile(Float64Array.of(4.5), 0.3)).toBe(4.5);
    expect(exactQuantile(Float64Array.of(1, 2, 3, 4), 0.5)).toBe(2.5);
  });

  it('throws on empty data and bad p', () => {
    expect(() => exactQuantile(new Float64Array(0), 0.5)).toThrow(/empty/);
    expect(() => exactQuantile(data, 1.2)).toThrow(/p must/);
  });
});

describe('histogram counting and merging', () => {
  it('edges: lo counts in bin 0, hi and above overflow, below lo underflows', () => {
    // Hand-counted: [0, 4) in 4 bins of width 1.
    const h = createHistogram(0, 4, 4);
    addToHistogram(h, Float64Array.of(0, 0.999, 1, 2.5, 3.999999, 4, 7, -0.001, -5), 0, 9);
    expect(Array.from(h.counts)).toEqual([2, 1, 1, 1]);
    expect(h.underflow).toBe(2);
    expect(h.overflow).toBe(2);
    expect(histogramTotal(h)).toBe(9);
    expect(binWidth(h)).toBe(1);
  });

  it('a value one ulp below hi lands in the last bin, not past it', () => {
    // (x - lo) * scale can round up to `bins`; the clamp keeps it in range. Exact.
    const hi = 0.3;
    const h = createHistogram(0.1, hi, 7);
    const justBelow = hi - Number.EPSILON * hi;
    addToHistogram(h, Float64Array.of(justBelow), 0, 1);
    expect(h.counts[6]).toBe(1);
    expect(h.overflow).toBe(0);
  });

  it('merging chunked histograms equals one pass over the same data (identity, exact counts)', () => {
    const values = seededNormals(10_000, 5);
    const whole = addToHistogram(createHistogram(-3, 3, 60), values, 0, values.length);
    let merged = createHistogram(-3, 3, 60);
    for (let s = 0; s < values.length; s += 1337) {
      const part = addToHistogram(createHistogram(-3, 3, 60), values, s, Math.min(s + 1337, values.length));
      merged = mergeHistograms(merged, part);
    }
    expect(Array.from(merged.counts)).toEqual(Array.from(whole.counts));
    expect(merged.underflow).toBe(whole.underflow);
    expect(merged.overflow).toBe(whole.overflow);
    expect(structuredClone(merged)).toEqual(merged); // plain data for thread messages
  });

  it('merging different edges throws, naming the edges', () => {
    expect(() => mergeHistograms(createHistogram(0, 1, 10), createHistogram(0, 1, 11))).toThrow(/edges differ/);
    expect(() => mergeHistograms(createHistogram(0, 1, 10), createHistogram(0, 2, 10))).toThrow(/edges differ/);
  });

  it('NaN throws; bad construction throws', () => {
    const h = createHistogram(0, 1, 2);
    expect(() => addToHistogram(h, Float64Array.of(0.5, Number.NaN), 0, 2)).toThrow(/NaN/);
    expect(() => createHistogram(1, 1, 3)).toThrow(/lo < hi/);
    expect(() => createHistogram(0, 1, 0)).toThrow(/bins/);
  });
});

describe('quantileFromHistogram', () => {
  it('hand example: one value at each bin centre of [0, 10)', () => {
    // Computed by hand: rank 5 of 10 ends bin 4, so the median reads its right edge 5.0
    // (type 7 gives (4.5 + 5.5)/2 = 5 as well); p = 0.1 -> rank 1 -> right edge of bin 0 = 1.0,
    // type 7 gives 1.4: within one bin width (1), as documented. Tolerance 1e-12 absolute.
    const centres = Float64Array.from({ length: 10 }, (_, i) => i + 0.5);
    const h = addToHistogram(createHistogram(0, 10, 10), centres, 0, 10);
    expect(Math.abs(quantileFromHistogram(h, 0.5) - 5)).toBeLessThan(1e-12);
    expect(Math.abs(quantileFromHistogram(h, 0.1) - 1)).toBeLessThan(1e-12);
    expect(Math.abs(quantileFromHistogram(h, 0.1) - exactQuantile(centres, 0.1))).toBeLessThanOrEqual(1);
    expect(quantileFromHistogram(h, 0)).toBe(0); // left edge of the first non-empty bin
    expect(quantileFromHistogram(h, 1)).toBe(10); // right edge of the last non-empty bin
  });

  it('seeded normal sample of 2e5: within one bin width of the exact quantile', () => {
    // Documented bound (dense data: a bin of width 0.025 near the 0.001 quantile still
    // holds ~17 values). Test-local mulberry32 + Box-Muller, seed 1.
    const n = 200_000;
    const values = seededNormals(n, 1);
    const h = addToHistogram(createHistogram(-6, 6, 480), values, 0, n);
    const sorted = Float64Array.from(values).sort();
    const width = binWidth(h);
    for (const p of [0.001, 0.01, 0.1, 0.25, 0.5, 0.75, 0.9, 0.99, 0.999]) {
      const exact = exactQuantile(sorted, p);
      expect(Math.abs(quantileFromHistogram(h, p) - exact)).toBeLessThanOrEqual(width);
      // And the sample quantile itself is near Phi^-1(p): asymptotic SE
      // sqrt(p (1 - p) / n) / phi(z_p) (Cramér 1946, sample quantiles); 4 SE threshold.
      const z = normalQuantile(p);
      const se = Math.sqrt((p * (1 - p)) / n) / normalPdf(z);
      expect(Math.abs(exact - z)).toBeLessThan(4 * se);
    }
  });

  it('flags quantiles in the underflow (-Infinity) and overflow (+Infinity)', () => {
    // 3 of 10 values below the range, 2 above: ranks <= 3 are underflow, > 8 overflow. Exact.
    const h = addToHistogram(
      createHistogram(0, 1, 4),
      Float64Array.of(-1, -2, -3, 0.1, 0.2, 0.3, 0.6, 0.9, 5, 6),
      0,
      10,
    );
    expect(quantileFromHistogram(h, 0.3)).toBe(-Infinity);
    expect(quantileFromHistogram(h, 0.05)).toBe(-Infinity);
    expect(Number.isFinite(quantileFromHistogram(h, 0.5))).toBe(true);
    expect(quantileFromHistogram(h, 0.85)).toBe(Infinity);
    expect(() => quantileFromHistogram(createHistogram(0, 1, 4), 0.5)).toThrow(/empty/);
  });

  it('is monotonic in p (property)', () => {
    // Identity of any quantile function; exact comparison.
    const values = seededNormals(5000, 9);
    const h = addToHistogram(createHistogram(-3, 3, 50), values, 0, values.length);
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (a, b) => {
        const [p, q] = a <= b ? [a, b] : [b, a];
        return quantileFromHistogram(h, p) <= quantileFromHistogram(h, q);
      }),
      { seed: 13, numRuns: 500 },
    );
  });
});

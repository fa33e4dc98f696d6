import { describe, it, expect } from 'vitest';
import { mulberry32, relErr } from './testRandom.js';
import fc from 'fast-check';
import { addBlock, addSamples, emptyMoments, kurtosis, mergeMoments, stdDev, variance } from '../src/stats/moments.js';
import type { Moments } from '../src/stats/moments.js';

function onePass(values: Float64Array): Moments {
  return addSamples(emptyMoments(), values, 0, values.length);
}


describe('moments: reference values', () => {
  it('[2, 4, 4, 4, 5, 5, 7, 9]: mean 5, sample variance 32/7, min 2, max 9', () => {
    // Computed by hand: deviations -3,-1,-1,-1,0,0,2,4, squares sum to 32.
    // Tolerance 1e-15 relative (a few roundings on small integers).
    const m = onePass(Float64Array.of(2, 4, 4, 4, 5, 5, 7, 9));
    expect(m.count).toBe(8);
    expect(relErr(m.mean, 5)).toBeLessThan(1e-15);
    expect(relErr(variance(m), 32 / 7)).toBeLessThan(1e-15);
    expect(relErr(stdDev(m), Math.sqrt(32 / 7))).toBeLessThan(1e-15);
    expect(m.min).toBe(2);
    expect(m.max).toBe(9);
    // Cubes -27 -1 -1 -1 0 0 8 64 sum to 42; fourth powers 81 1 1 1 0 0 16 256 to 356;
    // kurtosis 8 * 356 / 32^2 = 2.78125 (by hand). Tolerance 1e-14 relative.
    expect(relErr(m.m3, 42)).toBeLessThan(1e-14);
    expect(relErr(m.m4, 356)).toBeLessThan(1e-14);
    expect(relErr(kurtosis(m), 2.78125)).toBeLessThan(1e-14);
  });

  it('kurtosis of a small data set: 4.5097352526170225 (test/fixtures/bonett_interval.py)', () => {
    // The script computes n sum (x - mean)^4 / (sum (x - mean)^2)^2 directly from the definition.
    // Both paths (one value at a time, one block) to 1e-13 relative (a few dozen roundings).
    const data = Float64Array.of(1.5, -0.25, 3.0, 0.75, -2.0, 0.5, 8.0, -1.0, 0.0, 2.25);
    expect(relErr(kurtosis(onePass(data)), 4.5097352526170225)).toBeLessThan(1e-13);
    expect(relErr(kurtosis(addBlock(emptyMoments(), data, 0, data.length)), 4.5097352526170225)).toBeLessThan(1e-13);
  });

  it('seeded uniform and Laplace samples of 2e5: kurtosis 1.8 and 6 within 4 standard errors', () => {
    // U(0,1): kurtosis 9/5; Laplace: 6 (moment ratios mu4 / mu2^2 from the densities, by hand).
    // SE of the sample kurtosis ~ sqrt(Var((x-mu)^4 / sigma^4 - 2 k (x-mu)^2 / sigma^2) / n)
    // (delta method, common practice, no source); estimated here from the sample itself.
    const n = 200_000;
    const rand = mulberry32(77);
    const u = new Float64Array(n);
    const l = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      u[i] = rand();
      const v = rand() - 0.5;
      l[i] = -Math.sign(v) * Math.log(1 - 2 * Math.abs(v));
    }
    for (const [values, k] of [[u, 1.8], [l, 6]] as const) {
      const m = onePass(values);
      const s2 = m.m2 / n;
      let acc = 0;
      let acc2 = 0;
      for (const x of values) {
        const d2 = (x - m.mean) ** 2 / s2;
        const t = d2 * d2 - 2 * k * d2;
        acc += t;
        acc2 += t * t;
      }
      const se = Math.sqrt((acc2 / n - (acc / n) ** 2) / n);
      expect(Math.abs(kurtosis(m) - k)).toBeLessThan(4 * se);
    }
  });

  it('a large offset does not destroy the variance: 1e9 + [4, 7, 13, 16] has variance 30', () => {
    // Computed by hand (deviations -6, -3, 3, 6; squares sum to 90; 90/3 = 30). The naive
    // sum-of-squares formula loses everything here (1e18 terms); Welford's update keeps the
    // data's own resolution, ulp(1e9) = 1.2e-7 per value, so the tolerance is 1e-7 relative.
    const m = onePass(Float64Array.of(1e9 + 4, 1e9 + 7, 1e9 + 13, 1e9 + 16));
    expect(relErr(variance(m), 30)).toBeLessThan(1e-7);
    expect(m.mean).toBe(1e9 + 10); // exact: every running mean here is a representable double
  });

  it('seeded uniform sample of 1e5: mean 1/2 and variance 1/12 within 4 standard errors', () => {
    // U(0,1) has mean 1/2, variance 1/12 (definition). SE(mean) = sqrt(1/12 / n);
    // SE(variance) = sqrt((mu4 - sigma^4) / n) with mu4 = 1/80: sqrt((1/80 - 1/144) / n).
    const n = 100_000;
    const rand = mulberry32(2024);
    const values = new Float64Array(n);
    for (let i = 0; i < n; i++) values[i] = rand();
    const m = onePass(values);
    expect(Math.abs(m.mean - 0.5)).toBeLessThan(4 * Math.sqrt(1 / 12 / n));
    expect(Math.abs(variance(m) - 1 / 12)).toBeLessThan(4 * Math.sqrt((1 / 80 - 1 / 144) / n));
  });
});

describe('moments: merging (Chan, Golub & LeVeque 1983; Pebay 2008)', () => {
  it('merging 7 uneven chunks equals one pass to 1e-12 relative', () => {
    // Identity. Both are backward-stable; with 1e5 values of mean 3, sd 2 the rounding
    // differences are ~1e-14 relative, so 1e-12 is a safe bound.
    const n = 100_000;
    const rand = mulberry32(7);
    const values = new Float64Array(n);
    for (let i = 0; i < n; i++) values[i] = 3 + 2 * Math.sqrt(12) * (rand() - 0.5);
    const whole = onePass(values);
    const cuts = [0, 1, 10, 999, 25_000, 25_001, 70_000, n];
    let merged = emptyMoments();
    for (let c = 0; c + 1 < cuts.length; c++) {
      const part = addSamples(emptyMoments(), values, cuts[c] as number, cuts[c + 1] as number);
      merged = mergeMoments(merged, part);
    }
    expect(merged.count).toBe(n);
    expect(relErr(merged.mean, whole.mean)).toBeLessThan(1e-12);
    expect(relErr(merged.m2, whole.m2)).toBeLessThan(1e-12);
    // M3 of symmetric data is near 0, so it is compared to the scale sqrt(M2 M4 / n).
    expect(Math.abs(merged.m3 - whole.m3)).toBeLessThan(1e-12 * Math.sqrt((whole.m2 * whole.m4) / n));
    expect(relErr(merged.m4, whole.m4)).toBeLessThan(1e-12);
    expect(merged.min).toBe(whole.min);
    expect(merged.max).toBe(whole.max);
  });

  it('splitting anywhere and merging gives the one-pass result (property)', () => {
    // Identity. The rounding of both paths scales with the data's sum of squares about zero,
    // so m2 is compared to 1e-12 of (m2 + count mean^2) and mean to 1e-12 of max |x|.
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 2, maxLength: 300 }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (list, u) => {
          const values = Float64Array.from(list);
          const cut = Math.floor(u * values.length);
          const whole = onePass(values);
          const merged = mergeMoments(
            addSamples(emptyMoments(), values, 0, cut),
            addSamples(emptyMoments(), values, cut, values.length),
          );
          const scale = Math.max(whole.max, -whole.min, 1e-300);
          const m2Scale = whole.m2 + whole.count * whole.mean * whole.mean + 1e-300;
          // Higher sums: their rounding scales with count * max|x|^p.
          const m3Scale = whole.count * scale ** 3 + 1e-300;
          const m4Scale = whole.count * scale ** 4 + 1e-300;
          const block = addBlock(addBlock(emptyMoments(), values, 0, cut), values, cut, values.length);
          return (
            merged.count === whole.count &&
            Math.abs(merged.mean - whole.mean) <= 1e-12 * scale &&
            Math.abs(merged.m2 - whole.m2) <= 1e-12 * m2Scale &&
            Math.abs(merged.m3 - whole.m3) <= 1e-12 * m3Scale &&
            Math.abs(merged.m4 - whole.m4) <= 1e-12 * m4Scale &&
            Math.abs(block.m3 - whole.m3) <= 1e-12 * m3Scale &&
            Math.abs(block.m4 - whole.m4) <= 1e-12 * m4Scale &&
            merged.min === whole.min &&
            merged.max === whole.max
          );
        },
      ),
      { seed: 31, numRuns: 500 },
    );
  });

  it('merge is order-independent and leaves its inputs untouched', () => {
    // Identity; the merge formula is symmetric up to rounding: 1e-15 relative.
    const a = onePass(Float64Array.of(1, 2, 3));
    const b = onePass(Float64Array.of(10, 20));
    const before = { ...a };
    const ab = mergeMoments(a, b);
    const ba = mergeMoments(b, a);
    expect(a).toEqual(before);
    expect(relErr(ab.mean, ba.mean)).toBeLessThan(1e-15);
    expect(relErr(ab.m2, ba.m2)).toBeLessThan(1e-15);
    expect(relErr(ab.m4, ba.m4)).toBeLessThan(1e-14);
    expect(mergeMoments(emptyMoments(), b)).toEqual(b);
  });

  it('state survives structured cloning (thread messages), infinities included', () => {
    // Plain-data requirement; exact equality.
    const empty = emptyMoments();
    expect(structuredClone(empty)).toEqual(empty);
    const m = onePass(Float64Array.of(0.5, -1.5, 4));
    expect(structuredClone(m)).toEqual(m);
  });
});

describe('moments: failures are loud', () => {
  it('a NaN or infinity throws and leaves the state unchanged', () => {
    const m = onePass(Float64Array.of(1, 2));
    const before = { ...m };
    expect(() => addSamples(m, Float64Array.of(3, Number.NaN, 4), 0, 3)).toThrow(/NaN or infinite/);
    expect(() => addSamples(m, Float64Array.of(Infinity), 0, 1)).toThrow(/NaN or infinite/);
    expect(m).toEqual(before);
  });

  it('bad slices and too few samples throw', () => {
    expect(() => addSamples(emptyMoments(), new Float64Array(3), 2, 5)).toThrow(/past values.length/);
    expect(() => variance(onePass(Float64Array.of(1)))).toThrow(/at least 2/);
  });

  it('a slice adds only its own elements', () => {
    // Exact: integers.
    const m = addSamples(emptyMoments(), Float64Array.of(100, 1, 2, 3, 100), 1, 4);
    expect(m.count).toBe(3);
    expect(m.mean).toBe(2);
    expect(m.max).toBe(3);
  });
});

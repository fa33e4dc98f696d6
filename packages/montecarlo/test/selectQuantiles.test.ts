import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { exactQuantile } from '../src/stats/histogram.js';
import { selectQuantiles, selectSignedAndAbsolute, withoutNaN } from '../src/stats/selectQuantiles.js';
import { mulberry32 } from './testRandom.js';

// Reference for every check: a full ascending sort followed by the type-7 interpolation
// (Hyndman & Fan, American Statistician 50(4), 1996), i.e. `exactQuantile` on the sorted data.
// The selection claims the same bits, so the tolerance is zero (Object.is: -0 and +0 differ).
const LEVELS = [0, 0.001, 0.01, 0.25, 0.5, 0.75, 0.99, 0.999, 1];

function bySort(values: Float64Array, levels: readonly number[], absolute = false): number[] {
  const sorted = (absolute ? values.map(Math.abs) : values.slice()).sort();
  return levels.map((p) => exactQuantile(sorted, p));
}

function same(got: readonly number[], want: readonly number[], levels: readonly number[], what: string): void {
  got.forEach((g, i) => {
    if (!Object.is(g, want[i])) throw new Error(`${what} p=${levels[i]}: got ${g}, full sort gives ${want[i]}`);
  });
}

/**
 * Both functions against the full sort; the combined one with no bounds, with the data's own
 * minimum and maximum (as a run passes them), and with bounds that hold only part of the data
 * or far more than it (the clamped bins must still give the same bits, only more slowly).
 */
function expectSame(values: Float64Array, levels: readonly number[] = LEVELS): void {
  const want = { signed: bySort(values, levels, false), absolute: bySort(values, levels, true) };
  for (const absolute of [false, true]) same(selectQuantiles(values, levels, { absolute }), absolute ? want.absolute : want.signed, levels, `absolute=${absolute}`);
  let min = Infinity;
  let max = -Infinity;
  for (const x of values) {
    min = Math.min(min, x);
    max = Math.max(max, x);
  }
  const mid = 0.5 * (min + max);
  const tries = { none: undefined, own: { min, max }, inner: { min: mid - 0.1 * (max - mid), max: mid + 0.05 * (max - mid) }, wide: { min: 10 * min - 1, max: 1e3 * max + 1 } };
  for (const [name, bounds] of Object.entries(tries)) {
    const got = selectSignedAndAbsolute(values, levels, bounds);
    same(got.signed, want.signed, levels, `combined (${name} bounds), signed`);
    same(got.absolute, want.absolute, levels, `combined (${name} bounds), absolute`);
  }
}

/** Test-only Box-Muller normals (Box & Muller, Ann. Math. Stat. 29, 1958). */
function normals(n: number, seed: number, scale = 1): Float64Array {
  const rand = mulberry32(seed);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = scale * Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
  return out;
}

describe('selectQuantiles equals a full sort', () => {
  it('normal data large enough to be binned twice over', () => {
    expectSame(normals(300_000, 11, 3.9e-3));
    expectSame(normals(4097, 12)); // just above the size that is sorted directly
    expectSame(normals(4096, 13)); // sorted directly
  });

  it('ties: values on a coarse grid, so the wanted ranks fall inside runs of equal values', () => {
    const x = normals(200_000, 21).map((v) => Math.round(v * 4) / 4);
    expectSame(x);
    // One value almost everywhere: the bins of the wanted ranks are all of one value.
    const y = new Float64Array(50_000).fill(2.5);
    for (let i = 0; i < 50; i++) y[i * 1000] = i - 25;
    expectSame(y);
  });

  it('all equal, mixed signed zeros, single and two values', () => {
    expectSame(new Float64Array(10_000).fill(-7));
    const zeros = new Float64Array(10_000);
    for (let i = 0; i < zeros.length; i += 3) zeros[i] = -0;
    expectSame(zeros);
    expectSame(Float64Array.of(0.3));
    expectSame(Float64Array.of(2, -1));
  });

  it('outliers that put nearly everything into one bin of the first level', () => {
    const x = normals(100_000, 31);
    x[5] = 1e300;
    x[6] = -1e300;
    expectSame(x);
    const z = normals(100_000, 32);
    z[9] = Number.MAX_VALUE; // hi - lo overflows: a sort does it
    z[10] = -Number.MAX_VALUE;
    expectSame(z);
  });

  it('property: random mixtures of spreads and ties (fast-check, fixed seed)', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 20_000 }),
        fc.integer({ min: 0, max: 2 ** 31 - 1 }),
        fc.constantFrom(0, 1, 16, 1e6),
        fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 1, maxLength: 5 }),
        (n, seed, grid, levels) => {
          const x = normals(n, seed).map((v) => (grid === 0 ? v : Math.round(v * grid) / grid));
          expectSame(x, levels);
        },
      ),
      { seed: 140, numRuns: 60 },
    );
  });

  it('rejects NaN, empty data and levels outside [0, 1]', () => {
    const x = normals(10_000, 41);
    x[17] = Number.NaN;
    expect(() => selectQuantiles(x, [0.5])).toThrow(/NaN/);
    expect(() => selectQuantiles(new Float64Array(0), [0.5])).toThrow(/empty/);
    expect(() => selectQuantiles(Float64Array.of(1, 2), [1.5])).toThrow(/p must/);
    expect(() => selectSignedAndAbsolute(x, [0.5])).toThrow(/selectSignedAndAbsolute: the values contain NaN/);
    expect(() => selectSignedAndAbsolute(x, [0.5], { min: -5, max: 5 })).toThrow(/NaN/);
    expect(() => selectSignedAndAbsolute(new Float64Array(0), [0.5])).toThrow(/selectSignedAndAbsolute: the data are empty/);
    expect(() => selectSignedAndAbsolute(Float64Array.of(1, 2), [-0.1])).toThrow(/selectSignedAndAbsolute: p must be in \[0, 1\], got -0.1/);
  });
});

describe('withoutNaN', () => {
  it('returns the same array when there is no NaN', () => {
    const x = Float64Array.of(1, -0, 3);
    expect(withoutNaN(x)).toBe(x);
  });

  it('drops NaNs anywhere, keeps order and leaves the input unchanged', () => {
    const x = Float64Array.of(Number.NaN, 1, Number.NaN, -2, 3, Number.NaN);
    const y = withoutNaN(x);
    expect(Array.from(y)).toEqual([1, -2, 3]);
    expect(Number.isNaN(x[0]!) && Number.isNaN(x[5]!) && x[3] === -2).toBe(true);
    expect(withoutNaN(Float64Array.of(Number.NaN)).length).toBe(0);
  });

  it('quantiles after compaction equal the old filter-and-sort path', () => {
    const x = normals(60_000, 51);
    for (let i = 0; i < x.length; i += 97) x[i] = Number.NaN;
    const kept = withoutNaN(x);
    expect(kept.length).toBe(60_000 - Math.ceil(60_000 / 97));
    const old = x.filter((v) => v === v);
    expectSame(kept);
    const want = bySort(old, LEVELS);
    selectQuantiles(kept, LEVELS).forEach((g, i) => expect(Object.is(g, want[i])).toBe(true));
  });
});

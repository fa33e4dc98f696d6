import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { EXP_SMALL_LIMIT, EXPM1_LARGE_MAX, EXPM1_LARGE_MIN, EXPM1_SMALL_LIMIT, expm1Large, expm1Small, expSmall } from '../src/expSmall.js';

// The bound the sampling loops rely on: expSmall is within 2 ulp of Node's Math.exp over its
// whole polynomial range |x| <= 1/32, expm1Small of Math.expm1 over |x| <= 1/4, expm1Large of
// Math.expm1 over 1 <= x <= 700 (and each is the Math function, or expm1Small, outside). Points: a dense grid,
// the range's ends and their neighbouring doubles, tiny and subnormal arguments, and a
// fast-check property with a fixed seed.

const f64 = new Float64Array(1);
const i64 = new BigInt64Array(f64.buffer);
/** Doubles in order as integers, so the ulp distance of a and b is |ord(a) - ord(b)|. */
function ord(x: number): bigint {
  f64[0] = x;
  const b = i64[0]!;
  return b < 0n ? -(b & 0x7fffffffffffffffn) : b;
}
const ulps = (a: number, b: number): number => Number(ord(a) > ord(b) ? ord(a) - ord(b) : ord(b) - ord(a));
/** The double k steps away from x (away from zero for k > 0). */
function step(x: number, k: number): number {
  f64[0] = x;
  i64[0] = i64[0]! + BigInt(k);
  return f64[0]!;
}

describe('expSmall within 2 ulp of Math.exp', () => {
  it('over the whole polynomial range (grid, ends, tiny arguments)', () => {
    const xs: number[] = [];
    const grid = 1_000_000;
    for (let i = 0; i <= grid; i++) xs.push(-EXP_SMALL_LIMIT + (2 * EXP_SMALL_LIMIT * i) / grid);
    for (let k = 0; k < 50; k++) xs.push(step(EXP_SMALL_LIMIT, -k), -step(EXP_SMALL_LIMIT, -k));
    for (let e = -1074; e <= -6; e += 3) xs.push(2 ** e, -(2 ** e));
    xs.push(0, -0);
    let worst = 0;
    let at = 0;
    for (const x of xs) {
      const d = ulps(expSmall(x), Math.exp(x));
      if (d > worst) [worst, at] = [d, x];
    }
    if (worst > 2) throw new Error(`${worst} ulp at x = ${at}`);
    expect(worst).toBeLessThanOrEqual(2);
  });

  it('property: random arguments in the range (fast-check, fixed seed)', () => {
    fc.assert(
      fc.property(fc.double({ min: -EXP_SMALL_LIMIT, max: EXP_SMALL_LIMIT, noNaN: true }), (x) => ulps(expSmall(x), Math.exp(x)) <= 2),
      { seed: 1432, numRuns: 50_000 },
    );
  });

  it('outside the range it is Math.exp itself', () => {
    for (const x of [step(EXP_SMALL_LIMIT, 1), -step(EXP_SMALL_LIMIT, 1), 0.5, -3, 709, -745, Infinity, -Infinity]) {
      expect(Object.is(expSmall(x), Math.exp(x))).toBe(true);
    }
    expect(Number.isNaN(expSmall(Number.NaN))).toBe(true);
  });

  it('e^0.01 is the double nearest 1.01005016708416805754... (test/fixtures/exp-small-reference.py)', () => {
    // Python's decimal module at 40 digits; the nearest double is 1.010050167084168, 0.49 ulp
    // below the true value. expSmall is within 0.54 ulp of the true value, so within 1 ulp of it.
    expect(ulps(expSmall(0.01), 1.010050167084168)).toBeLessThanOrEqual(1);
  });
});

describe('expm1Small within 2 ulp of Math.expm1', () => {
  it('over the whole polynomial range (grid, ends, tiny arguments)', () => {
    const xs: number[] = [];
    const grid = 1_000_000;
    for (let i = 0; i <= grid; i++) xs.push(-EXPM1_SMALL_LIMIT + (2 * EXPM1_SMALL_LIMIT * i) / grid);
    for (let k = 0; k < 50; k++) xs.push(step(EXPM1_SMALL_LIMIT, -k), -step(EXPM1_SMALL_LIMIT, -k));
    for (let e = -1074; e <= -3; e += 3) xs.push(2 ** e, -(2 ** e));
    xs.push(0, -0);
    let worst = 0;
    let at = 0;
    for (const x of xs) {
      const d = ulps(expm1Small(x), Math.expm1(x));
      if (d > worst) [worst, at] = [d, x];
    }
    if (worst > 2) throw new Error(`${worst} ulp at x = ${at}`);
    expect(worst).toBeLessThanOrEqual(2);
  });

  it('property: random arguments in the range (fast-check, fixed seed)', () => {
    fc.assert(
      fc.property(fc.double({ min: -EXPM1_SMALL_LIMIT, max: EXPM1_SMALL_LIMIT, noNaN: true }), (x) => ulps(expm1Small(x), Math.expm1(x)) <= 2),
      { seed: 1433, numRuns: 50_000 },
    );
  });

  it('outside the range it is Math.expm1 itself; the sign of zero is kept', () => {
    for (const x of [step(EXPM1_SMALL_LIMIT, 1), -step(EXPM1_SMALL_LIMIT, 1), 1, -3, 709, -745, Infinity, -Infinity]) {
      expect(Object.is(expm1Small(x), Math.expm1(x))).toBe(true);
    }
    expect(Object.is(expm1Small(-0), -0)).toBe(true);
    expect(Number.isNaN(expm1Small(Number.NaN))).toBe(true);
  });
});

describe('expm1Large within 2 ulp of Math.expm1', () => {
  it('over the whole reduced range 1 <= x <= 700 (grids, the ends, the points where k changes)', () => {
    const xs: number[] = [];
    const grid = 1_000_000;
    for (let i = 0; i <= grid; i++) xs.push(EXPM1_LARGE_MIN + ((EXPM1_LARGE_MAX - EXPM1_LARGE_MIN) * i) / grid);
    // The region the mirror stage uses most (s = sqrt(IC) of 1 to 30), more densely.
    for (let i = 0; i <= grid; i++) xs.push(1 + (29 * i) / grid);
    for (let k = 0; k < 50; k++) xs.push(step(EXPM1_LARGE_MIN, k), step(EXPM1_LARGE_MAX, -k));
    // Either side of each (k + 1/2) ln 2, where the rounding of x / ln 2 switches k.
    for (let k = 1; k <= 1010; k++) {
      const x = (k + 0.5) * Math.LN2;
      if (x > EXPM1_LARGE_MAX) break;
      for (let j = -3; j <= 3; j++) xs.push(step(x, j));
    }
    let worst = 0;
    let at = 0;
    for (const x of xs) {
      const d = ulps(expm1Large(x), Math.expm1(x));
      if (d > worst) [worst, at] = [d, x];
    }
    if (worst > 2) throw new Error(`${worst} ulp at x = ${at}`);
    expect(worst).toBeLessThanOrEqual(2);
  });

  it('property: random arguments in the range (fast-check, fixed seed)', () => {
    fc.assert(
      fc.property(fc.double({ min: EXPM1_LARGE_MIN, max: EXPM1_LARGE_MAX, noNaN: true }), (x) => ulps(expm1Large(x), Math.expm1(x)) <= 2),
      { seed: 1434, numRuns: 50_000 },
    );
  });

  it('e^2 - 1 is the double nearest 6.38905609893065022... (test/fixtures/exp-small-reference.py)', () => {
    // Python's decimal module at 40 digits: e^2 - 1 = 6.389056098930650227230427460575..., its
    // nearest double 6.38905609893065 is 0.20 ulp above it. expm1Large rounds twice (e^r - 1, then
    // 7 + 8 (e^r - 1) with 2^k = 8), each within half an ulp of its result, so it lands within
    // 1 ulp of that double.
    expect(ulps(expm1Large(2), 6.38905609893065)).toBeLessThanOrEqual(1);
  });

  it('outside the range it is expm1Small (its polynomial to |x| = 1/4, else Math.expm1)', () => {
    for (const x of [step(EXPM1_LARGE_MIN, -1), 0.5, 0.1, -0.2, -3, step(EXPM1_LARGE_MAX, 1), 709, Infinity, -Infinity]) {
      expect(Object.is(expm1Large(x), expm1Small(x))).toBe(true);
    }
    expect(Number.isNaN(expm1Large(Number.NaN))).toBe(true);
  });
});

/**
 * e^x and e^x - 1 for small arguments, as polynomials the compiler inlines (expm1Small below).
 *
 * expSmall: e^x for the small exponents of the mismatch factors (e^{sigma_beta z} and the like), as a
 * polynomial the compiler inlines: the degree-8 Taylor polynomial for |x| <= 1/32, Math.exp
 * beyond. Truncation: the first term left out is at most (1/32)^9 / 9! < 8e-20 of the result.
 * Rounding: it is computed as 1 + (x + t), t = x^2/2 + ... + x^8/8! <= 1/1900 of the result;
 * x + t <= 1/31 is rounded to 2^-53 of itself, 0.03 ulp of the result, so the last addition's
 * half ulp is nearly all: within 0.54 ulp of e^x, and within 2 ulp of Math.exp over the whole
 * of |x| <= 1/32 (tested in packages/core/test/expSmall.test.ts). It is inlined where Math.exp
 * is a call, which in the sampling loops saves 2-5 ns a call.
 */

/** |x| up to which expSmall uses its polynomial. */
export const EXP_SMALL_LIMIT = 1 / 32;

/**
 * e^x: a polynomial for |x| <= 1/32, Math.exp otherwise.
 * @example expSmall(0.01) // 1.010050167084168
 */
export function expSmall(x: number): number {
  if (!(x >= -EXP_SMALL_LIMIT && x <= EXP_SMALL_LIMIT)) return Math.exp(x);
  const x2 = x * x;
  const x4 = x2 * x2;
  // 1 + x + x^2/2! + ... + x^8/8!, grouped in pairs (Estrin) so the terms do not wait on one another.
  return 1 + (x + (x2 * ((1 / 2 + x * (1 / 6)) + x2 * (1 / 24 + x * (1 / 120))) + x4 * x2 * ((1 / 720 + x * (1 / 5040)) + x2 * (1 / 40320))));
}

/** |x| up to which expm1Small uses its polynomial. */
export const EXPM1_SMALL_LIMIT = 1 / 4;

/**
 * e^x - 1 for |x| <= 1/4 as its Taylor polynomial to degree 14, x + x^2 P(x) (the first omitted
 * term is below (1/4)^14 / 15! < 3e-21 of the result), Math.expm1 beyond. The correction x^2 P(x) is at most
 * 14% of the result, so its roundings add at most 0.3 ulp to the last addition's half ulp: within
 * 0.8 ulp of e^x - 1 and within 2 ulp of Math.expm1 over |x| <= 1/4 (tested).
 * @example expm1Small(0.1) // 0.10517091807564763
 */
export function expm1Small(x: number): number {
  if (!(x >= -EXPM1_SMALL_LIMIT && x <= EXPM1_SMALL_LIMIT)) return Math.expm1(x);
  if (x === 0) return x; // keeps the sign of zero
  return expm1Taylor(x);
}

/** e^x - 1 by its Taylor polynomial to degree 14, x + x^2 P(x), P grouped (Estrin); for |x| <= 0.35. */
function expm1Taylor(x: number): number {
  const x2 = x * x;
  const x4 = x2 * x2;
  const x8 = x4 * x4;
  return (
    x +
    x2 *
      (1 / 2 + x * (1 / 6) + x2 * (1 / 24 + x * (1 / 120)) +
        x4 * (1 / 720 + x * (1 / 5040) + x2 * (1 / 40320 + x * (1 / 362880))) +
        x8 * (1 / 3628800 + x * (1 / 39916800) + x2 * (1 / 479001600 + x * (1 / 6227020800)) + x4 * (1 / 87178291200)))
  );
}

// expm1Large: e^x - 1 = 2^k e^r - 1 with k = round(x / ln 2) and r = x - k ln 2 in two parts
// (Cody & Waite; the constants and the reduction of fdlibm's e_exp.c, Sun Microsystems 1993), so
// |r| <= ln(2)/2 + 1e-9 and e^r - 1 is expm1Small's Taylor polynomial (degree 14) there: its
// first omitted term is below 0.3466^15 / 15! = 8.4e-20, 0.001 ulp of e^r >= 0.707.
const LN2_HI = 6.93147180369123816490e-1; // ln 2 to 32 bits: k * LN2_HI is exact for |k| < 2^21
const LN2_LO = 1.90821492927058770002e-10; // ln 2 - LN2_HI
const INV_LN2 = 1.4426950408889634;
/** 1.5 * 2^52: (t + SHIFT) - SHIFT is t rounded to the nearest integer for |t| < 2^51. */
const SHIFT = 6755399441055744;
/** 2^k at k, k = 0 .. 1023. */
const POW2 = new Float64Array(1024);
for (let k = 0; k < 1024; k++) POW2[k] = 2 ** k;

/** Range of expm1Large's own code; expm1Small (its polynomial, else Math.expm1) outside. */
export const EXPM1_LARGE_MIN = 1;
export const EXPM1_LARGE_MAX = 700;

/**
 * e^x - 1 for 1 <= x <= 700 as (2^k - 1) + 2^k (e^r - 1), k >= 1: 2^k - 1 is exact up to k = 53,
 * the two terms have the same sign or the first is at least 3 times the second, so nothing
 * cancels; within 2 ulp of Math.expm1 (tested). Outside that range it is expm1Small. The
 * sampling loops call it where Math.expm1 would be a call out of the optimised loop (13 ns on the
 * benchmark machine, against 10 ns here).
 * @example expm1Large(2) // 6.38905609893065
 */
export function expm1Large(x: number): number {
  if (!(x >= EXPM1_LARGE_MIN && x <= EXPM1_LARGE_MAX)) return expm1Small(x);
  const k = x * INV_LN2 + SHIFT - SHIFT;
  const r = x - k * LN2_HI - k * LN2_LO;
  const t = POW2[k | 0]!;
  return t - 1 + t * expm1Taylor(r);
}

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
 * e^x - 1 for |x| <= 1/4 as its degree-13 Taylor polynomial, x + x^2 P(x) (truncation below
 * (1/4)^13 / 14! < 2e-19 of the result), Math.expm1 beyond. The correction x^2 P(x) is at most
 * 14% of the result, so its roundings add at most 0.3 ulp to the last addition's half ulp: within
 * 0.8 ulp of e^x - 1 and within 2 ulp of Math.expm1 over |x| <= 1/4 (tested).
 * @example expm1Small(0.1) // 0.10517091807564763
 */
export function expm1Small(x: number): number {
  if (!(x >= -EXPM1_SMALL_LIMIT && x <= EXPM1_SMALL_LIMIT)) return Math.expm1(x);
  if (x === 0) return x; // keeps the sign of zero
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

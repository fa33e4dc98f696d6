/**
 * e^x for the small exponents of the mismatch factors (e^{sigma_beta z} and the like), as a
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

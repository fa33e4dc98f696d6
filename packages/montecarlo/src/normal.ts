/**
 * Standard-normal distribution functions that stay accurate in the far tails.
 * Tails are computed with erfc (never 1 - erf) and quantiles with erfcinv, so a failure
 * probability of 1e-12 or a quantile at p = 1e-300 keeps close to full relative precision.
 * Identities used: Phi(x) = erfc(-x / sqrt 2) / 2 and Phi^-1(p) = -sqrt(2) erfcinv(2p)
 * (Abramowitz & Stegun 1964, 7.1.2 and 26.2.29).
 */
import erfc from '@stdlib/math-base-special-erfc';
import erfcinv from '@stdlib/math-base-special-erfcinv';

const INV_SQRT2 = Math.SQRT1_2;
const INV_SQRT_2PI = 1 / Math.sqrt(2 * Math.PI);

/**
 * Standard-normal cumulative distribution Phi(x) = P(Z <= x).
 * @example normalCdf(1.959963984540054) // 0.975
 */
export function normalCdf(x: number): number {
  return 0.5 * erfc(-x * INV_SQRT2);
}

/**
 * Upper tail P(Z > x) = Phi(-x), accurate to full relative precision for large x.
 * @example normalUpperTail(6) // 9.8658764503769e-10
 */
export function normalUpperTail(x: number): number {
  return 0.5 * erfc(x * INV_SQRT2);
}

/**
 * Two-sided tail P(|Z| > k) = 2 Phi(-k) for k >= 0: the failure probability of a
 * symmetric +-k sigma specification. Throws for negative or NaN k.
 * @example twoSidedTail(6) // 1.973175290e-9
 */
export function twoSidedTail(k: number): number {
  if (!(k >= 0)) {
    throw new RangeError(`twoSidedTail: k must be a number >= 0 (sigmas), got ${k}`);
  }
  return erfc(k * INV_SQRT2);
}

/**
 * Standard-normal quantile Phi^-1(p) for p in [0, 1]; -Infinity at 0 and +Infinity at 1.
 * Accurate in the lower tail down to the smallest doubles (p = 1e-300 gives -37.0471).
 * Near p = 1 the result is limited by the absolute precision of p itself; pass the upper
 * tail to {@link sigmaLevel} or use -normalQuantile(q) with q = 1 - p when q is known.
 * @example normalQuantile(0.975) // 1.959963984540054
 */
export function normalQuantile(p: number): number {
  if (!(p >= 0 && p <= 1)) {
    throw new RangeError(`normalQuantile: p must be a probability in [0, 1], got ${p}`);
  }
  // Work from the nearer tail: 2p (p < 1/2) or 2(1 - p) (exact for p >= 1/2, Sterbenz).
  return p < 0.5 ? -Math.SQRT2 * erfcinv(2 * p) : Math.SQRT2 * erfcinv(2 * (1 - p));
}

/**
 * Sigma level of a two-sided failure probability: k with P(|Z| > k) = pTwoSided, that is
 * Phi^-1(1 - p/2), computed as sqrt(2) erfcinv(p) so that p = 1e-12 still gives 7.1305.
 * Returns +Infinity at p = 0 and 0 at p = 1.
 * @example sigmaLevel(1.973175290e-9) // 6
 */
export function sigmaLevel(pTwoSided: number): number {
  if (!(pTwoSided >= 0 && pTwoSided <= 1)) {
    throw new RangeError(
      `sigmaLevel: pTwoSided must be a probability in [0, 1], got ${pTwoSided}`,
    );
  }
  return Math.SQRT2 * erfcinv(pTwoSided);
}

/**
 * Standard-normal density phi(x) = exp(-x^2 / 2) / sqrt(2 pi).
 * @example normalPdf(0) // 0.3989422804014327
 */
export function normalPdf(x: number): number {
  return INV_SQRT_2PI * Math.exp(-0.5 * x * x);
}

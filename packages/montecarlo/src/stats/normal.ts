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

/** Below this the upper tail is a normal double; above it Phi(-x) heads for underflow (~38.5). */
const LOG_TAIL_SWITCH = 37;
const HALF_LOG_2PI = 0.5 * Math.log(2 * Math.PI);

/**
 * ln Phi(-x), the log of the upper tail, finite for every finite x >= 0 (also where Phi(-x)
 * underflows to 0). Beyond x = 37 it uses the asymptotic series of the Mills ratio,
 * Phi(-x) = phi(x)/x (1 - 1/x^2 + 3/x^4 - 15/x^6 + 105/x^8 - ...) (Abramowitz & Stegun 1964,
 * 26.2.12), whose first omitted term is below 3e-13 there.
 * @example logNormalUpperTail(40) // -804.608442013754
 */
export function logNormalUpperTail(x: number): number {
  if (!(x >= 0 && x < Infinity)) {
    throw new RangeError(`logNormalUpperTail: x must be a finite number >= 0, got ${x}`);
  }
  if (x < LOG_TAIL_SWITCH) return Math.log(normalUpperTail(x));
  return -0.5 * x * x - Math.log(x) - HALF_LOG_2PI + Math.log(millsSeries(x));
}

/** x Phi(-x) / phi(x) = 1 - 1/x^2 + 3/x^4 - 15/x^6 + 105/x^8 for x >= 37 (A&S 26.2.12). */
function millsSeries(x: number): number {
  const r = 1 / (x * x);
  return 1 - r * (1 - 3 * r * (1 - 5 * r * (1 - 7 * r)));
}

/**
 * Two-sided sigma level k of a failure probability given as a sum of one-sided tails
 * sum_i Phi(-d_i) (FORM with one design point per side): 2 Phi(-k) = sum_i Phi(-d_i).
 * Stays finite where the sum underflows (distances beyond ~38, such as a very large pair at a
 * loose spec): there it solves ln Phi(-k) = ln(sum/2) in log space by Newton's method.
 * @example sigmaLevelOfTails([6, 6]) // 6
 * @example sigmaLevelOfTails([600, 600]) // 600
 */
export function sigmaLevelOfTails(distances: readonly number[]): number {
  if (distances.length === 0) throw new RangeError('sigmaLevelOfTails: no distances');
  let p = 0;
  for (const d of distances) p += normalUpperTail(d);
  if (p >= 1e-300) return sigmaLevel(Math.min(1, p));
  const logs = distances.map(logNormalUpperTail);
  const top = Math.max(...logs);
  let acc = 0;
  for (const l of logs) acc += Math.exp(l - top);
  const target = top + Math.log(acc) - Math.LN2;
  // ln Phi(-k) is smooth and decreasing with slope -phi(k)/Phi(-k) = -k / millsSeries(k)
  // (k > 37 here, since the sum underflowed): Newton from the leading-order root
  // sqrt(-2 target), which lies above the root, converges in a few steps. The slope comes
  // from the series, not from exp(ln phi - ln Phi): that difference cancels at large k.
  let k = Math.sqrt(-2 * target);
  for (let i = 0; i < 50; i++) {
    const step = ((logNormalUpperTail(k) - target) * millsSeries(k)) / -k;
    k = Math.max(LOG_TAIL_SWITCH, k - step);
    if (Math.abs(step) <= 1e-15 * k) break;
  }
  return k;
}

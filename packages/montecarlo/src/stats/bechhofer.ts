/**
 * Bechhofer's probability of a correct selection: of k normal populations with a common sigma,
 * the best (mean D above the other k - 1) gives the largest single observation with probability
 *   P(k, tau) = integral phi(z) Phi(z + tau)^(k-1) dz,   tau = D / sigma
 * (condition on the best population's draw D + sigma z: each other one stays below it with
 * probability Phi(z + tau)). Bechhofer, "A single-sample multiple decision procedure for ranking
 * means of normal populations with known variances", Annals of Mathematical Statistics 25(1),
 * 1954; for k = 2 it is Phi(tau / sqrt 2).
 *
 * Quadrature. The wrong-selection probability 1 - P = integral f(z) dz, f(z) = phi(z) G(z),
 * G(z) = 1 - Phi(z + tau)^(k-1), is integrated directly (never as 1 - P), in log form, so it keeps
 * its relative precision down to the smallest doubles. G is the survival function of the maximum
 * of k - 1 normals, whose density is log-concave, so G is log-concave (Bagnoli & Bergstrom,
 * Economic Theory 26, 2005) and -ln f has curvature of at least 1 (that of phi). Hence
 * f(z* + t) <= f(z*) e^{-t^2/2} about its peak z*, found by golden-section search; outside
 * z* +- 13 the integrand is below e^{-84} f(z*), while the integral is at least
 * f(z*) sqrt(2 pi / C) with C <= 1 + 2 ln k + 4 the largest curvature, so the truncation is below
 * 1e-35 of the result. Inside, composite 20-point Gauss-Legendre on panels of width 0.5, where f
 * is analytic and no narrower than a Gaussian of sigma 1/sqrt(C) >= 0.2: the panel error is far
 * below double rounding (checked against Bechhofer's Table I and by halving the panels in the
 * tests).
 */
import erfc from '@stdlib/math-base-special-erfc';

const LN_SQRT_2PI = 0.5 * Math.log(2 * Math.PI);
const SQRT1_2 = Math.SQRT1_2;

/** Gauss-Legendre nodes and weights on [-1, 1] by Newton on P_n (the usual gauleg recipe). */
function gaussLegendre(n: number): { x: Float64Array; w: Float64Array } {
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let it = 0; it < 100; it++) {
      let p0 = 1;
      let p1 = 0;
      for (let j = 1; j <= n; j++) {
        const p2 = p1;
        p1 = p0;
        p0 = ((2 * j - 1) * z * p1 - (j - 1) * p2) / j;
      }
      dp = (n * (z * p0 - p1)) / (z * z - 1);
      const dz = p0 / dp;
      z -= dz;
      if (Math.abs(dz) < 1e-16) break;
    }
    x[i] = z;
    w[i] = 2 / ((1 - z * z) * dp * dp);
  }
  return { x, w };
}

const GL = gaussLegendre(20);
/** Panel width of the composite rule, and the half-width of the range about the peak. */
const PANEL = 0.5;
const HALF_RANGE = 13;

/** ln Q(x), Q the standard-normal upper tail, for any x (asymptotic series where erfc underflows). */
function lnUpperTail(x: number): number {
  if (x < 37) return Math.log(0.5 * erfc(x * SQRT1_2));
  // Q(x) = phi(x)/x (1 - 1/x^2 + 3/x^4 - 15/x^6 + ...); the next term is below 4e-11 here.
  const r = 1 / (x * x);
  return -0.5 * x * x - LN_SQRT_2PI - Math.log(x) + Math.log1p(r * (-1 + r * (3 - 15 * r)));
}

/** ln Phi(x), accurate on both sides. */
function lnCdf(x: number): number {
  return x < 0 ? Math.log(0.5 * erfc(-x * SQRT1_2)) : Math.log1p(-0.5 * erfc(x * SQRT1_2));
}

/** ln G(z) = ln(1 - Phi(z + tau)^m), m = k - 1 >= 1. */
function lnSurvivalOfMax(x: number, m: number, lnM: number): number {
  if (x >= 37) return lnM + lnUpperTail(x); // Phi^m = 1 - m Q to far below rounding
  return Math.log(-Math.expm1(m * lnCdf(x)));
}

/** ln f(z) = ln phi(z) + ln G(z). */
function lnIntegrand(z: number, tau: number, m: number, lnM: number): number {
  return -0.5 * z * z - LN_SQRT_2PI + lnSurvivalOfMax(z + tau, m, lnM);
}

function checkPopulations(k: number): void {
  if (!(Number.isInteger(k) && k >= 2)) throw new RangeError(`populations must be a whole number >= 2, got ${k}`);
}

/**
 * ln of the wrong-selection probability 1 - P(k, tau) (finite even where the probability
 * itself underflows).
 * @param k populations (>= 2)
 * @param tau separation over the per-population sigma, D / sigma (finite)
 */
export function lnWrongSelection(k: number, tau: number): number {
  checkPopulations(k);
  if (!Number.isFinite(tau)) throw new RangeError(`tau must be finite, got ${tau}`);
  const m = k - 1;
  const lnM = Math.log(m);
  // The peak of the log-concave integrand lies in [-|tau| - 12, 0]: ln f is increasing below
  // (G is ~1 there, so ln f' ~ -z > 0) and decreasing above 0 (both factors decrease).
  let a = -Math.abs(tau) - 12;
  let b = 0;
  const gr = (Math.sqrt(5) - 1) / 2;
  let c = b - gr * (b - a);
  let d = a + gr * (b - a);
  let fc = lnIntegrand(c, tau, m, lnM);
  let fd = lnIntegrand(d, tau, m, lnM);
  while (b - a > 1e-3) {
    if (fc > fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - gr * (b - a);
      fc = lnIntegrand(c, tau, m, lnM);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + gr * (b - a);
      fd = lnIntegrand(d, tau, m, lnM);
    }
  }
  const peak = 0.5 * (a + b);
  const top = lnIntegrand(peak, tau, m, lnM);
  const panels = Math.round((2 * HALF_RANGE) / PANEL);
  const start = peak - HALF_RANGE;
  const half = 0.5 * PANEL;
  let sum = 0;
  for (let p = 0; p < panels; p++) {
    const mid = start + (p + 0.5) * PANEL;
    for (let i = 0; i < GL.x.length; i++) sum += GL.w[i]! * Math.exp(lnIntegrand(mid + half * GL.x[i]!, tau, m, lnM) - top);
  }
  return top + Math.log(sum * half);
}

/**
 * Probability of a wrong selection, 1 - P(k, tau), to full relative precision in the tail.
 * @example wrongSelection(2, 1.8124) // 0.1000 (Bechhofer 1954, Table I: k = 2, P = 0.90)
 */
export function wrongSelection(k: number, tau: number): number {
  return Math.exp(lnWrongSelection(k, tau));
}

/**
 * Bechhofer's probability of a correct selection P(k, tau) = integral phi(z) Phi(z + tau)^(k-1) dz.
 * @example correctSelection(3, 2.7101) // 0.9500 (Bechhofer 1954, Table I)
 */
export function correctSelection(k: number, tau: number): number {
  return 1 - wrongSelection(k, tau);
}

/**
 * The tau = D / sigma at which the wrong-selection probability is `failure` (the inverse of
 * wrongSelection), to 1e-13 relative. 0 when failure >= 1 - 1/k (met with no separation).
 * @param failure the allowed probability of a wrong selection, in (0, 1)
 * @example selectionSeparation(10, 0.01) // 4.2456 (Bechhofer 1954, Table I: k = 10, P = 0.99)
 */
export function selectionSeparation(k: number, failure: number): number {
  checkPopulations(k);
  if (!(failure > 0 && failure < 1)) throw new RangeError(`failure must be a probability in (0, 1), got ${failure}`);
  const target = Math.log(failure);
  const g = (t: number): number => lnWrongSelection(k, t) - target;
  let lo = 0;
  let glo = g(0);
  if (glo <= 0) return 0;
  let hi = 1;
  let ghi = g(hi);
  while (ghi > 0) {
    lo = hi;
    glo = ghi;
    hi *= 2;
    ghi = g(hi);
  }
  // Illinois regula falsi on ln(failure), which is smooth and nearly quadratic in tau.
  let side = 0;
  for (let it = 0; it < 100 && hi - lo > 1e-13 * hi; it++) {
    const t = (lo * ghi - hi * glo) / (ghi - glo);
    const gt = g(t);
    if (gt === 0) return t;
    if (gt > 0) {
      lo = t;
      glo = gt;
      if (side === -1) ghi *= 0.5;
      side = -1;
    } else {
      hi = t;
      ghi = gt;
      if (side === 1) glo *= 0.5;
      side = 1;
    }
  }
  return 0.5 * (lo + hi);
}

/**
 * Mean and variance of the largest of m independent standard normals (density
 * m phi(z) Phi(z)^(m-1)), by the same composite Gauss-Legendre rule on [-12, 12 + sqrt(2 ln m)]
 * (outside it the density is below m phi(12) < 1e-28).
 * @example maxOfNormals(2) // { mean: 0.5642 (= 1/sqrt(pi)), variance: 0.6817 (= 1 - 1/pi) }
 */
export function maxOfNormals(m: number): { mean: number; variance: number } {
  if (!(Number.isInteger(m) && m >= 1)) throw new RangeError(`m must be a whole number >= 1, got ${m}`);
  if (m === 1) return { mean: 0, variance: 1 };
  const lnM = Math.log(m);
  const lo = -12;
  const hi = 12 + Math.sqrt(2 * lnM);
  const width = 0.25;
  const panels = Math.ceil((hi - lo) / width);
  const half = 0.5 * width;
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  for (let p = 0; p < panels; p++) {
    const mid = lo + (p + 0.5) * width;
    for (let i = 0; i < GL.x.length; i++) {
      const z = mid + half * GL.x[i]!;
      const f = GL.w[i]! * Math.exp(lnM - 0.5 * z * z - LN_SQRT_2PI + (m - 1) * lnCdf(z));
      s0 += f;
      s1 += f * z;
      s2 += f * z * z;
    }
  }
  // s0 * half is 1 to rounding; dividing by it removes the rule's last rounding from the moments.
  const mean = s1 / s0;
  return { mean, variance: s2 / s0 - mean * mean };
}

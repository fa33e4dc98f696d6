/**
 * Clopper-Pearson ("exact") confidence interval on a failure probability from x failures in
 * n independent trials (Clopper & Pearson, Biometrika 26(4):404-413, 1934):
 *   lower = BetaInv(a/2; x, n - x + 1), upper = BetaInv(1 - a/2; x + 1, n - x),
 * with 0 and 1 at the edges, a = 1 - confidence.
 *
 * Why not jStat.beta.inv alone: for n of 1e8 to 1e9 its answer is off by up to ~1e-7 relative
 * (measured: 6e-8 at 3 failures in 1e8, 1.3e-7 at 3 in 1e9), because its incomplete beta
 * loses digits in gammaln(n) ~ 1.7e9 and its Newton loop stops at a loose tolerance.
 * Here jStat only supplies the starting point; each bound is then solved
 * on an accurate binomial tail: Loader's saddle-point form of the binomial probability
 * (C. Loader, "Fast and accurate computation of binomial probabilities", 2000) times the
 * continued fraction of the incomplete beta function (Abramowitz & Stegun 1964, 26.5.8,
 * evaluated by Lentz's method), which keeps ~1e-13 relative accuracy for n up to 1e9 and more.
 */
import jStat from 'jstat';

const LOG_2PI = Math.log(2 * Math.PI);
const TINY = 1e-300;
const CF_EPS = 1e-15;

/**
 * The work the bounds take, summed since the last `takeBoundWork` (this thread): tail
 * evaluations of the bracketed Newton solve, continued-fraction terms (Lentz steps) and summed
 * binomial terms. None of it changes a bound (each solve stops on its own tolerance); it is what
 * a bound costs, and a test holds it to a budget (clopperPearsonWork.test.ts), so a spoilt start,
 * slope or switch point, which the bounds' reference tests cannot see, fails a test.
 */
let tailEvaluations = 0;
let fractionTerms = 0;
let sumTerms = 0;

/** The bounds' work since the last call, and resets the counts. */
export function takeBoundWork(): { tails: number; fractionTerms: number; sumTerms: number } {
  const work = { tails: tailEvaluations, fractionTerms, sumTerms };
  tailEvaluations = 0;
  fractionTerms = 0;
  sumTerms = 0;
  return work;
}

/** log(n!) - log(sqrt(2 pi n) (n/e)^n): the Stirling-formula error for integer n >= 1. */
function stirlingError(n: number): number {
  if (n <= 15) {
    let factorial = 1;
    for (let i = 2; i <= n; i++) factorial *= i; // exact: 15! < 2^53
    return Math.log(factorial) - (n + 0.5) * Math.log(n) + n - 0.5 * LOG_2PI;
  }
  // Stirling series (A&S 6.1.40): 1/12n - 1/360n^3 + 1/1260n^5 - 1/1680n^7 + 1/1188n^9.
  const r = 1 / n;
  const r2 = r * r;
  return r * (1 / 12 - r2 * (1 / 360 - r2 * (1 / 1260 - r2 * (1 / 1680 - r2 / 1188))));
}

/** Deviance term x log(x/m) + m - x, by a series when x is close to m (Loader 2000). */
function devianceTerm(x: number, m: number): number {
  if (Math.abs(x - m) < 0.1 * (x + m)) {
    const v = (x - m) / (x + m);
    const v2 = v * v;
    let s = (x - m) * v;
    let ej = 2 * x * v;
    for (let j = 1; j < 1000; j++) {
      ej *= v2;
      const next = s + ej / (2 * j + 1);
      if (next === s) return s;
      s = next;
    }
    return s;
  }
  return x * Math.log(x / m) + m - x;
}

/**
 * Binomial probability P(X = k), X ~ Bin(n, p), for integers 0 <= k <= n.
 * q = 1 - p is passed in so that neither is ever re-derived from the other by subtraction.
 */
function binomialPmf(k: number, n: number, p: number, q: number): number {
  if (k === 0) return n === 0 ? 1 : Math.exp(n * (p < 0.5 ? Math.log1p(-p) : Math.log(q)));
  if (k === n) return Math.exp(n * (q < 0.5 ? Math.log1p(-q) : Math.log(p)));
  const lc =
    stirlingError(n) -
    stirlingError(k) -
    stirlingError(n - k) -
    devianceTerm(k, n * p) -
    devianceTerm(n - k, n * q);
  const lf = LOG_2PI + Math.log(k) + Math.log1p(-k / n);
  return Math.exp(lc - 0.5 * lf);
}

/**
 * Continued fraction h of the regularised incomplete beta function,
 * I_x(a, b) = x^a (1 - x)^b / (a B(a, b)) * h (A&S 26.5.8), by the modified Lentz method.
 * Converges quickly for x < (a + 1) / (a + b + 2).
 */
function betaContinuedFraction(x: number, a: number, b: number): number {
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  // Near the mean the fraction needs O(sqrt(min(a, b))) terms; bound it generously.
  const maxIter = 1000 + 20 * Math.ceil(Math.sqrt(Math.min(a, b)));
  for (let m = 1; m <= maxIter; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < CF_EPS) {
      fractionTerms += m;
      return h;
    }
  }
  throw new Error(`betaContinuedFraction: no convergence for x=${x}, a=${a}, b=${b}`);
}

/**
 * P(X >= a) for X ~ Bin(n, p), 1 <= a <= n, on the side where the continued fraction
 * converges: P(X >= a) = I_p(a, n - a + 1) = q * P(X = a) * h.
 */
function atLeastDirect(a: number, n: number, p: number, q: number): number {
  return q * binomialPmf(a, n, p, q) * betaContinuedFraction(p, a, n - a + 1);
}

/**
 * P(X <= k) for k below the mode, summing P(X = j) downwards from j = k (the terms shrink
 * geometrically or faster, so about 9 sqrt(n p q) terms at most reach 1e-17 of the sum).
 */
function atMostBySum(k: number, n: number, p: number, q: number): number {
  let term = binomialPmf(k, n, p, q);
  let sum = term;
  for (let j = k; j > 0; j--) {
    term *= (j * q) / ((n - j + 1) * p);
    sum += term;
    sumTerms++;
    if (term <= 1e-17 * sum) break;
  }
  return sum;
}

/** Below this p the lower tail is summed rather than taken from the fraction in q = 1 - p. */
const SUM_BELOW_P = 0.01;

/** Both tails [P(X <= k), P(X > k)], the smaller one computed directly (no cancellation). */
function binomialTails(k: number, n: number, p: number, q: number): [number, number] {
  if (k < 0) return [0, 1];
  if (k >= n) return [1, 0];
  if (p === 0) return [1, 0];
  if (q === 0) return [0, 1];
  const a = k + 1;
  if (p < (a + 1) / (n + 3)) {
    const upper = atLeastDirect(a, n, p, q);
    return [1 - upper, upper];
  }
  // The fraction for P(X <= k) = P(n - X >= n - k) runs in q, and q = 1 - p carries an
  // absolute rounding of ~1e-16, a relative error of 1e-16/p in p itself: 1e-8 at p = 1e-8.
  // For small p sum the (short) lower tail instead; above 0.01 the loss is below 1e-14.
  const lower = p < SUM_BELOW_P ? atMostBySum(k, n, p, q) : atLeastDirect(n - k, n, q, p);
  return [lower, 1 - lower];
}

function checkCounts(failures: number, n: number, fn: string): void {
  if (!(Number.isSafeInteger(n) && n >= 1)) {
    throw new RangeError(`${fn}: n must be a positive integer (number of trials), got ${n}`);
  }
  if (!(Number.isSafeInteger(failures) && failures >= 0 && failures <= n)) {
    throw new RangeError(`${fn}: failures must be an integer in [0, n=${n}], got ${failures}`);
  }
}

function checkConfidence(confidence: number, fn: string): void {
  if (!(confidence > 0 && confidence < 1)) {
    throw new RangeError(`${fn}: confidence must be in (0, 1), e.g. 0.95, got ${confidence}`);
  }
}

function checkTrial(k: number, n: number, p: number, fn: string): void {
  if (!(Number.isSafeInteger(n) && n >= 0)) {
    throw new RangeError(`${fn}: n must be a non-negative integer, got ${n}`);
  }
  if (!Number.isInteger(k)) throw new RangeError(`${fn}: k must be an integer, got ${k}`);
  if (!(p >= 0 && p <= 1)) {
    throw new RangeError(`${fn}: p must be a probability in [0, 1], got ${p}`);
  }
}

/**
 * Binomial cumulative probability P(X <= k), X ~ Bin(n, p); full relative accuracy in
 * the lower tail, for n up to 1e9 and beyond.
 * @example binomialCdf(0, 1000, 0.001) // 0.36769542477096
 */
export function binomialCdf(k: number, n: number, p: number): number {
  checkTrial(k, n, p, 'binomialCdf');
  return binomialTails(k, n, p, 1 - p)[0];
}

/**
 * Binomial survival probability P(X > k), X ~ Bin(n, p); full relative accuracy in the
 * upper tail.
 * @example binomialSurvival(0, 1000, 0.001) // 0.63230457522904
 */
export function binomialSurvival(k: number, n: number, p: number): number {
  checkTrial(k, n, p, 'binomialSurvival');
  return binomialTails(k, n, p, 1 - p)[1];
}

/**
 * Solve tail(p) = target for p in (0, 1) by Newton's method kept inside a bracket
 * (bisection whenever a step leaves it). `tail` returns [value, d value / dp] and is
 * monotonic (increasing or not, as flagged); `guess` is a starting point, typically jStat's
 * Beta quantile.
 */
function solveTail(
  tail: (p: number) => [number, number],
  increasing: boolean,
  target: number,
  guess: number,
): number {
  let lo = 0;
  let hi = 1;
  let p = guess > 0 && guess < 1 ? guess : 0.5;
  for (let iter = 0; iter < 300; iter++) {
    const [value, slope] = tail(p);
    tailEvaluations++;
    const r = value - target;
    if (r === 0) return p;
    if (r > 0 === increasing) hi = p;
    else lo = p;
    const step = r / slope;
    // A converged Newton step can round to p itself, which sits on the bracket edge.
    if (Math.abs(step) <= 1e-14 * p) return p - step;
    let next = p - step;
    if (!(next > lo && next < hi)) next = lo > 0 ? Math.sqrt(lo * hi) : 0.5 * hi;
    if (hi - lo <= 1e-15 * hi) return next;
    p = next;
  }
  throw new Error(`clopperPearson: no convergence solving a binomial tail = ${target}`);
}

/** Lower bound p with P(X >= x | n, p) = tailProbability, for 1 <= x <= n. */
function lowerBound(x: number, n: number, tailProbability: number): number {
  if (x === n) return Math.exp(Math.log(tailProbability) / n);
  const guess = jStat.beta.inv(tailProbability, x, n - x + 1);
  return solveTail(
    (p) => [
      binomialTails(x - 1, n, p, 1 - p)[1],
      n * binomialPmf(x - 1, n - 1, p, 1 - p),
    ],
    true,
    tailProbability,
    guess,
  );
}

/** Upper bound p with P(X <= x | n, p) = tailProbability, for 0 <= x <= n - 1. */
function upperBound(x: number, n: number, tailProbability: number): number {
  // Zero failures: (1 - p)^n = tail in closed form (the rule-of-three case).
  if (x === 0) return -Math.expm1(Math.log(tailProbability) / n);
  const guess = jStat.beta.inv(1 - tailProbability, x + 1, n - x);
  return solveTail(
    (p) => [
      binomialTails(x, n, p, 1 - p)[0],
      -n * binomialPmf(x, n - 1, p, 1 - p),
    ],
    false,
    tailProbability,
    guess,
  );
}

/**
 * Two-sided Clopper-Pearson interval [lo, hi] on the failure probability after `failures`
 * failures in `n` trials, at the given confidence (e.g. 0.95). Guaranteed coverage
 * (conservative); lo = 0 when failures = 0 and hi = 1 when failures = n.
 * A bound near 1 holds only a double's absolute precision (~1e-16): for pass-rate bounds with
 * full relative precision in 1 - p, pass the other count and take 1 - the reversed interval.
 * @example clopperPearson(5, 1000, 0.95) // [0.0016254195, 0.0116294706]
 */
export function clopperPearson(
  failures: number,
  n: number,
  confidence: number,
): [number, number] {
  checkCounts(failures, n, 'clopperPearson');
  checkConfidence(confidence, 'clopperPearson');
  const half = 0.5 * (1 - confidence);
  const lo = failures === 0 ? 0 : lowerBound(failures, n, half);
  const hi = failures === n ? 1 : upperBound(failures, n, half);
  return [lo, hi];
}

/**
 * One-sided Clopper-Pearson upper bound on the failure probability: the p with
 * P(X <= failures | n, p) = 1 - confidence. For zero failures it is 1 - (1 - c)^(1/n),
 * about 3/n at 95% (rule of three; Hanley & Lippman-Hand, JAMA 249(13), 1983).
 * @example oneSidedUpper(0, 1000, 0.95) // 0.0029912
 */
export function oneSidedUpper(failures: number, n: number, confidence: number): number {
  checkCounts(failures, n, 'oneSidedUpper');
  checkConfidence(confidence, 'oneSidedUpper');
  return failures === n ? 1 : upperBound(failures, n, 1 - confidence);
}

/**
 * One-sample Kolmogorov-Smirnov test against a continuous CDF: the statistic
 * D_n = sup |F_n(x) - F(x)|, its exact distribution for moderate n (Marsaglia, Tsang, Wang,
 * "Evaluating Kolmogorov's distribution", J. Statistical Software 8(18), 2003) and the
 * asymptotic p-value from Kolmogorov's limit law P(sqrt(n) D_n <= x) -> K(x)
 * (A. Kolmogorov, Giornale dell'Istituto Italiano degli Attuari 4:83-91, 1933).
 */

/**
 * The statistic D_n = max over order statistics of max(i/n - F(x_i), F(x_i) - (i-1)/n).
 * Sorts a copy of `sample`; throws on an empty sample, a NaN, or a CDF value outside [0, 1].
 * @example ksStatistic(Float64Array.of(0.1, 0.4, 0.7), (x) => x) // 0.3
 */
export function ksStatistic(sample: Float64Array, cdf: (x: number) => number): number {
  const n = sample.length;
  if (n === 0) throw new RangeError('ksStatistic: the sample is empty');
  const sorted = Float64Array.from(sample).sort();
  if (Number.isNaN(sorted[n - 1])) throw new RangeError('ksStatistic: the sample contains NaN');
  let d = 0;
  for (let i = 0; i < n; i++) {
    const f = cdf(sorted[i] as number);
    if (!(f >= 0 && f <= 1)) {
      throw new RangeError(`ksStatistic: cdf(${sorted[i]}) = ${f} is not a probability`);
    }
    const above = (i + 1) / n - f;
    const below = f - i / n;
    if (above > d) d = above;
    if (below > d) d = below;
  }
  return d;
}

/** Below this x the theta-function series (for the CDF) converges faster than the tail one. */
const SERIES_SWITCH = 1.18;

/** sqrt(2 pi)/x * sum_j exp(-(2j-1)^2 pi^2 / (8 x^2)), the CDF series for small x. */
function smallSeries(x: number): number {
  const a = (Math.PI * Math.PI) / (8 * x * x);
  let sum = 0;
  for (let j = 1; j < 100; j++) {
    const odd = 2 * j - 1;
    const term = Math.exp(-odd * odd * a);
    sum += term;
    if (term <= 1e-17 * sum) break;
  }
  return (Math.sqrt(2 * Math.PI) / x) * sum;
}

/** 2 sum_j (-1)^(j-1) exp(-2 j^2 x^2), the survival series for larger x. */
function tailSeries(x: number): number {
  const a = 2 * x * x;
  let sum = 0;
  let sign = 1;
  for (let j = 1; j < 100; j++) {
    const term = Math.exp(-j * j * a);
    sum += sign * term;
    if (term <= 1e-17 * sum) break;
    sign = -sign;
  }
  return 2 * sum;
}

/**
 * Kolmogorov limit distribution K(x) = P(K <= x) = 1 - 2 sum (-1)^(j-1) exp(-2 j^2 x^2).
 * @example kolmogorovCdf(1.36) // 0.9505 (the 5% critical value of sqrt(n) D_n)
 */
export function kolmogorovCdf(x: number): number {
  if (Number.isNaN(x)) throw new RangeError('kolmogorovCdf: x is NaN');
  if (x <= 0) return 0;
  return x < SERIES_SWITCH ? smallSeries(x) : 1 - tailSeries(x);
}

/**
 * Upper tail 1 - K(x) of the Kolmogorov distribution, accurate in relative terms for large x.
 * @example kolmogorovSurvival(1.63) // 0.00985
 */
export function kolmogorovSurvival(x: number): number {
  if (Number.isNaN(x)) throw new RangeError('kolmogorovSurvival: x is NaN');
  if (x <= 0) return 1;
  return x < SERIES_SWITCH ? 1 - smallSeries(x) : tailSeries(x);
}

/**
 * Asymptotic p-value P(D_n >= d) ~ 1 - K(sqrt(n) d). Conservative-to-accurate for large n;
 * for n below a few hundred prefer {@link ksExactCdf}.
 * @example ksAsymptoticPValue(0.043, 1000) // 0.04955
 */
export function ksAsymptoticPValue(d: number, n: number): number {
  if (!(Number.isSafeInteger(n) && n >= 1)) {
    throw new RangeError(`ksAsymptoticPValue: n must be a positive integer, got ${n}`);
  }
  return kolmogorovSurvival(Math.sqrt(n) * d);
}

/** Largest matrix order (2 floor(n d) + 1) that ksExactCdf accepts; cost grows as order^3 log n. */
export const KS_EXACT_MAX_ORDER = 501;

const SCALE = 1e140;

/** C = A B for m x m row-major matrices. */
function multiply(a: Float64Array, b: Float64Array, c: Float64Array, m: number): void {
  c.fill(0);
  for (let i = 0; i < m; i++) {
    for (let k = 0; k < m; k++) {
      const aik = a[i * m + k] as number;
      if (aik === 0) continue;
      const rowB = k * m;
      const rowC = i * m;
      for (let j = 0; j < m; j++) {
        c[rowC + j] = (c[rowC + j] as number) + aik * (b[rowB + j] as number);
      }
    }
  }
}

/**
 * Exact P(D_n < d) for the one-sample statistic of n draws (Marsaglia, Tsang & Wang 2003:
 * an element of the n-th power of an m x m matrix, m = 2 floor(n d) + 1, with powers of
 * 1e140 carried separately to avoid overflow). Accurate to ~13 digits, so a p-value taken as
 * 1 - P is meaningful down to ~1e-12 only. Cost m^3 log2(n) (measured: 30 ms at n = 1000 and
 * 0.6 s at n = 1e4 near the 5% point, 2 s at m = 501); throws when m exceeds
 * {@link KS_EXACT_MAX_ORDER} (use {@link ksAsymptoticPValue} there).
 * @example ksExactCdf(10, 0.274) // 0.6284796154565043
 */
export function ksExactCdf(n: number, d: number): number {
  if (!(Number.isSafeInteger(n) && n >= 1)) {
    throw new RangeError(`ksExactCdf: n must be a positive integer, got ${n}`);
  }
  if (Number.isNaN(d)) throw new RangeError('ksExactCdf: d is NaN');
  // D_n >= 1/(2n) always, and D_n <= 1.
  if (d <= 0.5 / n) return 0;
  if (d >= 1) return 1;
  const k = Math.floor(n * d) + 1;
  const m = 2 * k - 1;
  if (m > KS_EXACT_MAX_ORDER) {
    throw new RangeError(
      `ksExactCdf: n*d = ${n * d} needs a ${m}x${m} matrix (limit ${KS_EXACT_MAX_ORDER}); ` +
        'use ksAsymptoticPValue',
    );
  }
  const h = k - n * d;
  const base = new Float64Array(m * m);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) base[i * m + j] = i - j + 1 < 0 ? 0 : 1;
  }
  for (let i = 0; i < m; i++) {
    base[i * m] = (base[i * m] as number) - h ** (i + 1);
    base[(m - 1) * m + i] = (base[(m - 1) * m + i] as number) - h ** (m - i);
  }
  if (2 * h - 1 > 0) base[(m - 1) * m] = (base[(m - 1) * m] as number) + (2 * h - 1) ** m;
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      const span = i - j + 1;
      if (span > 0) {
        let f = 1;
        for (let g = 2; g <= span; g++) f *= g;
        base[i * m + j] = (base[i * m + j] as number) / f;
      }
    }
  }

  // Binary powering from the most significant bit: result = base^n * SCALE^-resultExp.
  let result = Float64Array.from(base);
  let resultExp = 0;
  let scratch = new Float64Array(m * m);
  const centre = (m >> 1) * m + (m >> 1);
  const bits = n.toString(2);
  for (let b = 1; b < bits.length; b++) {
    multiply(result, result, scratch, m);
    [result, scratch] = [scratch, result];
    resultExp *= 2;
    if (bits[b] === '1') {
      multiply(base, result, scratch, m);
      [result, scratch] = [scratch, result];
    }
    if ((result[centre] as number) > SCALE) {
      for (let i = 0; i < result.length; i++) result[i] = (result[i] as number) / SCALE;
      resultExp += 1;
    }
  }

  // P = n!/n^n * (H^n)[k-1][k-1], with the same bookkeeping in units of SCALE; undoing it by
  // repeated multiplication by the same double keeps it consistent with the divisions above.
  let s = result[(k - 1) * m + (k - 1)] as number;
  let sExp = resultExp;
  for (let i = 1; i <= n; i++) {
    s = (s * i) / n;
    if (s < 1 / SCALE) {
      s *= SCALE;
      sExp -= 1;
    }
  }
  for (; sExp > 0; sExp--) s *= SCALE;
  for (; sExp < 0; sExp++) s /= SCALE;
  return s;
}

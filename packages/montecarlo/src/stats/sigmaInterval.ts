/**
 * Confidence intervals on a standard deviation sigma from the sample standard deviation s of
 * N draws.
 *
 * Chi-square: (N - 1) s^2 / sigma^2 is chi-square with N - 1 degrees of freedom for normal
 * data, so sigma lies in
 *   [s sqrt((N-1) / chi2inv(1 - a/2, N-1)), s sqrt((N-1) / chi2inv(a/2, N-1))].
 * Exact for normal data only: the variance of s^2 grows with the kurtosis, so for heavy-tailed
 * offsets (large current-factor mismatch) the interval is too narrow.
 *
 * Bonett: D. G. Bonett, "Approximate confidence interval for standard deviation of nonnormal
 * distributions", Computational Statistics & Data Analysis 50(3):775-782, 2006. A normal
 * interval on ln(c s^2) whose standard error uses the sample kurtosis, so it holds for
 * non-normal data and is close to the chi-square interval for normal data.
 */
import jStat from 'jstat';
import { normalQuantile } from './normal.js';

/**
 * Degrees of freedom above which chi-square quantiles come from the Wilson-Hilferty
 * approximation instead of jStat. There the approximation's relative error (which falls as
 * dof^-1.5) is ~1.4e-9 at 95% two-sided and ~2e-7 at p = 1e-9, and jStat's iteration gains
 * nothing but time.
 */
export const CHI_SQUARE_APPROXIMATION_DOF = 1e5;

/**
 * Wilson-Hilferty approximation to the chi-square quantile (E. B. Wilson and
 * M. M. Hilferty, "The distribution of chi-square", PNAS 17:684-688, 1931):
 * dof (1 - 2/(9 dof) + z sqrt(2/(9 dof)))^3 with z = Phi^-1(p).
 * @example chiSquareQuantileWilsonHilferty(0.975, 1e5) // 100878.4154 (exact 100878.41530566)
 */
export function chiSquareQuantileWilsonHilferty(p: number, dof: number): number {
  const c = 2 / (9 * dof);
  const t = 1 - c + normalQuantile(p) * Math.sqrt(c);
  return dof * t * t * t;
}

/**
 * Chi-square quantile chi2inv(p, dof): jStat up to {@link CHI_SQUARE_APPROXIMATION_DOF}
 * degrees of freedom (within 1.3e-11 relative of SciPy, measured), Wilson-Hilferty beyond;
 * works for dof up to 1e9 and more in constant time.
 * @example chiSquareQuantile(0.95, 3) // 7.814727903251192
 */
export function chiSquareQuantile(p: number, dof: number): number {
  if (!(p > 0 && p < 1)) {
    throw new RangeError(`chiSquareQuantile: p must be in (0, 1), got ${p}`);
  }
  if (!(dof > 0 && Number.isFinite(dof))) {
    throw new RangeError(`chiSquareQuantile: dof must be a positive number, got ${dof}`);
  }
  return dof > CHI_SQUARE_APPROXIMATION_DOF
    ? chiSquareQuantileWilsonHilferty(p, dof)
    : jStat.chisquare.inv(p, dof);
}

function checkArguments(fn: string, sampleStdDev: number, count: number, minCount: number, confidence: number): void {
  if (!(sampleStdDev >= 0 && Number.isFinite(sampleStdDev))) {
    throw new RangeError(`${fn}: sampleStdDev must be a finite number >= 0, got ${sampleStdDev}`);
  }
  if (!(Number.isSafeInteger(count) && count >= minCount)) {
    throw new RangeError(`${fn}: count must be an integer >= ${minCount}, got ${count}`);
  }
  if (!(confidence > 0 && confidence < 1)) {
    throw new RangeError(`${fn}: confidence must be in (0, 1), e.g. 0.95, got ${confidence}`);
  }
}

/**
 * Two-sided chi-square confidence interval [lo, hi] on sigma from the sample standard
 * deviation `sampleStdDev` (n - 1 denominator) of `count` normal draws, count >= 2.
 * @example sigmaIntervalChiSquare(1, 11, 0.95) // [0.698717, 1.754934]
 */
export function sigmaIntervalChiSquare(
  sampleStdDev: number,
  count: number,
  confidence: number,
): [number, number] {
  checkArguments('sigmaIntervalChiSquare', sampleStdDev, count, 2, confidence);
  const dof = count - 1;
  const half = 0.5 * (1 - confidence);
  return [
    sampleStdDev * Math.sqrt(dof / chiSquareQuantile(1 - half, dof)),
    sampleStdDev * Math.sqrt(dof / chiSquareQuantile(half, dof)),
  ];
}

/** Fewest samples for {@link sigmaIntervalBonett} (its kurtosis term needs four). */
export const BONETT_MIN_COUNT = 4;

/**
 * Bonett's (2006) two-sided confidence interval [lo, hi] on sigma from the sample standard
 * deviation `sampleStdDev` (n - 1 denominator) of `count` draws with sample kurtosis
 * `kurtosis` = n M4 / M2^2 (3 for normal data; see `kurtosis` in moments.ts):
 *   c = n / (n - z),  se = c sqrt((kurtosis - (n - 3)/n) / (n - 1)),
 *   sigma^2 in exp(ln(c s^2) -+ z se),  z = Phi^-1(1 - a/2).
 * Bonett centres the fourth moment on a trimmed mean (trim 1/(2 sqrt(n - 4))) to cut the
 * kurtosis estimate's small-sample bias; here it is centred on the mean, the only centre
 * streaming moments have. The two agree for symmetric offsets and differ by O(1/n) otherwise,
 * far below the interval's width at Monte Carlo sample sizes.
 * @example sigmaIntervalBonett(1, 1000, 3, 0.95) // [0.957925, 1.045974]
 */
export function sigmaIntervalBonett(
  sampleStdDev: number,
  count: number,
  kurtosis: number,
  confidence: number,
): [number, number] {
  checkArguments('sigmaIntervalBonett', sampleStdDev, count, BONETT_MIN_COUNT, confidence);
  // n M4 / M2^2 >= 1 for any sample (Cauchy-Schwarz), so the variance term below is positive.
  if (!(kurtosis >= 1 && Number.isFinite(kurtosis))) {
    throw new RangeError(`sigmaIntervalBonett: kurtosis must be a finite number >= 1 (n M4 / M2^2), got ${kurtosis}`);
  }
  const n = count;
  const z = normalQuantile(1 - 0.5 * (1 - confidence));
  if (!(n > z)) {
    throw new RangeError(`sigmaIntervalBonett: count ${n} must exceed z = ${z.toFixed(3)} at confidence ${confidence}`);
  }
  const c = n / (n - z);
  const se = c * Math.sqrt((kurtosis - (n - 3) / n) / (n - 1));
  const centre = Math.log(c) + 2 * Math.log(sampleStdDev);
  return [Math.exp(0.5 * (centre - z * se)), Math.exp(0.5 * (centre + z * se))];
}

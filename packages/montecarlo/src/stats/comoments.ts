/**
 * Streaming co-moments of paired samples (x, y): count, means, sums of squared deviations and
 * the sum of cross deviations, mergeable across chunks, for a correlation coefficient.
 * Block update: a two-pass pass over the block, then the pairwise merge of T. F. Chan,
 * G. H. Golub and R. J. LeVeque, American Statistician 37(3):242-247, 1983, whose cross term
 * C = C_a + C_b + dx dy n_a n_b / n is P. Pebay's (Sandia report SAND2008-6212, 2008).
 */

/** Accumulated co-moments; empty: count 0 and every sum 0. Plain data (survives cloning). */
export interface CoMoments {
  count: number;
  meanX: number;
  meanY: number;
  /** Sums of squared deviations from the means. */
  m2X: number;
  m2Y: number;
  /** Sum of (x - meanX)(y - meanY). */
  cXY: number;
}

/** A fresh, empty accumulator. */
export function emptyCoMoments(): CoMoments {
  return { count: 0, meanX: 0, meanY: 0, m2X: 0, m2Y: 0, cXY: 0 };
}

/** Combine two accumulators into a new one; inputs untouched. */
export function mergeCoMoments(a: CoMoments, b: CoMoments): CoMoments {
  if (a.count === 0) return { ...b };
  if (b.count === 0) return { ...a };
  const count = a.count + b.count;
  const dx = b.meanX - a.meanX;
  const dy = b.meanY - a.meanY;
  const w = (a.count * b.count) / count;
  return {
    count,
    meanX: a.meanX + dx * (b.count / count),
    meanY: a.meanY + dy * (b.count / count),
    m2X: a.m2X + b.m2X + dx * dx * w,
    m2Y: a.m2Y + b.m2Y + dy * dy * w,
    cXY: a.cXY + b.cXY + dx * dy * w,
  };
}

/**
 * Add the pairs (x[i], y[i]) for i in [start, end) as one block, in place; returns `state`.
 * @throws RangeError when a value is NaN or infinite (state unchanged)
 */
export function addPairs(state: CoMoments, x: Float64Array, y: Float64Array, start: number, end: number): CoMoments {
  const n = end - start;
  if (n <= 0) return state;
  let sx = 0;
  let sy = 0;
  for (let i = start; i < end; i++) {
    sx += x[i]!;
    sy += y[i]!;
  }
  const mx = sx / n;
  const my = sy / n;
  let m2X = 0;
  let m2Y = 0;
  let cXY = 0;
  for (let i = start; i < end; i++) {
    const a = x[i]! - mx;
    const b = y[i]! - my;
    m2X += a * a;
    m2Y += b * b;
    cXY += a * b;
  }
  if (!Number.isFinite(m2X + m2Y + cXY)) {
    throw new RangeError(`addPairs: values[${start}..${end}) contain a NaN or infinite value; the sampler must produce finite numbers`);
  }
  const merged = mergeCoMoments(state, { count: n, meanX: mx, meanY: my, m2X, m2Y, cXY });
  Object.assign(state, merged);
  return state;
}

/** Pearson correlation cXY / sqrt(m2X m2Y); null when either variance is 0 or fewer than 2 pairs. */
export function correlation(state: CoMoments): number | null {
  if (state.count < 2 || !(state.m2X > 0) || !(state.m2Y > 0)) return null;
  const r = state.cXY / Math.sqrt(state.m2X * state.m2Y);
  return Math.max(-1, Math.min(1, r));
}

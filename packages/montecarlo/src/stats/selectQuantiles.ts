/**
 * Exact sample quantiles of unsorted data without sorting all of it: the values are binned once
 * over their range, only the bins holding the wanted order statistics are copied out, and those
 * few are sorted (recursively binned again while they are still large). The bin index
 * floor((x - lo) * scale) is non-decreasing in x (each rounded operation is monotone), so the
 * k-th smallest value is the (k - below)-th smallest of its bin and the answer is bit for bit
 * that of a full sort followed by `exactQuantile` (Hyndman & Fan type 7). This is the bucket
 * selection of the distributive-partitioning family (Dobosiewicz, "Sorting by distributive
 * partitioning", Information Processing Letters 7(1):1-6, 1978), stopped at the wanted ranks.
 * Clamping the index to the first and last bin keeps it non-decreasing, so the first level's
 * range [lo, hi] need not hold every value: bounds that the caller already knows (a run's
 * minimum and maximum) only save a pass over the data, they cannot change an answer.
 */

/** Bins per level: the wanted bins of a normal-looking million-sample set hold a few hundred values. */
const BINS = 4096;
/** At or below this many values a copy is simply sorted. */
const SORT_BELOW = 4096;
/** Levels of re-binning before falling back to a sort (only pathological spacings get there). */
const MAX_DEPTH = 8;
const LAST = BINS - 1;

/** The bin of x for bins of width 1/scale from lo: non-decreasing in x, clamped to [0, LAST]. */
function binOf(x: number, lo: number, scale: number): number {
  const t = (x - lo) * scale;
  // floor(t) clamped, written so that the conversion is a plain truncation of 0 < t < LAST
  // (Math.floor's result needs a check before it can index); a NaN goes to bin 0 as before.
  return t >= LAST ? LAST : t > 0 ? t | 0 : 0;
}

/**
 * The values with every NaN left out, in order: `values` itself when it holds none, else a
 * compact copy (the input is never changed). Callers count the NaNs themselves: this only
 * removes what they have already accounted for.
 */
export function withoutNaN(values: Float64Array): Float64Array {
  const n = values.length;
  let first = 0;
  while (first < n && values[first] === values[first]) first++;
  if (first === n) return values;
  const out = new Float64Array(n - 1);
  out.set(values.subarray(0, first));
  let m = first;
  for (let i = first + 1; i < n; i++) {
    const x = values[i]!;
    if (x === x) out[m++] = x;
  }
  return out.slice(0, m);
}

function nanError(): RangeError {
  return new RangeError('selectQuantiles: the values contain NaN; leave them out first (withoutNaN)');
}

/** Sorted copy (|x| when `absolute`) indexed at `ranks`. */
function bySorting(values: Float64Array, ranks: readonly number[], absolute: boolean): number[] {
  const copy = absolute ? values.map(Math.abs) : values.slice();
  copy.sort();
  // A typed-array sort puts NaN last.
  if (copy.length > 0 && copy[copy.length - 1] !== copy[copy.length - 1]) throw nanError();
  return ranks.map((r) => copy[r]!);
}

/**
 * The order statistics of `values` (or of |values|) at `ranks` (0-based, ascending), exactly as
 * a full ascending sort would place them.
 */
function orderStatistics(values: Float64Array, ranks: readonly number[], absolute: boolean, depth: number): number[] {
  const n = values.length;
  if (n <= SORT_BELOW || depth >= MAX_DEPTH) return bySorting(values, ranks, absolute);
  let lo = Infinity;
  let hi = -Infinity;
  let nan = 0;
  for (let i = 0; i < n; i++) {
    const x = absolute ? Math.abs(values[i]!) : values[i]!;
    if (x < lo) lo = x;
    if (x > hi) hi = x;
    if (x !== x) nan++;
  }
  if (nan > 0) throw nanError();
  // All equal (and not a mix of -0 and +0, which a sort tells apart): every rank is that value.
  if (lo === hi && lo !== 0) return ranks.map(() => lo);
  const scale = BINS / (hi - lo);
  if (!(scale > 0 && scale < Infinity)) return bySorting(values, ranks, absolute);
  const counts = new Int32Array(BINS);
  for (let i = 0; i < n; i++) counts[binOf(absolute ? Math.abs(values[i]!) : values[i]!, lo, scale)]!++;
  const bins = wantedBins(counts, ranks);
  const { slotOfBin, parts } = bins;
  const fill = new Int32Array(parts.length);
  for (let i = 0; i < n; i++) {
    const x = absolute ? Math.abs(values[i]!) : values[i]!;
    const s = slotOfBin[binOf(x, lo, scale)]!;
    if (s >= 0) parts[s]![fill[s]!++] = x;
  }
  return statisticsOfParts(bins, ranks, depth);
}

/** The bins holding the wanted ranks: each bin's slot (-1 if not wanted), its part to fill, the ranks below it. */
interface WantedBins {
  readonly slotOfBin: Int32Array;
  readonly wanted: readonly { readonly below: number; readonly ranks: number[] }[];
  readonly parts: readonly Float64Array[];
}

/** Locates each rank's bin from the bin counts, and the rank inside that bin. */
function wantedBins(counts: Int32Array, ranks: readonly number[]): WantedBins {
  const slotOfBin = new Int32Array(BINS).fill(-1);
  const wanted: { bin: number; below: number; ranks: number[] }[] = [];
  let bin = 0;
  let below = 0;
  for (const r of ranks) {
    while (below + counts[bin]! <= r) below += counts[bin++]!;
    if (slotOfBin[bin] === -1) {
      slotOfBin[bin] = wanted.length;
      wanted.push({ bin, below, ranks: [] });
    }
    wanted[slotOfBin[bin]!]!.ranks.push(r - below);
  }
  return { slotOfBin, wanted, parts: wanted.map((w) => new Float64Array(counts[w.bin]!)) };
}

/** The order statistics at `ranks` from the filled parts (which hold the values, or |x|, as plain values). */
function statisticsOfParts({ wanted, parts }: WantedBins, ranks: readonly number[], depth: number): number[] {
  const found = new Map<number, number>();
  wanted.forEach((w, s) => {
    const local = orderStatistics(parts[s]!, w.ranks, false, depth + 1);
    w.ranks.forEach((r, j) => found.set(w.below + r, local[j]!));
  });
  return ranks.map((r) => found.get(r)!);
}

/** The 0-based ranks type-7 interpolation at `levels` needs, ascending (after checking the arguments). */
function ranksFor(name: string, n: number, levels: readonly number[]): number[] {
  if (n === 0) throw new RangeError(`${name}: the data are empty`);
  for (const p of levels) {
    if (!(p >= 0 && p <= 1)) throw new RangeError(`${name}: p must be in [0, 1], got ${p}`);
  }
  const wanted = new Set<number>();
  for (const p of levels) {
    const i = Math.floor((n - 1) * p);
    wanted.add(i);
    if (i + 1 < n) wanted.add(i + 1);
  }
  return [...wanted].sort((a, b) => a - b);
}

/** The interpolation of exactQuantile, term for term, from the order statistics at `ranks`. */
function interpolate(n: number, levels: readonly number[], ranks: readonly number[], stats: readonly number[]): number[] {
  const at = new Map(ranks.map((r, j) => [r, stats[j]!]));
  return levels.map((p) => {
    const h = (n - 1) * p;
    const i = Math.floor(h);
    const x0 = at.get(i)!;
    if (i + 1 >= n) return x0;
    const x1 = at.get(i + 1)!;
    return x0 + (h - i) * (x1 - x0);
  });
}

/**
 * Exact type-7 p-quantiles of unsorted `values` (of |values| with `absolute`): the same numbers,
 * bit for bit, as sorting and calling `exactQuantile` for each level, in a few passes over the
 * data instead of a sort. `values` must hold no NaN (see `withoutNaN`) and is not changed.
 * @example selectQuantiles(Float64Array.of(4, 1, 3, 2), [0.5]) // [2.5]
 */
export function selectQuantiles(values: Float64Array, levels: readonly number[], options: { readonly absolute?: boolean } = {}): number[] {
  const n = values.length;
  const ranks = ranksFor('selectQuantiles', n, levels);
  return interpolate(n, levels, ranks, orderStatistics(values, ranks, options.absolute === true, 0));
}

/**
 * `selectQuantiles` of the values and of their magnitudes at once, in two passes over the data
 * (one counting both sets of bins, one copying out both sets of wanted bins) instead of six.
 * `bounds`, when given, are where the first level's bins are laid: the data's minimum and
 * maximum, which a run has already tracked, spare a pass; any other bounds give the same
 * answers (see the file's note), only more slowly. Same results, bit for bit, as
 * `selectQuantiles(values, levels)` and `selectQuantiles(values, levels, { absolute: true })`.
 * @example selectSignedAndAbsolute(Float64Array.of(-4, 1, 3, 2), [0.5]) // { signed: [1.5], absolute: [2.5] }
 */
export function selectSignedAndAbsolute(
  values: Float64Array,
  levels: readonly number[],
  bounds?: { readonly min: number; readonly max: number },
): { signed: number[]; absolute: number[] } {
  const n = values.length;
  const ranks = ranksFor('selectSignedAndAbsolute', n, levels);
  let lo = bounds?.min ?? Number.NaN;
  let hi = bounds?.max ?? Number.NaN;
  if (!(lo <= hi)) {
    lo = Infinity;
    hi = -Infinity;
    for (let i = 0; i < n; i++) {
      const x = values[i]!;
      if (x < lo) lo = x;
      if (x > hi) hi = x;
    }
  }
  const scale = BINS / (hi - lo);
  const scaleAbs = BINS / Math.max(-lo, hi);
  // Small or degenerate data (one value, a range that overflows, NaN bounds): one view at a time.
  if (n <= SORT_BELOW || !(scale > 0 && scale < Infinity && scaleAbs > 0 && scaleAbs < Infinity)) {
    return {
      signed: interpolate(n, levels, ranks, orderStatistics(values, ranks, false, 0)),
      absolute: interpolate(n, levels, ranks, orderStatistics(values, ranks, true, 0)),
    };
  }
  const counts = new Int32Array(BINS);
  const countsAbs = new Int32Array(BINS);
  let nan = 0;
  for (let i = 0; i < n; i++) {
    const x = values[i]!;
    if (x !== x) nan++;
    counts[binOf(x, lo, scale)]!++;
    countsAbs[binOf(Math.abs(x), 0, scaleAbs)]!++;
  }
  if (nan > 0) throw new RangeError('selectSignedAndAbsolute: the values contain NaN; leave them out first (withoutNaN)');
  const bins = wantedBins(counts, ranks);
  const binsAbs = wantedBins(countsAbs, ranks);
  const slot = bins.slotOfBin;
  const slotAbs = binsAbs.slotOfBin;
  const fill = new Int32Array(bins.parts.length);
  const fillAbs = new Int32Array(binsAbs.parts.length);
  for (let i = 0; i < n; i++) {
    const x = values[i]!;
    const s = slot[binOf(x, lo, scale)]!;
    if (s >= 0) bins.parts[s]![fill[s]!++] = x;
    const a = Math.abs(x);
    const t = slotAbs[binOf(a, 0, scaleAbs)]!;
    if (t >= 0) binsAbs.parts[t]![fillAbs[t]!++] = a;
  }
  return {
    signed: interpolate(n, levels, ranks, statisticsOfParts(bins, ranks, 0)),
    absolute: interpolate(n, levels, ranks, statisticsOfParts(binsAbs, ranks, 0)),
  };
}

/**
 * The transfer curve under mismatch (report section 7), for any stage with a StageTransfer:
 * the nominal curve, the 1%, 50% and 99% percentile curves over a few hundred sampled instances,
 * the law where it applies, and each instance's slope at its own balance point.
 *
 * The instances are the run's first samples: chunk 0 of the seeded Monte Carlo stream, so each
 * instance's balance point is that sample's figure in the run (and in `run --samples-out`).
 */
import type { Stage } from '@twinfet/core';
import { chunkRng, exactQuantile, fillStandardNormals } from '@twinfet/montecarlo';
import type { Quantity, StageTransfer } from '../stages/types.js';

/** Instances drawn for the bands. */
export const TRANSFER_INSTANCES = 400;
/** Percentile levels of the bands. */
export const BAND_LEVELS = [0.01, 0.5, 0.99] as const;
/** Grid points of the whole curve and of the close-up. */
const FULL_POINTS = 81;
const ZOOM_POINTS = 41;
/** Balance points are found to this fraction of the close-up's width. */
const BALANCE_TOLERANCE = 1e-12;

/** One view of the curve: the grid, nominal, percentiles and the law; null where there is no value. */
export interface TransferView {
  readonly x: readonly number[];
  readonly nominal: readonly (number | null)[];
  readonly bands: readonly { readonly p: number; readonly values: readonly (number | null)[] }[];
  readonly law: readonly number[] | null;
  /** Grid points where some instance had no solution (left out of the percentiles there). */
  readonly unsolved: number;
}

/** The slope at balance over the instances. */
export interface SlopeStudy {
  readonly quantity: Quantity;
  /** The nominal stage's slope at its balance, SI. */
  readonly nominal: number;
  readonly mean: number;
  readonly sigma: number;
  readonly quantiles: readonly { readonly p: number; readonly value: number }[];
  /** Each instance's slope, SI (the input to the spread figure). */
  readonly values: readonly number[];
}

/** The whole transfer study. */
export interface TransferStudy {
  readonly input: Quantity;
  readonly output: Quantity;
  readonly instances: number;
  readonly seed: string;
  readonly full: TransferView;
  readonly zoom: TransferView;
  readonly law: { readonly name: string; readonly formula: string; readonly source: string } | { readonly none: string };
  /** The slope at balance over the instances; null for a stage without a balance point. */
  readonly slope: SlopeStudy | null;
  /** Each instance's balance input, SI (equal to its figure in the run); null where none was found. Empty without a balance point. */
  readonly balances: readonly (number | null)[];
}

function grid(range: readonly [number, number], n: number): Float64Array {
  const [a, b] = range;
  return Float64Array.from({ length: n }, (_, i) => a + ((b - a) * i) / (n - 1));
}

/** Each instance's output on a grid, row by row (NaN where it has no solution). */
function rows(t: StageTransfer, draws: Float64Array, dim: number, count: number, xs: Float64Array): Float64Array {
  const n = xs.length;
  const values = new Float64Array(count * n);
  for (let k = 0; k < count; k++) t.evaluate(draws, k * dim, xs, values.subarray(k * n, (k + 1) * n));
  return values;
}

/** The view of a grid: nominal curve, percentile curves over the instances' rows, the law. */
function view(t: StageTransfer, values: Float64Array, dim: number, count: number, xs: Float64Array): TransferView {
  const n = xs.length;
  const nominal = new Float64Array(n);
  t.evaluate(new Float64Array(dim), 0, xs, nominal);
  let unsolved = 0;
  const bands = BAND_LEVELS.map((p) => ({ p, values: new Array<number | null>(n) }));
  const column = new Float64Array(count);
  for (let i = 0; i < n; i++) {
    let m = 0;
    for (let k = 0; k < count; k++) {
      const v = values[k * n + i]!;
      if (v === v) column[m++] = v;
    }
    if (m < count) unsolved++;
    const sorted = column.subarray(0, m).sort();
    for (const b of bands) b.values[i] = m === 0 ? null : exactQuantile(sorted, b.p);
  }
  const law = 'none' in t.law ? null : Array.from(xs, (x) => (t.law as { at(x: number): number }).at(x));
  return { x: Array.from(xs), nominal: Array.from(nominal, (v) => (v === v ? v : null)), bands, law, unsolved };
}

/** The grid interval of a row where the output crosses the balance value, or null. */
function crossing(row: Float64Array, xs: Float64Array, balance: number): [number, number, number, number] | null {
  for (let i = 1; i < xs.length; i++) {
    const a = row[i - 1]! - balance;
    const b = row[i]! - balance;
    if (a === a && b === b && a * b <= 0) return [xs[i - 1]!, a, xs[i]!, b];
  }
  return null;
}

/**
 * The input where one instance's output crosses the balance value, from a bracket found on a
 * grid, by the Illinois variant of regula falsi (Dowell & Jarratt, BIT 11, 1971).
 */
function balancePoint(t: StageTransfer, u: Float64Array, base: number, bracket: readonly [number, number, number, number]): number {
  const x = new Float64Array(1);
  const y = new Float64Array(1);
  const g = (v: number): number => {
    x[0] = v;
    t.evaluate(u, base, x, y);
    return y[0]! - (t.balance?.output ?? 0);
  };
  let [a, fa, b, fb] = bracket;
  if (fa === 0) return a;
  if (fb === 0) return b;
  const tol = BALANCE_TOLERANCE * (t.zoom[1] - t.zoom[0]);
  let side = 0;
  for (let k = 0; k < 200 && Math.abs(b - a) > tol; k++) {
    const c = (a * fb - b * fa) / (fb - fa);
    const fc = g(c);
    if (!(fc === fc)) return Number.NaN;
    if (fc * fb > 0) {
      b = c;
      fb = fc;
      // The same end moved twice: halve the other end's value so the bracket shrinks from both sides.
      if (side === -1) fa /= 2;
      side = -1;
    } else if (fa * fc > 0) {
      a = c;
      fa = fc;
      if (side === 1) fb /= 2;
      side = 1;
    } else return c;
  }
  return Math.abs(fa) < Math.abs(fb) ? a : b;
}

/** Central-difference slope of one instance at x. */
function slopeAt(t: StageTransfer, u: Float64Array, base: number, x: number): number {
  const h = 1e-6 * (t.zoom[1] - t.zoom[0]);
  const xs = Float64Array.of(x - h, x + h);
  const out = new Float64Array(2);
  t.evaluate(u, base, xs, out);
  return (out[1]! - out[0]!) / (2 * h);
}

/**
 * The first `count` standard-normal draws of the run's stream (chunk 0, in the order the
 * Monte Carlo kernel draws them).
 */
export function firstDraws(seed: string, dimension: number, count: number): Float64Array {
  const u = new Float64Array(count * dimension);
  fillStandardNormals(chunkRng(seed, 'montecarlo', 0), u, 0, u.length);
  return u;
}

/**
 * Runs the transfer study of a stage for the run seeded `seed`; when fewer than two instances
 * have a balance point in the span (a design far outside the model's range), says so instead.
 */
export function studyTransfer(stage: Stage, t: StageTransfer, seed: string, count = TRANSFER_INSTANCES): TransferStudy | { readonly none: string } {
  const dim = stage.dimension;
  const draws = firstDraws(seed, dim, count);
  const fullX = grid(t.span, FULL_POINTS);
  const zoomX = grid(t.zoom, ZOOM_POINTS);
  const fullRows = rows(t, draws, dim, count, fullX);
  const zoomRows = rows(t, draws, dim, count, zoomX);
  const full = view(t, fullRows, dim, count, fullX);
  const zoom = view(t, zoomRows, dim, count, zoomX);
  const zeros = new Float64Array(dim);
  const nominalRow = new Float64Array(FULL_POINTS);
  t.evaluate(zeros, 0, fullX, nominalRow);
  const balance = t.balance;
  if (balance === undefined) {
    return { input: t.input, output: t.output, instances: count, seed, full, zoom, law: 'none' in t.law ? { none: t.law.none } : { name: t.law.name, formula: t.law.formula, source: t.law.source }, slope: null, balances: [] };
  }
  const nominalBracket = crossing(nominalRow, fullX, balance.output);
  const nominalBalance = nominalBracket === null ? Number.NaN : balancePoint(t, zeros, 0, nominalBracket);
  const balances: (number | null)[] = [];
  const slopes: number[] = [];
  for (let k = 0; k < count; k++) {
    // The close-up grid brackets nearly every balance point; the whole curve the rest.
    const bracket = crossing(zoomRows.subarray(k * ZOOM_POINTS, (k + 1) * ZOOM_POINTS), zoomX, balance.output) ?? crossing(fullRows.subarray(k * FULL_POINTS, (k + 1) * FULL_POINTS), fullX, balance.output);
    const x = bracket === null ? Number.NaN : balancePoint(t, draws, k * dim, bracket);
    balances.push(Number.isFinite(x) ? x : null);
    if (Number.isFinite(x)) slopes.push(slopeAt(t, draws, k * dim, x));
  }
  if (slopes.length < 2 || !Number.isFinite(nominalBalance)) {
    return { none: `only ${slopes.length} of ${count} sampled instances${Number.isFinite(nominalBalance) ? '' : ' (and not the nominal stage)'} reach balance within the drawn input range` };
  }
  const sorted = Float64Array.from(slopes).sort();
  const mean = slopes.reduce((a, b) => a + b, 0) / slopes.length;
  const sigma = Math.sqrt(slopes.reduce((a, b) => a + (b - mean) ** 2, 0) / (slopes.length - 1));
  return {
    input: t.input,
    output: t.output,
    instances: count,
    seed,
    full,
    zoom,
    law: 'none' in t.law ? { none: t.law.none } : { name: t.law.name, formula: t.law.formula, source: t.law.source },
    slope: {
      quantity: balance.slope,
      nominal: slopeAt(t, zeros, 0, nominalBalance),
      mean,
      sigma,
      quantiles: BAND_LEVELS.map((p) => ({ p, value: exactQuantile(sorted, p) })),
      values: slopes,
    },
    balances,
  };
}

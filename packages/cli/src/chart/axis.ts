/**
 * Axes fitted to the data: the domain is the data's own range with a small margin (so no point
 * sits on the frame and no decade of empty axis is drawn), ticks are round numbers inside it.
 * Scales and round ticks come from d3-scale.
 */
import { scaleLinear, scaleLog } from 'd3-scale';

/** A numeric axis, ready to draw. */
export interface NumericAxis {
  readonly kind: 'linear' | 'log';
  /** Axis label with its unit, e.g. "offset Vos (mV)". */
  readonly label: string;
  readonly domain: readonly [number, number];
  readonly ticks: readonly number[];
  readonly tickLabels: readonly string[];
}

/** A categorical axis (rows of a bar chart), top to bottom. */
export interface CategoryAxis {
  readonly kind: 'category';
  readonly label: string;
  readonly categories: readonly string[];
}

export type Axis = NumericAxis | CategoryAxis;

/** Options of {@link linearAxis}. */
export interface LinearAxisOptions {
  /** Values the axis must show besides the data (limits, targets). */
  readonly include?: readonly number[];
  /** Margin each side as a fraction of the span (default 0.04). */
  readonly pad?: number;
  /** Start at exactly zero when every value is >= 0 (bars and counts). */
  readonly zero?: boolean;
  /** Rough number of ticks wanted (default 6). */
  readonly ticks?: number;
}

function finite(values: readonly number[]): number[] {
  return values.filter((v) => Number.isFinite(v));
}

/**
 * A linear axis over the values.
 * @example linearAxis('x (mV)', [0.5, 20]).domain // [-0.28, 20.78]
 */
export function linearAxis(label: string, values: readonly number[], options: LinearAxisOptions = {}): NumericAxis {
  const all = finite([...values, ...(options.include ?? [])]);
  if (all.length === 0) throw new RangeError(`axis "${label}": no finite value to fit`);
  let lo = Math.min(...all);
  let hi = Math.max(...all);
  if (hi === lo) {
    const w = lo === 0 ? 1 : Math.abs(lo) * 0.1;
    lo -= w;
    hi += w;
  }
  const pad = (options.pad ?? 0.04) * (hi - lo);
  const zero = options.zero === true && lo >= 0;
  const domain: [number, number] = [zero ? 0 : lo - pad, hi + pad];
  const s = scaleLinear().domain(domain);
  const count = options.ticks ?? 6;
  const ticks = s.ticks(count);
  const format = s.tickFormat(count);
  return { kind: 'linear', label, domain, ticks, tickLabels: ticks.map((t) => format(t)) };
}

const SUPERSCRIPT: Readonly<Record<string, string>> = { '-': '\u207b', '0': '\u2070', '1': '\u00b9', '2': '\u00b2', '3': '\u00b3', '4': '\u2074', '5': '\u2075', '6': '\u2076', '7': '\u2077', '8': '\u2078', '9': '\u2079' };

/** A log-axis tick label: plain decimals from 0.001 to 1e4, else m×10ⁿ. */
export function logTickLabel(v: number): string {
  if (v >= 1e-3 && v < 1e5) return String(Number(v.toPrecision(6)));
  const e = Math.floor(Math.log10(v) + 1e-9);
  const m = Math.round(v / 10 ** e);
  const power = `10${String(e).split('').map((c) => SUPERSCRIPT[c] ?? c).join('')}`;
  return m === 1 ? power : `${m}\u00d7${power}`;
}

/** Mantissas labelled on a log axis, densest first: used until a set gives 3 to 9 ticks. */
const MANTISSA_SETS: readonly (readonly number[])[] = [[1, 2, 3, 4, 5, 6, 7, 8, 9], [1, 2, 5], [1, 3], [1]];

/** Options of {@link logAxis}. */
export interface LogAxisOptions {
  readonly include?: readonly number[];
  /** Margin each side as a fraction of the span in decades (default 0.04). */
  readonly pad?: number;
  /** Clamp the upper end (e.g. 1 for probabilities). */
  readonly max?: number;
}

/**
 * A log axis over the positive values (others are ignored: the caller says how many were left
 * out). The domain is the data's range with a margin, not widened to whole decades.
 * @example logAxis('W (um)', [0.5, 20]).ticks // [0.5, 1, 2, 5, 10, 20]
 */
export function logAxis(label: string, values: readonly number[], options: LogAxisOptions = {}): NumericAxis {
  const all = finite([...values, ...(options.include ?? [])]).filter((v) => v > 0);
  if (all.length === 0) throw new RangeError(`axis "${label}": no positive value to fit on a log axis`);
  let lo = Math.log10(Math.min(...all));
  let hi = Math.log10(Math.max(...all));
  if (hi - lo < 0.3) {
    const mid = (hi + lo) / 2;
    lo = mid - 0.15;
    hi = mid + 0.15;
  }
  const pad = (options.pad ?? 0.04) * (hi - lo);
  let top = 10 ** (hi + pad);
  if (options.max !== undefined) top = Math.min(top, options.max);
  const domain: [number, number] = [10 ** (lo - pad), top];
  const inside = (v: number): boolean => v >= domain[0] * (1 - 1e-12) && v <= domain[1] * (1 + 1e-12);
  const e0 = Math.floor(Math.log10(domain[0]));
  const e1 = Math.ceil(Math.log10(domain[1]));
  let ticks: number[] = [];
  for (const set of MANTISSA_SETS) {
    const t: number[] = [];
    for (let e = e0; e <= e1; e++) for (const m of set) { const v = Number(`${m}e${e}`); if (inside(v)) t.push(v); }
    ticks = t;
    if (t.length <= 9) break;
  }
  if (ticks.length > 9) {
    // Many decades: every k-th power of ten.
    const step = Math.ceil(ticks.length / 8);
    ticks = ticks.filter((_, i) => i % step === 0);
  }
  if (ticks.length < 2) {
    // Less than one mantissa step across the axis: round linear ticks inside it.
    ticks = scaleLinear().domain(domain).ticks(4).filter((v) => v > 0);
    return { kind: 'log', label, domain, ticks, tickLabels: ticks.map((v) => String(Number(v.toPrecision(6)))) };
  }
  return { kind: 'log', label, domain, ticks, tickLabels: ticks.map(logTickLabel) };
}

/** A category axis. */
export function categoryAxis(label: string, categories: readonly string[]): CategoryAxis {
  if (categories.length === 0) throw new RangeError(`axis "${label}": no category`);
  return { kind: 'category', label, categories };
}

/**
 * The map from a value to its position along the axis: 0 at the domain's start, 1 at its end
 * (outside for values beyond the domain). A category axis takes the row index and gives the
 * row's centre.
 */
export function positioner(axis: Axis): (v: number) => number {
  if (axis.kind === 'category') {
    const n = axis.categories.length;
    return (v) => (v + 0.5) / n;
  }
  const s = axis.kind === 'log' ? scaleLog().domain([...axis.domain]).range([0, 1]) : scaleLinear().domain([...axis.domain]).range([0, 1]);
  return (v) => s(v);
}

/**
 * The `--plot` figures and the report's distribution figure: an offset histogram with its
 * Gaussian fit and spec lines, and a sweep's sigma and failure probability against the swept
 * field. Both are built as chart models (../chart) and rendered to self-contained SVG.
 */
import { chartSvg, type Chart, type Layer, type Panel } from './chart/chart.js';
import { linearAxis, logAxis } from './chart/axis.js';
import { COLOR, DASH, OUTLINE } from './chart/style.js';

/** Most bars a histogram draws; finer input is merged into groups of adjacent bins. */
export const MAX_DISPLAY_BINS = 200;

/** Points on the drawn Gaussian curve: smooth at the plot's width, still cheap. */
const CURVE_POINTS = 401;

/**
 * The figure a plot shows and its display unit: `scale` takes the figure's SI value to `unit`.
 * Without one, plots show an offset in millivolts.
 */
export interface PlotFigure {
  /** Words for the axis ("offset", "current error"). */
  readonly label: string;
  /** Its symbol ("Vos", "e"). */
  readonly symbol: string;
  /** Display unit ("mV", "%"; "" for none). */
  readonly unit: string;
  /** Factor from the SI value to the display unit (1e3 for V to mV, 100 for a fraction in %). */
  readonly scale: number;
}

/** The offset in millivolts: what a plot shows when no figure is given. */
export const OFFSET_PLOT_FIGURE: PlotFigure = { label: 'offset', symbol: 'Vos', unit: 'mV', scale: 1e3 };

/** An axis label for the figure: "offset Vos (mV)", or with words after the name ("offset sigma (mV)"). */
export function figureAxisLabel(f: PlotFigure, after?: string): string {
  const name = after === undefined ? `${f.label} ${f.symbol}` : `${f.label} ${after}`;
  return f.unit === '' ? name : `${name} (${f.unit})`;
}

/** Histogram of a sampled figure, all values in SI units (volts for the offset). */
export interface HistogramInput {
  /** Title drawn in the SVG (a page that captions the figure itself leaves it out). */
  title?: string;
  /** Bin edges, increasing, length `counts.length + 1`. */
  binEdges: readonly number[];
  /** Samples in each bin. */
  counts: readonly number[];
  /** Total Monte Carlo samples (including any that fell outside the bins). */
  samples: number;
  /** Sample mean. */
  mean: number;
  /** Sample standard deviation (> 0). */
  sigma: number;
  /** Specification limit (> 0): rules at -spec and +spec, or at +spec only when `specSides` is 'one'; none when absent. */
  spec?: number;
  /** Which limits the spec sets: 'two' (the default) |figure| <= spec, 'one' figure <= spec. */
  specSides?: 'two' | 'one';
  /** What the values are (default: the offset in mV). */
  figure?: PlotFigure;
  /** Extra line under the title (the sample statistics line is always shown). */
  subtitle?: string;
  /** Id of the SVG (unique within a page; default "histogram"). */
  id?: string;
}

/** One point of a parameter sweep; sigmas in volts, yields and probabilities as fractions. */
export interface SweepPoint {
  /** Swept value in the field's base unit (for example metres). */
  x: number;
  /** Offset sigma from the linearised mismatch model, volts. */
  analyticSigma: number;
  /** Monte Carlo offset sigma, volts. */
  mcSigma?: number;
  /** Lower end of the Monte Carlo sigma's confidence interval, volts. */
  mcSigmaLo?: number;
  /** Upper end of the Monte Carlo sigma's confidence interval, volts. */
  mcSigmaHi?: number;
  /** Monte Carlo yield, the fraction of samples within spec. */
  yield?: number;
  /** Lower end of the yield's confidence interval. */
  yieldLo?: number;
  /** Upper end of the yield's confidence interval. */
  yieldHi?: number;
  /** Failure probability estimated by importance sampling of the tails. */
  tailFailure?: number;
  /** Lower end of the tail estimate's confidence interval. */
  tailLo?: number;
  /** Upper end of the tail estimate's confidence interval. */
  tailHi?: number;
}

/** A sweep of one design field: offset sigma and failure probability against its value. */
export interface SweepInput {
  /** Plot title. */
  title: string;
  /** Design-file path of the swept field, for example "input.w". */
  field: string;
  /** Display unit of the swept field ("um", "uA", "K"; "" for none). */
  fieldUnit: string;
  /** Factor from the field's base unit to the display unit, for example 1e6 for m to um. */
  xScale: number;
  /** Draw the swept field on a log axis. */
  log: boolean;
  /** The swept points. */
  points: readonly SweepPoint[];
  /** Offset sigma target in volts: drawn as a labelled horizontal line. */
  sigmaTarget?: number;
  /** Yield target as a fraction: 1 - yieldTarget is drawn as the failure target. */
  yieldTarget?: number;
  /** What the sigmas are of (default: the offset in mV). */
  figure?: PlotFigure;
}

/** A histogram's bins after merging. */
export interface Bins {
  /** Bin edges, length `counts.length + 1`. */
  edges: number[];
  /** Samples in each bin. */
  counts: number[];
}

function requireFinite(name: string, v: number): void {
  if (!Number.isFinite(v)) throw new RangeError(`${name} must be a finite number, got ${v}`);
}

function requirePositive(name: string, v: number): void {
  if (!(Number.isFinite(v) && v > 0)) throw new RangeError(`${name} must be a positive finite number, got ${v}`);
}

/**
 * Merges runs of `ceil(n / maxBins)` adjacent bins so that at most `maxBins` remain; the last
 * group may hold fewer bins (it is then narrower). Input with `maxBins` bins or fewer is copied.
 * @example rebin([0, 1, 2, 3], [1, 2, 3], 2) // { edges: [0, 2, 3], counts: [3, 3] }
 */
export function rebin(edges: readonly number[], counts: readonly number[], maxBins: number): Bins {
  if (!(Number.isInteger(maxBins) && maxBins >= 1)) throw new RangeError(`maxBins must be a positive integer, got ${maxBins}`);
  const n = counts.length;
  if (n <= maxBins) return { edges: [...edges], counts: [...counts] };
  const group = Math.ceil(n / maxBins);
  const outEdges: number[] = [];
  const outCounts: number[] = [];
  for (let start = 0; start < n; start += group) {
    const end = Math.min(start + group, n);
    let sum = 0;
    for (let i = start; i < end; i++) sum += counts[i]!;
    outEdges.push(edges[start]!);
    outCounts.push(sum);
  }
  outEdges.push(edges[n]!);
  return { edges: outEdges, counts: outCounts };
}

function validateHistogram(input: HistogramInput): void {
  const { binEdges, counts } = input;
  if (counts.length < 1) throw new RangeError('histogram counts must hold at least one bin');
  if (binEdges.length !== counts.length + 1) {
    throw new RangeError(`histogram binEdges must have counts.length + 1 = ${counts.length + 1} entries, got ${binEdges.length}`);
  }
  for (let i = 0; i < binEdges.length; i++) requireFinite(`histogram binEdges[${i}]`, binEdges[i]!);
  for (let i = 1; i < binEdges.length; i++) {
    if (!(binEdges[i]! > binEdges[i - 1]!)) {
      throw new RangeError(`histogram binEdges must increase, but binEdges[${i}] = ${binEdges[i]} <= binEdges[${i - 1}] = ${binEdges[i - 1]}`);
    }
  }
  for (let i = 0; i < counts.length; i++) {
    const c = counts[i]!;
    if (!(Number.isFinite(c) && c >= 0)) throw new RangeError(`histogram counts[${i}] must be a non-negative number, got ${c}`);
  }
  requirePositive('histogram samples', input.samples);
  requireFinite('histogram mean', input.mean);
  requirePositive('histogram sigma', input.sigma);
  if (input.spec !== undefined) requirePositive('histogram spec', input.spec);
}

/** A number in display units with 4 significant digits and a true minus sign. */
export function shown(v: number, unit: string): string {
  const t = String(Number(v.toPrecision(4))).replace('-', '\u2212');
  return unit === '' ? t : `${t} ${unit}`;
}

/**
 * The chart of a histogram: bars (rebinned to at most {@link MAX_DISPLAY_BINS}), the Gaussian
 * N(mean, sigma) scaled to samples * bin width, and the spec lines labelled with their values.
 * The x axis spans the bins and the spec lines with a small margin. Throws RangeError naming the
 * bad field.
 */
export function histogramChart(input: HistogramInput): Chart {
  validateHistogram(input);
  const q = input.figure ?? OFFSET_PLOT_FIGURE;
  const k = q.scale;
  const bins = rebin(input.binEdges, input.counts, MAX_DISPLAY_BINS);
  const nBins = bins.counts.length;
  const first = bins.edges[0]!;
  const last = bins.edges[nBins]!;
  // Expected count per bin is samples * width * pdf; with unequal widths (a short last group
  // after rebinning) the mean width is the one the curve is drawn for.
  const binWidth = (last - first) / nBins;
  const upperOnly = input.specSides === 'one';
  const spec = input.spec;
  const limits = spec === undefined ? [] : upperOnly ? [spec] : [-spec, spec];
  const xLo = Math.min(first, ...limits);
  const xHi = Math.max(last, ...limits);
  const scale = (input.samples * binWidth) / (input.sigma * Math.sqrt(2 * Math.PI));
  const curve: [number, number][] = [];
  for (let i = 0; i < CURVE_POINTS; i++) {
    const v = xLo + ((xHi - xLo) * i) / (CURVE_POINTS - 1);
    const z = (v - input.mean) / input.sigma;
    curve.push([v * k, scale * Math.exp(-0.5 * z * z)]);
  }
  const peak = Math.max(...bins.counts, scale);
  const u = q.unit;
  const specText = spec === undefined ? '' : `, spec ${upperOnly ? '' : '\u00b1'}${shown(spec * k, u)}`;
  const stats = `${input.samples} samples, mean ${shown(input.mean * k, u)}, sigma ${shown(input.sigma * k, u)}${specText}`;
  const layers: Layer[] = [
    {
      kind: 'bars',
      name: 'histogram',
      legend: `samples per bin (bin ${shown(binWidth * k, u)})`,
      bars: bins.counts.map((y, i) => ({ x0: bins.edges[i]! * k, x1: bins.edges[i + 1]! * k, y })),
      fill: COLOR.fill,
      stroke: COLOR.fillEdge,
    },
    { kind: 'line', name: 'gaussian', legend: 'Gaussian fit (sample mean and sigma)', points: curve, stroke: COLOR.fit, width: 2 },
    ...limits.map(
      (v): Layer => ({
        kind: 'rule',
        name: v < 0 ? 'spec-low' : 'spec-high',
        ...(v > 0 ? { legend: specText.slice(2) } : {}),
        axis: 'x',
        value: v * k,
        label: `${v < 0 ? '\u2212spec' : '+spec'} ${shown(v * k, u)}`,
        stroke: COLOR.limit,
        dash: DASH.spec,
        side: v < 0 ? 'end' : 'start',
      }),
    ),
  ];
  const subtitle = input.subtitle === undefined ? [stats] : [input.subtitle, stats];
  return {
    id: input.id ?? 'histogram',
    ...(input.title === undefined ? {} : { title: input.title }),
    subtitle,
    description: `Histogram of ${input.samples} sampled values of the ${q.label} ${q.symbol} with the fitted Gaussian${spec === undefined ? '' : ' and the spec lines'}. ${stats}.`,
    panels: [
      {
        x: linearAxis(figureAxisLabel(q), [xLo * k, xHi * k]),
        y: linearAxis('samples per bin', [0, peak * 1.04], { zero: true, pad: 0.02 }),
        layers,
        height: 280,
      },
    ],
  };
}

/** Validates a sweep, failing on the first bad number with the point's index and field name. */
function validateSweep(input: SweepInput): void {
  if (input.points.length < 1) throw new RangeError('sweep points must hold at least one point');
  requirePositive('sweep xScale', input.xScale);
  input.points.forEach((p, i) => {
    requireFinite(`sweep points[${i}].x`, p.x);
    if (input.log && !(p.x > 0)) throw new RangeError(`sweep points[${i}].x must be > 0 on a log axis, got ${p.x}`);
    requireFinite(`sweep points[${i}].analyticSigma`, p.analyticSigma);
    for (const key of ['mcSigma', 'mcSigmaLo', 'mcSigmaHi'] as const) {
      const v = p[key];
      if (v !== undefined) requireFinite(`sweep points[${i}].${key}`, v);
    }
    for (const key of ['yield', 'yieldLo', 'yieldHi', 'tailFailure', 'tailLo', 'tailHi'] as const) {
      const v = p[key];
      if (v !== undefined && !(v >= 0 && v <= 1)) throw new RangeError(`sweep points[${i}].${key} must be a probability in [0, 1], got ${v}`);
    }
  });
  if (input.sigmaTarget !== undefined) requirePositive('sweep sigmaTarget', input.sigmaTarget);
  if (input.yieldTarget !== undefined && !(input.yieldTarget > 0 && input.yieldTarget < 1)) {
    throw new RangeError(`sweep yieldTarget must lie strictly between 0 and 1, got ${input.yieldTarget}`);
  }
}

/** "1 point" / "3 points". */
function plural(n: number, one: string, many: string): string {
  return `${n} ${n === 1 ? one : many}`;
}

/** A probability for a label: 3 significant digits, scientific below 1e-3. */
export function probabilityText(p: number): string {
  return p >= 1e-3 ? String(Number(p.toPrecision(3))) : p.toExponential(2).replace('e-', 'e\u2212');
}

/** Series names of the failure panel. */
export const MC_FAILURE = 'Monte Carlo 1 \u2212 yield';
export const TAIL_FAILURE = 'importance sampling';

/**
 * The chart of a sweep: offset sigma (mV) on top, failure probability on a log axis below,
 * against the swept field (`x * xScale`, in `fieldUnit`). Zero failure estimates cannot sit on
 * the log axis: they are left out, counted in the subtitle, and break the line. An interval
 * whose lower end is zero runs to the bottom of the axis and ends in an arrow. Throws RangeError
 * naming the bad field.
 */
export function sweepChart(input: SweepInput): Chart {
  validateSweep(input);
  const xTitle = input.fieldUnit === '' ? input.field : `${input.field} (${input.fieldUnit})`;
  const xs = input.points.map((p) => p.x * input.xScale);
  const xAxis = input.log ? logAxis(xTitle, xs) : linearAxis(xTitle, xs);
  const fig = input.figure ?? OFFSET_PLOT_FIGURE;
  const mv = fig.scale;

  // Top panel: sigma in the figure's display unit (millivolts for an offset).
  const sigmaLayers: Layer[] = [
    { kind: 'line', name: 'analytic', legend: 'linearised', points: input.points.map((p, i) => [xs[i]!, p.analyticSigma * mv] as const), stroke: COLOR.main, width: 2 },
  ];
  const bars = input.points.flatMap((p, i) => (p.mcSigmaLo === undefined || p.mcSigmaHi === undefined ? [] : [{ at: xs[i]!, lo: p.mcSigmaLo * mv, hi: p.mcSigmaHi * mv }]));
  const mcPoints = input.points.flatMap((p, i) => (p.mcSigma === undefined ? [] : [{ x: xs[i]!, y: p.mcSigma * mv }]));
  if (bars.length > 0) sigmaLayers.push({ kind: 'intervals', name: 'mc-sigma-interval', legend: 'Monte Carlo interval', along: 'y', items: bars, stroke: COLOR.fit });
  if (mcPoints.length > 0) sigmaLayers.push({ kind: 'points', name: 'mc-sigma', legend: 'Monte Carlo', points: mcPoints, marker: 'square', fill: COLOR.second, stroke: OUTLINE });
  const sigmaValues = [...input.points.map((p) => p.analyticSigma * mv), ...mcPoints.map((p) => p.y), ...bars.flatMap((b) => [b.lo, b.hi])];
  if (input.sigmaTarget !== undefined) {
    const t = input.sigmaTarget * mv;
    sigmaLayers.push({ kind: 'rule', name: 'target-sigma', legend: 'target sigma', axis: 'y', value: t, label: `target sigma ${shown(t, fig.unit)}`, stroke: COLOR.limit, dash: DASH.target });
    sigmaValues.push(t);
  }
  const sigmaPanel: Panel = { x: xAxis, y: linearAxis(figureAxisLabel(fig, 'sigma'), sigmaValues, { pad: 0.08 }), layers: sigmaLayers, height: 220 };

  // Bottom panel: failure probabilities, positive values only (log axis).
  let mcZero = 0;
  let tailZero = 0;
  const mcLine: [number, number][] = [];
  const tailLine: [number, number][] = [];
  const mcPts: { x: number; y: number }[] = [];
  const tailPts: { x: number; y: number }[] = [];
  const mcBars: { at: number; lo: number; hi: number }[] = [];
  const tailBars: { at: number; lo: number; hi: number }[] = [];
  input.points.forEach((pt, i) => {
    const x = xs[i]!;
    if (pt.yield !== undefined) {
      const p = 1 - pt.yield;
      if (p > 0) {
        mcLine.push([x, p]);
        mcPts.push({ x, y: p });
        if (pt.yieldLo !== undefined && pt.yieldHi !== undefined) mcBars.push({ at: x, lo: 1 - pt.yieldHi, hi: 1 - pt.yieldLo });
      } else {
        mcZero++;
        mcLine.push([x, Number.NaN]);
      }
    }
    if (pt.tailFailure !== undefined) {
      if (pt.tailFailure > 0) {
        tailLine.push([x, pt.tailFailure]);
        tailPts.push({ x, y: pt.tailFailure });
        if (pt.tailLo !== undefined && pt.tailHi !== undefined && pt.tailHi > 0) tailBars.push({ at: x, lo: pt.tailLo, hi: pt.tailHi });
      } else {
        tailZero++;
        tailLine.push([x, Number.NaN]);
      }
    }
  });
  const targetFailure = input.yieldTarget === undefined ? undefined : 1 - input.yieldTarget;
  const failValues = [...mcPts.map((p) => p.y), ...tailPts.map((p) => p.y), ...[...mcBars, ...tailBars].flatMap((b) => [b.lo, b.hi]), ...(targetFailure === undefined ? [] : [targetFailure])].filter((v) => v > 0);
  const failLayers: Layer[] = [];
  if (mcBars.length > 0) failLayers.push({ kind: 'intervals', name: 'mc-failure-interval', along: 'y', items: mcBars, stroke: COLOR.main });
  if (mcPts.length > 0) {
    failLayers.push({ kind: 'line', name: 'mc-failure-line', points: mcLine, stroke: COLOR.main, width: 1.2 });
    failLayers.push({ kind: 'points', name: 'mc-failure', legend: MC_FAILURE, points: mcPts, marker: 'circle', fill: COLOR.main, stroke: COLOR.main });
  }
  if (tailBars.length > 0) failLayers.push({ kind: 'intervals', name: 'tail-failure-interval', along: 'y', items: tailBars, stroke: COLOR.fit });
  if (tailPts.length > 0) {
    failLayers.push({ kind: 'line', name: 'tail-failure-line', points: tailLine, stroke: COLOR.fit, width: 1.2, dash: '4 2' });
    failLayers.push({ kind: 'points', name: 'tail-failure', legend: TAIL_FAILURE, points: tailPts, marker: 'triangle', fill: COLOR.second, stroke: OUTLINE });
  }
  if (targetFailure !== undefined) {
    failLayers.push({ kind: 'rule', name: 'target-failure', legend: 'target failure', axis: 'y', value: targetFailure, label: `target failure ${probabilityText(targetFailure)}`, stroke: COLOR.limit, dash: DASH.target });
  }
  const notes: string[] = [];
  if (mcZero > 0) notes.push(`${plural(mcZero, 'point', 'points')} with zero observed failures not shown`);
  if (tailZero > 0) notes.push(`${plural(tailZero, 'tail estimate', 'tail estimates')} of zero not shown`);
  // With nothing to plot, an empty panel over a typical yield range keeps the axis readable.
  const yFail = logAxis('failure probability', failValues.length > 0 ? failValues : [1e-6, 1], { max: 1 });
  const failPanel: Panel = { x: xAxis, y: yFail, layers: failLayers, height: 220, grid: 'xy' };

  return {
    id: 'sweep',
    title: input.title,
    ...(notes.length > 0 ? { subtitle: notes } : {}),
    description: `Sigma of the ${fig.label} and failure probability against ${input.field} over ${input.points.length} points.`,
    panels: [sigmaPanel, failPanel],
  };
}

/** A transfer curve under mismatch: its nominal curve and percentile bands over samples. */
export interface ResponseInput {
  /** Plot title. */
  title: string;
  /** Extra line under the title. */
  subtitle?: string;
  envelope: {
    /** What the output is ("winner's share of the tail") and what the input is ("lead"). */
    readonly label: string;
    readonly input: string;
    /** Input values in the figure's SI unit (volts for a lead), increasing. */
    readonly x: readonly number[];
    /** Output without mismatch at each x, a fraction. */
    readonly nominal: readonly number[];
    /** Output quantiles at each x: levels symmetric about 0.5 pair into bands. */
    readonly bands: readonly { readonly p: number; readonly values: readonly number[] }[];
    readonly samples: number;
  };
  /** The spec on the input (in the figure's SI unit, > 0): drawn as a rule. */
  spec: number;
  /** The figure the input is in (default: the offset in mV). */
  figure?: PlotFigure;
}

function validateResponse(input: ResponseInput): void {
  const e = input.envelope;
  if (e.x.length < 2) throw new RangeError('response x must hold at least two points');
  e.x.forEach((v, i) => requireFinite(`response x[${i}]`, v));
  const series = [e.nominal, ...e.bands.map((b) => b.values)];
  for (const ys of series) {
    if (ys.length !== e.x.length) throw new RangeError(`response series must have ${e.x.length} values, got ${ys.length}`);
    ys.forEach((v, i) => {
      if (!(v >= 0 && v <= 1)) throw new RangeError(`response value ${i} must be a fraction in [0, 1], got ${v}`);
    });
  }
  requirePositive('response spec', input.spec);
}

/**
 * A transfer curve under mismatch: the nominal output against the input (in the quantity's
 * display unit, mV for a lead), the bands between the quantile levels that pair about the median
 * (1-99%, 10-90%) shaded, the median dashed, and the spec marked with its value. Throws RangeError
 * naming the bad field.
 */
export function responseChart(input: ResponseInput): Chart {
  validateResponse(input);
  const e = input.envelope;
  const q = input.figure ?? OFFSET_PLOT_FIGURE;
  const xs = e.x.map((v) => v * q.scale);
  const pct = (v: number): number => 100 * v;
  const sorted = [...e.bands].sort((a, b) => a.p - b.p);
  const layers: Layer[] = [];
  for (let i = 0; i < sorted.length / 2 - 0.5; i++) {
    const lo = sorted[i]!;
    const hi = sorted[sorted.length - 1 - i]!;
    layers.push({
      kind: 'band',
      name: `band-${Math.round(lo.p * 100)}-${Math.round(hi.p * 100)}`,
      legend: `${Math.round(lo.p * 100)}-${Math.round(hi.p * 100)}% of samples`,
      x: xs,
      lo: lo.values.map(pct),
      hi: hi.values.map(pct),
      fill: i === 0 ? COLOR.bandWide : COLOR.bandNarrow,
    });
  }
  const median = sorted.find((b) => b.p === 0.5);
  if (median !== undefined) {
    layers.push({ kind: 'line', name: 'median', legend: 'median', points: xs.map((x, j) => [x, pct(median.values[j]!)] as const), stroke: COLOR.fit, width: 1.5, dash: DASH.target });
  }
  layers.push({ kind: 'line', name: 'nominal', legend: 'nominal (no mismatch)', points: xs.map((x, j) => [x, pct(e.nominal[j]!)] as const), stroke: COLOR.main, width: 2 });
  const spec = input.spec * q.scale;
  layers.push({ kind: 'rule', name: 'spec', legend: 'spec', axis: 'x', value: spec, label: `spec ${shown(spec, q.unit)}`, stroke: COLOR.limit, dash: DASH.spec });
  const note = `${e.samples} mismatch samples; shaded: the spread between quantiles at each ${e.input}`;
  return {
    id: 'response',
    title: input.title,
    subtitle: input.subtitle === undefined ? [note] : [input.subtitle, note],
    description: `${e.label} against ${e.input}: the nominal curve and the spread over ${e.samples} mismatch samples, with the spec at ${shown(spec, q.unit)}.`,
    panels: [
      {
        x: linearAxis(`${e.input} (${q.unit})`, [...xs, spec]),
        y: linearAxis(`${e.label} (%)`, [0, 100], { zero: true, pad: 0.02 }),
        layers,
        height: 300,
      },
    ],
  };
}

/** SVG of a transfer curve under mismatch; see {@link responseChart}. */
export function responseSvg(input: ResponseInput): string {
  return chartSvg(responseChart(input));
}

/**
 * SVG of a histogram with its Gaussian fit and the spec lines; see {@link histogramChart}.
 * @example histogramSvg({ title: 'offset', binEdges, counts, samples: 1e5, mean: 0, sigma: 2e-3, spec: 5e-3 })
 */
export function histogramSvg(input: HistogramInput): string {
  return chartSvg(histogramChart(input));
}

/** SVG of a sweep's two stacked panels, sigma and failure probability; see {@link sweepChart}. */
export function sweepSvg(input: SweepInput): string {
  return chartSvg(sweepChart(input));
}

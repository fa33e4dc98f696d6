import * as vega from 'vega';
import { compile } from 'vega-lite';
import type { TopLevelSpec } from 'vega-lite';
import type { HistogramInput, PlotFigure, SweepInput, SweepPoint } from './plotInput.js';

/** Most bars a histogram draws; finer input is merged into groups of adjacent bins. */
export const MAX_DISPLAY_BINS = 200;

/** The offset in millivolts: what a plot shows when no figure is given. */
export const OFFSET_PLOT_FIGURE: PlotFigure = { label: 'offset', symbol: 'Vos', unit: 'mV', scale: 1e3 };

/** Points on the drawn Gaussian curve: smooth at the plot's width, still cheap. */
const CURVE_POINTS = 401;

// Series colors: one per meaning, the same in every plot.
const BLUE = '#3b6fb6';
const RED = '#d1495b';
const GREEN = '#2a9d5c';
const ORANGE = '#e08a1e';
const GREY = '#555555';

export type { HistogramInput, PlotFigure, SweepInput, SweepPoint } from './plotInput.js';

/** A histogram's bins after merging, edges in the figure's SI unit. */
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
  requirePositive('histogram spec', input.spec);
}

/** A value in the figure's display unit with three significant digits, for titles. */
function shown(fig: PlotFigure, x: number): string {
  return `${Number((x * fig.scale).toPrecision(3))} ${fig.unit}`;
}

/**
 * The vega-lite spec of an offset histogram: bars (rebinned to at most {@link MAX_DISPLAY_BINS}),
 * the Gaussian N(mean, sigma) scaled to samples * bin width, and rules at -spec and +spec.
 * The x axis is in the figure's display unit (millivolts for an offset). Throws RangeError naming the bad field.
 */
export function histogramSpec(input: HistogramInput): TopLevelSpec {
  validateHistogram(input);
  const fig = input.figure ?? OFFSET_PLOT_FIGURE;
  const toDisplay = fig.scale;
  const mv = (x: number): string => shown(fig, x);
  const bins = rebin(input.binEdges, input.counts, MAX_DISPLAY_BINS);
  const nBins = bins.counts.length;
  const first = bins.edges[0]!;
  const last = bins.edges[nBins]!;
  // Expected count per bin is samples * width * pdf; with unequal widths (a short last group
  // after rebinning) the mean width is the one the curve is drawn for.
  const binWidth = (last - first) / nBins;

  const bars = bins.counts.map((count, i) => ({
    lo: bins.edges[i]! * toDisplay,
    hi: bins.edges[i + 1]! * toDisplay,
    count,
    series: 'histogram',
  }));

  const xLo = Math.min(first, -input.spec);
  const xHi = Math.max(last, input.spec);
  const scale = (input.samples * binWidth) / (input.sigma * Math.sqrt(2 * Math.PI));
  const curve: { x: number; y: number; series: string }[] = [];
  for (let i = 0; i < CURVE_POINTS; i++) {
    const v = xLo + ((xHi - xLo) * i) / (CURVE_POINTS - 1);
    const z = (v - input.mean) / input.sigma;
    curve.push({ x: v * toDisplay, y: scale * Math.exp(-0.5 * z * z), series: 'Gaussian fit' });
  }

  const limits = [
    { x: -input.spec * toDisplay, label: '-spec', series: 'spec' },
    { x: input.spec * toDisplay, label: '+spec', series: 'spec' },
  ];

  const stats = `${input.samples} samples, mean ${mv(input.mean)}, sigma ${mv(input.sigma)}, spec ±${mv(input.spec)}`;
  const subtitle = input.subtitle === undefined ? [stats] : [input.subtitle, stats];

  const color = {
    field: 'series',
    type: 'nominal',
    scale: { domain: ['histogram', 'Gaussian fit', 'spec'], range: [BLUE, RED, GREEN] },
    legend: { title: null },
  } as const;
  const xAxis = { title: `${fig.label} ${fig.symbol} (${fig.unit})` };

  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: { text: input.title, subtitle },
    width: 640,
    height: 340,
    layer: [
      {
        name: 'bars',
        data: { values: bars },
        mark: { type: 'rect', opacity: 0.85 },
        encoding: {
          x: { field: 'lo', type: 'quantitative', scale: { zero: false, nice: false }, axis: xAxis },
          x2: { field: 'hi' },
          y: { field: 'count', type: 'quantitative', axis: { title: 'samples per bin' } },
          color,
        },
      },
      {
        name: 'gaussian',
        data: { values: curve },
        mark: { type: 'line', strokeWidth: 2 },
        encoding: {
          x: { field: 'x', type: 'quantitative' },
          y: { field: 'y', type: 'quantitative' },
          color,
        },
      },
      {
        name: 'specRules',
        data: { values: limits },
        mark: { type: 'rule', strokeWidth: 2, strokeDash: [6, 4] },
        encoding: { x: { field: 'x', type: 'quantitative' }, color },
      },
      {
        name: 'specLabels',
        data: { values: limits },
        mark: { type: 'text', align: 'left', baseline: 'top', dx: 4, dy: 4, fontSize: 12, color: GREEN },
        encoding: { x: { field: 'x', type: 'quantitative' }, y: { value: 0 }, text: { field: 'label' } },
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

/** Whole decades enclosing the positive values (at least one decade, at most up to 1). */
function decadeDomain(values: readonly number[]): [number, number] {
  // With nothing to plot, an empty panel spanning a typical yield range keeps the axis valid.
  if (values.length === 0) return [1e-6, 1];
  let lo = Math.floor(Math.log10(Math.min(...values)));
  let hi = Math.min(0, Math.ceil(Math.log10(Math.max(...values))));
  if (hi <= lo) {
    if (hi === 0) lo = hi - 1;
    else hi = lo + 1;
  }
  return [10 ** lo, 10 ** hi];
}

/** Series names of the failure panel. */
const MC_FAILURE = 'Monte Carlo 1 - yield';
const TAIL_FAILURE = 'importance-sampling tail';
const FAILURE_TARGET = 'target failure';

/**
 * The vega-lite spec of a sweep: the figure's sigma (offset in mV by default) on top, failure probability on a log axis
 * below, against the swept field (`x * xScale`, in `fieldUnit`). Values that are zero cannot sit
 * on the log axis; they are left out and counted in the subtitle. Interval ends at zero are
 * drawn to the bottom of the axis. Throws RangeError naming the bad field.
 */
export function sweepSpec(input: SweepInput): TopLevelSpec {
  validateSweep(input);
  const xTitle = input.fieldUnit === '' ? input.field : `${input.field} (${input.fieldUnit})`;
  const xOf = (p: SweepPoint): number => p.x * input.xScale;
  const fig = input.figure ?? OFFSET_PLOT_FIGURE;
  const toDisplay = fig.scale;

  // Top panel: sigma in the figure's display unit (mV for an offset).
  const analytic = input.points.map((p) => ({ x: xOf(p), sigma: p.analyticSigma * toDisplay, series: 'analytic' }));
  const mcPoints = input.points.flatMap((p) => (p.mcSigma === undefined ? [] : [{ x: xOf(p), sigma: p.mcSigma * toDisplay, series: 'Monte Carlo' }]));
  const mcBars = input.points.flatMap((p) =>
    p.mcSigmaLo === undefined || p.mcSigmaHi === undefined
      ? []
      : [{ x: xOf(p), lo: p.mcSigmaLo * toDisplay, hi: p.mcSigmaHi * toDisplay, series: 'Monte Carlo' }],
  );
  const sigmaSeries = ['analytic', ...(mcPoints.length > 0 || mcBars.length > 0 ? ['Monte Carlo'] : [])];
  const sigmaColors = [BLUE, ...(sigmaSeries.length > 1 ? [RED] : [])];
  if (input.sigmaTarget !== undefined) {
    sigmaSeries.push('target sigma');
    sigmaColors.push(GREY);
  }

  // Bottom panel: failure probabilities, positive values only (log axis).
  let mcZero = 0;
  let tailZero = 0;
  // A line must not bridge a left-out point: each run of plotted points gets its own segment.
  const failPoints: { x: number; p: number; series: string; segment: string }[] = [];
  let mcRun = 0;
  let tailRun = 0;
  const failIntervals: { x: number; lo: number | null; hi: number; series: string }[] = [];
  for (const pt of input.points) {
    const x = xOf(pt);
    if (pt.yield !== undefined) {
      const p = 1 - pt.yield;
      if (p > 0) {
        failPoints.push({ x, p, series: MC_FAILURE, segment: `mc${mcRun}` });
        if (pt.yieldLo !== undefined && pt.yieldHi !== undefined) {
          const lo = 1 - pt.yieldHi;
          failIntervals.push({ x, lo: lo > 0 ? lo : null, hi: 1 - pt.yieldLo, series: MC_FAILURE });
        }
      } else {
        mcZero++;
        mcRun++;
      }
    }
    if (pt.tailFailure !== undefined) {
      if (pt.tailFailure > 0) {
        failPoints.push({ x, p: pt.tailFailure, series: TAIL_FAILURE, segment: `tail${tailRun}` });
        if (pt.tailLo !== undefined && pt.tailHi !== undefined && pt.tailHi > 0) {
          failIntervals.push({ x, lo: pt.tailLo > 0 ? pt.tailLo : null, hi: pt.tailHi, series: TAIL_FAILURE });
        }
      } else {
        tailZero++;
        tailRun++;
      }
    }
  }
  const targetFailure = input.yieldTarget === undefined ? undefined : 1 - input.yieldTarget;
  const [yLo, yHi] = decadeDomain([
    ...failPoints.map((d) => d.p),
    ...failIntervals.flatMap((d) => (d.lo === null ? [d.hi] : [d.lo, d.hi])),
    ...(targetFailure === undefined ? [] : [targetFailure]),
  ]);
  // An interval reaching zero runs to the bottom of the axis; clip keeps nothing below it.
  const intervals = failIntervals.map((d) => ({ ...d, lo: d.lo ?? yLo, hi: Math.min(d.hi, yHi) }));

  const failSeries: string[] = [];
  const failColors: string[] = [];
  if (input.points.some((p) => p.yield !== undefined)) {
    failSeries.push(MC_FAILURE);
    failColors.push(RED);
  }
  if (input.points.some((p) => p.tailFailure !== undefined)) {
    failSeries.push(TAIL_FAILURE);
    failColors.push(ORANGE);
  }
  if (targetFailure !== undefined) {
    failSeries.push(FAILURE_TARGET);
    failColors.push(GREY);
  }

  const notes: string[] = [];
  if (mcZero > 0) notes.push(`${plural(mcZero, 'point', 'points')} with zero observed failures not shown`);
  if (tailZero > 0) notes.push(`${plural(tailZero, 'tail estimate', 'tail estimates')} of zero not shown`);

  const xEnc = {
    field: 'x',
    type: 'quantitative',
    title: xTitle,
    scale: input.log ? ({ type: 'log' } as const) : { zero: false },
  } as const;
  const sigmaColor = {
    field: 'series',
    type: 'nominal',
    scale: { domain: sigmaSeries, range: sigmaColors },
    legend: { title: null, labelLimit: 260 },
  } as const;
  const failColor = {
    field: 'series',
    type: 'nominal',
    scale: { domain: failSeries, range: failColors },
    legend: { title: null, labelLimit: 260 },
  } as const;
  const ySigma = { type: 'quantitative' as const, axis: { title: `${fig.label} sigma (${fig.unit})` } };
  const width = 560;
  const height = 220;

  const sigmaLayers: NonNullable<Extract<TopLevelSpec, { layer: unknown }>['layer']> = [
    {
      name: 'analyticLine',
      data: { values: analytic },
      mark: { type: 'line', point: true, strokeWidth: 2 },
      encoding: { x: xEnc, y: { ...ySigma, field: 'sigma' }, color: sigmaColor },
    },
  ];
  if (mcBars.length > 0) {
    sigmaLayers.push({
      name: 'mcSigmaBars',
      data: { values: mcBars },
      mark: { type: 'errorbar', ticks: true },
      encoding: { x: xEnc, y: { ...ySigma, field: 'lo' }, y2: { field: 'hi' }, color: sigmaColor },
    });
  }
  if (mcPoints.length > 0) {
    sigmaLayers.push({
      name: 'mcSigmaPoints',
      data: { values: mcPoints },
      mark: { type: 'point', filled: true, size: 60 },
      encoding: { x: xEnc, y: { ...ySigma, field: 'sigma' }, color: sigmaColor },
    });
  }
  if (input.sigmaTarget !== undefined) {
    sigmaLayers.push({
      name: 'sigmaTarget',
      data: { values: [{ y: input.sigmaTarget * toDisplay, series: 'target sigma' }] },
      mark: { type: 'rule', strokeDash: [6, 4], strokeWidth: 1.5 },
      encoding: { y: { ...ySigma, field: 'y' }, color: sigmaColor },
    });
  }

  const yFail = {
    type: 'quantitative' as const,
    scale: { type: 'log' as const, domain: [yLo, yHi], clamp: true },
    axis: { title: 'failure probability', format: '.0e', grid: true },
  };
  const failLayers: NonNullable<Extract<TopLevelSpec, { layer: unknown }>['layer']> = [];
  if (intervals.length > 0) {
    failLayers.push({
      name: 'failureBars',
      data: { values: intervals },
      mark: { type: 'errorbar', ticks: true },
      encoding: { x: xEnc, y: { ...yFail, field: 'lo' }, y2: { field: 'hi' }, color: failColor },
    });
  }
  if (failPoints.length > 0) {
    failLayers.push({
      name: 'failurePoints',
      data: { values: failPoints },
      mark: { type: 'line', point: { filled: true, size: 50 }, strokeWidth: 1.5 },
      encoding: { x: xEnc, y: { ...yFail, field: 'p' }, color: failColor, detail: { field: 'segment', type: 'nominal' } },
    });
  }
  // The target rule also anchors the axis when every point was left out.
  failLayers.push({
    name: 'failureTarget',
    data: { values: targetFailure === undefined ? [] : [{ y: targetFailure, series: FAILURE_TARGET }] },
    mark: { type: 'rule', strokeDash: [6, 4], strokeWidth: 1.5 },
    encoding: { y: { ...yFail, field: 'y' }, ...(failSeries.length > 0 ? { color: failColor } : {}) },
  });

  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: notes.length > 0 ? { text: input.title, subtitle: notes } : { text: input.title },
    vconcat: [
      { width, height, layer: sigmaLayers },
      { width, height, layer: failLayers },
    ],
    // One x scale, so both panels line up even when the lower one leaves points out.
    resolve: { scale: { x: 'shared', color: 'independent' }, legend: { color: 'independent' } },
  };
}

/** Compiles a vega-lite spec and renders it headless to an SVG string; the view is always freed. */
async function render(spec: TopLevelSpec): Promise<string> {
  const view = new vega.View(vega.parse(compile(spec).spec), { renderer: 'none' });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

/**
 * SVG of an offset histogram with its Gaussian fit and the ±spec rules; see {@link histogramSpec}.
 * @example await histogramSvg({ title: 'offset', binEdges, counts, samples: 1e5, mean: 0, sigma: 2e-3, spec: 5e-3 })
 */
export async function histogramSvg(input: HistogramInput): Promise<string> {
  return render(histogramSpec(input));
}

/** SVG of a sweep's two stacked panels, sigma and failure probability; see {@link sweepSpec}. */
export async function sweepSvg(input: SweepInput): Promise<string> {
  return render(sweepSpec(input));
}

import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import type { BarsLayer, Chart, IntervalsLayer, Layer, LineLayer, PointsLayer, RuleLayer } from '../src/chart/chart.js';
import { MAX_DISPLAY_BINS, histogramChart, histogramSvg, rebin, sweepChart, sweepSvg, MC_FAILURE, TAIL_FAILURE } from '../src/plot.js';
import type { HistogramInput, SweepInput, SweepPoint } from '../src/plot.js';
import { expectWellFormedSvg, layerGroup, markerCentres, panels, plotBox, svgTexts, textsOfClass } from './support/svg.js';

/** The layer named `name` of panel `panel`. */
function layer<T extends Layer>(chart: Chart, name: string, panel = 0): T {
  const l = chart.panels[panel]!.layers.find((x) => x.name === name);
  expect(l, `layer ${name}`).toBeDefined();
  return l as T;
}

// ---------------------------------------------------------------------------------------------
// Fixtures: an exact Gaussian histogram (expected counts, rounded), so the test data are known.
// ---------------------------------------------------------------------------------------------

/** erf by Abramowitz & Stegun 7.1.26 (|error| < 1.5e-7), ample for building fixture counts. */
function erf(x: number): number {
  const t = 1 / (1 + 0.3275911 * Math.abs(x));
  const y = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-x * x);
  return x >= 0 ? y : -y;
}

/** `bins` equal bins over mean +- 5 sigma filled with the rounded expected counts of `samples`. */
function gaussianHistogram(bins: number, samples = 100_000, mean = 0.2e-3, sigma = 2e-3, spec = 5e-3): HistogramInput {
  const lo = mean - 5 * sigma;
  const hi = mean + 5 * sigma;
  const binEdges = Array.from({ length: bins + 1 }, (_, i) => lo + ((hi - lo) * i) / bins);
  const cdf = (v: number): number => 0.5 * (1 + erf((v - mean) / (sigma * Math.SQRT2)));
  const counts = Array.from({ length: bins }, (_, i) => Math.round(samples * (cdf(binEdges[i + 1]!) - cdf(binEdges[i]!))));
  return { title: 'Offset of the input pair', binEdges, counts, samples, mean, sigma, spec };
}

/** Eight widths 0.5..64 um; failures 0 at the 5th, 6th and 8th point (zero observed). */
function widthSweep(overrides: Partial<SweepInput> = {}): SweepInput {
  const widthsUm = [0.5, 1, 2, 4, 8, 16, 32, 64];
  const failures = [0.2, 0.05, 0.01, 1e-3, 0, 0, 2e-4, 0];
  const points: SweepPoint[] = widthsUm.map((w, i) => {
    const sigma = 8e-3 / Math.sqrt(w);
    const f = failures[i]!;
    return {
      x: w * 1e-6,
      analyticSigma: sigma,
      mcSigma: sigma * 1.02,
      mcSigmaLo: sigma * 0.97,
      mcSigmaHi: sigma * 1.07,
      yield: 1 - f,
      yieldLo: 1 - (f * 1.4 + 1e-4),
      yieldHi: 1 - f * 0.6,
      ...(i >= 3 ? { tailFailure: 1e-3 * Math.exp(-i), tailLo: 0.8e-3 * Math.exp(-i), tailHi: 1.25e-3 * Math.exp(-i) } : {}),
    };
  });
  return {
    title: 'Input width sweep & yield',
    field: 'input.w',
    fieldUnit: 'um',
    xScale: 1e6,
    log: true,
    points,
    sigmaTarget: 3e-3,
    yieldTarget: 0.999,
    ...overrides,
  };
}


// ---------------------------------------------------------------------------------------------
// Histogram
// ---------------------------------------------------------------------------------------------

describe('rebin (properties)', () => {
  it('keeps the total count and the outer edges, and yields at most maxBins bins whose edges are a subset', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 700 }), fc.integer({ min: 1, max: 250 }), fc.integer({ min: 0, max: 2 ** 31 - 1 }), (n, maxBins, seed) => {
        const edges = Array.from({ length: n + 1 }, (_, i) => -1 + i * 0.01);
        const counts = Array.from({ length: n }, (_, i) => (seed + i * 7919) % 97);
        const out = rebin(edges, counts, maxBins);
        // Exact: integer counts are summed, edges are copied, not recomputed.
        expect(out.counts.length).toBeLessThanOrEqual(maxBins);
        expect(out.counts.length).toBe(n <= maxBins ? n : Math.ceil(n / Math.ceil(n / maxBins)));
        expect(out.edges.length).toBe(out.counts.length + 1);
        expect(out.counts.reduce((a, b) => a + b, 0)).toBe(counts.reduce((a, b) => a + b, 0));
        expect(out.edges[0]).toBe(edges[0]);
        expect(out.edges.at(-1)).toBe(edges.at(-1));
        for (const e of out.edges) expect(edges).toContain(e);
      }),
      { numRuns: 200, seed: 20240611 },
    );
  });

  it('merges pairs as in the documented example', () => {
    // Hand-computed: groups of ceil(3 / 2) = 2 bins, the last group holds the one left over.
    expect(rebin([0, 1, 2, 3], [1, 2, 3], 2)).toEqual({ edges: [0, 2, 3], counts: [3, 3] });
  });
});

describe('histogramChart', () => {
  it('keeps 200 bins as given and rebins 300, 201 and 2000 bins to at most 200', () => {
    expect(MAX_DISPLAY_BINS).toBe(200);
    // Expected bar counts from ceil(n / ceil(n / 200)): 200 -> 200, 300 -> 150, 201 -> 101, 2000 -> 200.
    for (const [given, shown] of [[200, 200], [300, 150], [201, 101], [2000, 200]] as const) {
      expect(layer<BarsLayer>(histogramChart(gaussianHistogram(given)), 'histogram').bars).toHaveLength(shown);
    }
  });

  it('draws bars in millivolts and the spec lines at -spec and +spec, labelled with their values', () => {
    const input = gaussianHistogram(100);
    const chart = histogramChart(input);
    const bars = layer<BarsLayer>(chart, 'histogram').bars;
    // Exact up to one rounding of the volts-to-millivolts product (relative 1e-12).
    expect(bars[0]!.x0).toBeCloseTo(input.binEdges[0]! * 1e3, 12);
    expect(bars.at(-1)!.x1).toBeCloseTo(input.binEdges.at(-1)! * 1e3, 12);
    expect(bars.map((b) => b.y)).toEqual(input.counts);
    const lo = layer<RuleLayer>(chart, 'spec-low');
    const hi = layer<RuleLayer>(chart, 'spec-high');
    expect([lo.value, hi.value]).toEqual([-5, 5]);
    expect([lo.label, hi.label]).toEqual(['\u2212spec \u22125 mV', '+spec 5 mV']);
  });

  it('scales the Gaussian curve to samples * bin width: its peak and its area match', () => {
    const input = gaussianHistogram(100);
    const curve = layer<LineLayer>(histogramChart(input), 'gaussian').points;
    const binWidthMv = ((input.binEdges.at(-1)! - input.binEdges[0]!) / 100) * 1e3;
    const sigmaMv = input.sigma * 1e3;
    // Peak of samples * width * N(mean, sigma) pdf = samples * width / (sigma sqrt(2 pi)); the
    // 401-point grid over mean +- 5 sigma has a point exactly at the mean (relative 1e-12).
    const peak = Math.max(...curve.map((c) => c[1]));
    expect(Math.abs(peak / ((input.samples * binWidthMv) / (sigmaMv * Math.sqrt(2 * Math.PI))) - 1)).toBeLessThan(1e-12);
    // Area / width = samples * P(|z| < 5) = samples * (1 - 5.73e-7); trapezoid error at step
    // 0.025 sigma is ~1e-5 relative, so 1e-4 relative is a safe bound.
    let area = 0;
    for (let i = 1; i < curve.length; i++) area += 0.5 * (curve[i]![1] + curve[i - 1]![1]) * (curve[i]![0] - curve[i - 1]![0]);
    expect(Math.abs(area / binWidthMv / input.samples - 1)).toBeLessThan(1e-4);
  });

  it('widens the curve and the axis to cover spec lines outside the bins, and no further than a 4% margin', () => {
    const input = { ...gaussianHistogram(50), spec: 20e-3 };
    const chart = histogramChart(input);
    const curve = layer<LineLayer>(chart, 'gaussian').points;
    // Exact endpoints of the grid: -spec and +spec in mV.
    expect(curve[0]![0]).toBe(-20);
    expect(curve.at(-1)![0]).toBe(20);
    // The axis: +-20 mV plus 4% of the 40 mV span (1.6 mV) each side.
    expect(chart.panels[0]!.x.domain[0]).toBeCloseTo(-21.6, 9);
    expect(chart.panels[0]!.x.domain[1]).toBeCloseTo(21.6, 9);
  });

  it('draws no spec line without a spec, and one line for an upper-only spec', () => {
    const { spec: _s, ...noSpec } = gaussianHistogram(40);
    expect(histogramChart(noSpec).panels[0]!.layers.filter((l) => l.kind === 'rule')).toHaveLength(0);
    const upper = histogramChart({ ...gaussianHistogram(40), specSides: 'one' });
    expect(upper.panels[0]!.layers.filter((l) => l.kind === 'rule').map((l) => (l as RuleLayer).value)).toEqual([5]);
  });

  it('shows another figure in its own unit', () => {
    const chart = histogramChart({ ...gaussianHistogram(40), figure: { label: 'current error', symbol: 'e', unit: '%', scale: 100 } });
    expect(chart.panels[0]!.x.label).toBe('current error e (%)');
    expect(layer<RuleLayer>(chart, 'spec-high').label).toBe('+spec 0.5 %');
  });

  it('puts the sample statistics and the caller subtitle under the title', () => {
    const chart = histogramChart({ ...gaussianHistogram(40), subtitle: 'design demo.yaml' });
    expect(chart.title).toBe('Offset of the input pair');
    expect(chart.subtitle).toEqual(['design demo.yaml', '100000 samples, mean 0.2 mV, sigma 2 mV, spec \u00b15 mV']);
  });

  it('names the bad field when the input is inconsistent', () => {
    const good = gaussianHistogram(10);
    expect(() => histogramChart({ ...good, binEdges: good.binEdges.slice(1) })).toThrow(/binEdges must have counts.length \+ 1 = 11 entries, got 10/);
    expect(() => histogramChart({ ...good, sigma: 0 })).toThrow(/sigma must be a positive finite number, got 0/);
    expect(() => histogramChart({ ...good, counts: good.counts.map((c, i) => (i === 3 ? Number.NaN : c)) })).toThrow(/counts\[3\]/);
    expect(() => histogramChart({ ...good, binEdges: good.binEdges.map((e, i) => (i === 5 ? good.binEdges[4]! : e)) })).toThrow(/binEdges must increase/);
  });
});

describe('histogramSvg', () => {
  it('renders 300 bins as 150 bars with the Gaussian path, titles, legend and labelled spec lines', () => {
    const input = { ...gaussianHistogram(300), subtitle: 'seed 7 & 100k samples' };
    const svg = histogramSvg(input);
    expectWellFormedSvg(svg);
    // One rect per non-empty bar of the 150 (bins merged in pairs; an empty bin draws nothing).
    const merged = rebin(input.binEdges, input.counts, MAX_DISPLAY_BINS).counts;
    expect(merged).toHaveLength(150);
    expect((layerGroup(svg, 'histogram')!.match(/<rect class="bar"/g) ?? []).length).toBe(merged.filter((c) => c > 0).length);
    const gaussian = /d="(M[^"]+)"/.exec(layerGroup(svg, 'gaussian')!);
    // 401 curve points make one path: 400 line-to segments (exact, 'L').
    expect((gaussian![1]!.match(/L/g) ?? []).length).toBe(400);
    const texts = svgTexts(svg);
    for (const t of ['Offset of the input pair', 'seed 7 & 100k samples', 'Gaussian fit (sample mean and sigma)', '\u2212spec \u22125 mV', '+spec 5 mV']) expect(texts).toContain(t);
    expect(textsOfClass(svg, 'axis-label x')).toEqual(['offset Vos (mV)']);
    expect(textsOfClass(svg, 'axis-label y')).toEqual(['samples per bin']);
  });

  it('renders a 2000-bin, 100k-sample histogram as 200 bars, one rect per non-empty bar', () => {
    const input = gaussianHistogram(2000);
    const svg = histogramSvg(input);
    expectWellFormedSvg(svg);
    const merged = rebin(input.binEdges, input.counts, MAX_DISPLAY_BINS).counts;
    expect(merged).toHaveLength(200);
    expect((layerGroup(svg, 'histogram')!.match(/<rect class="bar"/g) ?? []).length).toBe(merged.filter((c) => c > 0).length);
  });
});

// ---------------------------------------------------------------------------------------------
// Sweep
// ---------------------------------------------------------------------------------------------

describe('sweepChart', () => {
  it('fits the log x axis to the swept values: 0.5-64 um gives no decade of empty axis', () => {
    const chart = sweepChart(widthSweep());
    const x = chart.panels[0]!.x;
    expect(x.kind).toBe('log');
    // log10(64 / 0.5) = 2.107 decades; a 4% margin is a factor 10^0.0843 = 1.214 each way.
    expect(x.domain[0]).toBeCloseTo(0.5 / 1.214, 2);
    expect(x.domain[1]).toBeCloseTo(64 * 1.214, 0);
    expect(x.ticks).toEqual([0.5, 1, 2, 5, 10, 20, 50]);
    expect(chart.panels[1]!.y.kind).toBe('log');
    expect(chart.panels[0]!.y.kind).toBe('linear');
    expect(sweepChart(widthSweep({ log: false })).panels[0]!.x.kind).toBe('linear');
  });

  it('shows x in display units and sigmas in millivolts, and labels both targets with their values', () => {
    const input = widthSweep();
    const chart = sweepChart(input);
    layer<LineLayer>(chart, 'analytic').points.forEach(([x, y], i) => {
      // x * 1e6 and sigma * 1e3, each one floating-point product (relative 1e-12).
      expect(x).toBeCloseTo(input.points[i]!.x * 1e6, 10);
      expect(y).toBeCloseTo(input.points[i]!.analyticSigma * 1e3, 10);
    });
    expect(layer<RuleLayer>(chart, 'target-sigma').value).toBe(3);
    expect(layer<RuleLayer>(chart, 'target-sigma').label).toBe('target sigma 3 mV');
    // 1 - 0.999 = 0.0010000000000000009 in doubles; the label rounds to 3 digits.
    expect(layer<RuleLayer>(chart, 'target-failure', 1).label).toBe('target failure 0.001');
    expect(layer<IntervalsLayer>(chart, 'mc-sigma-interval').items).toHaveLength(8);
  });

  it('leaves out zero-failure points, counts them in the subtitle and breaks the line there', () => {
    const chart = sweepChart(widthSweep());
    expect(chart.subtitle).toEqual(['3 points with zero observed failures not shown']);
    const pts = layer<PointsLayer>(chart, 'mc-failure', 1).points;
    // Failures at 0.5, 1, 2, 4 and 32 um are positive; 8, 16 and 64 um had none.
    expect(pts.map((p) => p.x)).toEqual([0.5, 1, 2, 4, 32]);
    // 1 - yield: 1 - (1 - 0.2) = 0.2 up to one rounding (absolute 1e-15).
    expect(Math.abs(pts[0]!.y - 0.2)).toBeLessThan(1e-15);
    const line = layer<LineLayer>(chart, 'mc-failure-line', 1).points;
    expect(line.map(([, y]) => Number.isNaN(y))).toEqual([false, false, false, false, true, true, false, true]);
    expect(layer<PointsLayer>(chart, 'tail-failure', 1).points).toHaveLength(5);
  });

  it('says "1 point" for a single zero-failure point and names zero tail estimates', () => {
    const input = widthSweep();
    const points = input.points.map((p, i) => (i === 4 || i === 5 || i === 7 ? { ...p, yield: 0.99 } : p));
    const withTailZero = points.map((p, i) => (i === 5 ? { ...p, yield: 1, tailFailure: 0 } : p));
    expect(sweepChart({ ...input, points: withTailZero }).subtitle).toEqual(['1 point with zero observed failures not shown', '1 tail estimate of zero not shown']);
    expect(sweepChart({ ...input, points }).subtitle).toBeUndefined();
  });

  it('fits the failure axis to the plotted values and the target, not to whole decades', () => {
    const y = sweepChart(widthSweep()).panels[1]!.y;
    // Smallest plotted value: tail lower end 0.8e-3 e^-7 = 7.30e-7; largest: the 0.2 failure's
    // upper end 0.2 * 1.4 + 1e-4 = 0.2801. A 4% margin of 5.584 decades is 0.2234 decades.
    expect(y.kind === 'log' && y.domain[0]).toBeCloseTo(7.2955e-7 / 10 ** 0.22336, 8);
    expect(y.kind === 'log' && y.domain[1]).toBeCloseTo(0.2801 * 10 ** 0.22336, 3);
  });

  it('keeps an interval whose lower end is zero (it is drawn to the axis with an arrow)', () => {
    const input = widthSweep();
    const points = input.points.map((p, i) => (i === 6 ? { ...p, yieldHi: 1 } : p));
    const chart = sweepChart({ ...input, points });
    const at32 = layer<IntervalsLayer>(chart, 'mc-failure-interval', 1).items.find((b) => b.at === 32);
    expect(at32?.lo).toBe(0);
    const svg = sweepSvg({ ...input, points });
    expectWellFormedSvg(svg);
  });

  it('titles the x axis with the field alone when it has no unit', () => {
    expect(sweepChart(widthSweep({ field: 'stage.m', fieldUnit: '', xScale: 1, log: false })).panels[0]!.x.label).toBe('stage.m');
  });

  it('names the bad point and field', () => {
    const input = widthSweep();
    expect(() => sweepChart({ ...input, points: input.points.map((p, i) => (i === 2 ? { ...p, x: 0 } : p)) })).toThrow(/points\[2\]\.x must be > 0 on a log axis, got 0/);
    expect(() => sweepChart({ ...input, points: input.points.map((p, i) => (i === 1 ? { ...p, yield: 1.2 } : p)) })).toThrow(/points\[1\]\.yield must be a probability in \[0, 1\], got 1.2/);
    expect(() => sweepChart({ ...input, yieldTarget: 1 })).toThrow(/yieldTarget must lie strictly between 0 and 1/);
    expect(() => sweepChart({ ...input, points: [] })).toThrow(/at least one point/);
  });
});

describe('sweepSvg', () => {
  it('renders both panels with units on the axes, every legend label and the omission note', () => {
    const svg = sweepSvg(widthSweep());
    expectWellFormedSvg(svg);
    const texts = svgTexts(svg);
    for (const t of ['Input width sweep & yield', '3 points with zero observed failures not shown', 'linearised', 'Monte Carlo', 'target sigma 3 mV', MC_FAILURE, TAIL_FAILURE, 'target failure 0.001']) expect(texts).toContain(t);
    // Both panels carry their own x axis label.
    expect(textsOfClass(svg, 'axis-label x')).toEqual(['input.w (um)', 'input.w (um)']);
    expect(textsOfClass(svg, 'axis-label y')).toEqual(['offset sigma (mV)', 'failure probability']);
  });

  it('keeps every marker off the frame', () => {
    const svg = sweepSvg(widthSweep());
    panels(svg).forEach((body, i) => {
      const box = plotBox(svg, 'sweep', i);
      for (const name of i === 0 ? ['mc-sigma'] : ['mc-failure']) {
        const pts = markerCentres(layerGroup(body, name)!);
        expect(pts.length).toBeGreaterThan(0);
        // Marker radius 3.5 px: its centre must be more than that inside the plot area.
        for (const p of pts) {
          expect(Math.min(p.x - box.x0, box.x1 - p.x, p.y - box.y0, box.y1 - p.y)).toBeGreaterThan(3.5);
        }
      }
    });
  });

  it('renders without NaN when every point had zero failures and nothing else is on the log axis', () => {
    const input = widthSweep();
    const points = input.points.map(({ tailFailure: _t, tailLo: _l, tailHi: _h, ...p }) => ({ ...p, yield: 1, yieldLo: 0.999, yieldHi: 1 }));
    const { yieldTarget: _y, ...rest } = input;
    const svg = sweepSvg({ ...rest, log: false, points });
    expectWellFormedSvg(svg);
    expect(svgTexts(svg)).toContain('8 points with zero observed failures not shown');
  });

  it('renders a sweep with only the analytic sigma', () => {
    const points = [1, 2, 3].map((k) => ({ x: k * 1e-6, analyticSigma: 1e-3 / k }));
    const svg = sweepSvg({ title: 'analytic only', field: 'input.l', fieldUnit: 'um', xScale: 1e6, log: false, points });
    expectWellFormedSvg(svg);
    const texts = svgTexts(svg);
    expect(texts).toContain('input.l (um)');
    expect(texts).toContain('linearised');
    expect(texts).not.toContain('Monte Carlo');
  });
});

import { describe, it, expect, vi, afterEach } from 'vitest';
import fc from 'fast-check';
import { compile } from 'vega-lite';
import type { TopLevelSpec } from 'vega-lite';
import { MAX_DISPLAY_BINS, histogramSpec, histogramSvg, rebin, sweepSpec, sweepSvg } from '../src/plot.js';
import type { HistogramInput, SweepInput, SweepPoint } from '../src/plot.js';

// ---------------------------------------------------------------------------------------------
// Helpers: a tag-balance check for the SVG, and readers for the spec and the compiled spec.
// ---------------------------------------------------------------------------------------------

/** Returns null when every opened tag is closed in order, else a description of the first fault. */
function tagBalanceFault(svg: string): string | null {
  const stack: string[] = [];
  const tag = /<(\/?)([A-Za-z][\w:.-]*)((?:"[^"]*"|'[^']*'|[^'">])*?)(\/?)>/g;
  let m: RegExpExecArray | null;
  let consumed = 0;
  while ((m = tag.exec(svg)) !== null) {
    const between = svg.slice(consumed, m.index);
    if (between.includes('<') || between.includes('>')) return `stray bracket before offset ${m.index}`;
    consumed = m.index + m[0].length;
    const [, close, name, , selfClose] = m;
    if (selfClose === '/') continue;
    if (close === '/') {
      const open = stack.pop();
      if (open !== name) return `</${name}> closes <${open ?? 'nothing'}>`;
    } else stack.push(name!);
  }
  if (svg.slice(consumed).trim() !== '') return 'text after the last tag';
  return stack.length === 0 ? null : `unclosed <${stack.join('>, <')}>`;
}

/** Text lines of the SVG (a multi-line text is one <tspan> per line), with &amp; and &lt; undone. */
function svgTexts(svg: string): string[] {
  return [...svg.matchAll(/<(text|tspan)[^>]*>([^<]+)<\/\1>/g)].map((m) => m[2]!.replace(/&lt;/g, '<').replace(/&amp;/g, '&'));
}

/** Number of `<path` items inside the mark group whose class contains `markClass`. */
function countPathsIn(svg: string, markClass: string): number {
  const group = new RegExp(`<g class="[^"]*${markClass}[^"]*"[^>]*>(.*?)</g>`, 's').exec(svg);
  if (group === null) return -1;
  return (group[1]!.match(/<path/g) ?? []).length;
}

function expectWellFormedSvg(svg: string): void {
  expect(svg.startsWith('<svg')).toBe(true);
  expect(svg.endsWith('</svg>')).toBe(true);
  expect(tagBalanceFault(svg)).toBeNull();
  // A NaN or infinite coordinate or label would show up as these words anywhere in the text.
  expect(svg).not.toMatch(/NaN|Infinity/);
}

type AnyRecord = Record<string, unknown>;

/** The top-level layers, or the layers of vconcat panel `panel`. */
function layersOf(spec: TopLevelSpec, panel?: number): AnyRecord[] {
  const s = spec as unknown as AnyRecord;
  const unit = panel === undefined ? s : ((s['vconcat'] as AnyRecord[])[panel] as AnyRecord);
  return unit['layer'] as AnyRecord[];
}

function layerNamed(spec: TopLevelSpec, name: string, panel?: number): AnyRecord | undefined {
  return layersOf(spec, panel).find((l) => l['name'] === name);
}

function valuesOf(layer: AnyRecord | undefined): AnyRecord[] {
  expect(layer).toBeDefined();
  return (layer!['data'] as { values: AnyRecord[] }).values;
}

/** Scale types of a compiled (Vega) spec, by scale name, wherever the scale is declared. */
function compiledScaleTypes(spec: TopLevelSpec): Map<string, string> {
  const out = new Map<string, string>();
  const visit = (node: AnyRecord): void => {
    for (const s of (node['scales'] as AnyRecord[] | undefined) ?? []) out.set(s['name'] as string, s['type'] as string);
    for (const m of (node['marks'] as AnyRecord[] | undefined) ?? []) visit(m);
  };
  visit(compile(spec).spec as unknown as AnyRecord);
  return out;
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

afterEach(() => {
  vi.restoreAllMocks();
});

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

describe('histogramSpec', () => {
  it('keeps 200 bins as given and rebins 300, 201 and 2000 bins to at most 200', () => {
    expect(MAX_DISPLAY_BINS).toBe(200);
    // Expected bar counts from ceil(n / ceil(n / 200)): 200 -> 200, 300 -> 150, 201 -> 101, 2000 -> 200.
    for (const [given, shown] of [[200, 200], [300, 150], [201, 101], [2000, 200]] as const) {
      expect(valuesOf(layerNamed(histogramSpec(gaussianHistogram(given)), 'bars'))).toHaveLength(shown);
    }
  });

  it('draws bars in millivolts and the spec rules at -spec and +spec', () => {
    const input = gaussianHistogram(100);
    const spec = histogramSpec(input);
    const bars = valuesOf(layerNamed(spec, 'bars'));
    // Exact up to one rounding of the volts-to-millivolts product (relative 1e-12).
    expect(bars[0]!['lo'] as number).toBeCloseTo(input.binEdges[0]! * 1e3, 12);
    expect(bars.at(-1)!['hi'] as number).toBeCloseTo(input.binEdges.at(-1)! * 1e3, 12);
    expect(bars.map((b) => b['count'])).toEqual(input.counts);
    const rules = valuesOf(layerNamed(spec, 'specRules'));
    expect(rules.map((r) => r['x'])).toEqual([-5, 5]);
    expect(valuesOf(layerNamed(spec, 'specLabels')).map((r) => r['label'])).toEqual(['-spec', '+spec']);
  });

  it('scales the Gaussian curve to samples * bin width: its peak and its area match', () => {
    const input = gaussianHistogram(100);
    const curve = valuesOf(layerNamed(histogramSpec(input), 'gaussian')) as { x: number; y: number }[];
    const binWidthMv = ((input.binEdges.at(-1)! - input.binEdges[0]!) / 100) * 1e3;
    const sigmaMv = input.sigma * 1e3;
    // Peak of samples * width * N(mean, sigma) pdf = samples * width / (sigma sqrt(2 pi)); the
    // 401-point grid over mean +- 5 sigma has a point exactly at the mean (relative 1e-12).
    const peak = Math.max(...curve.map((c) => c.y));
    expect(Math.abs(peak / ((input.samples * binWidthMv) / (sigmaMv * Math.sqrt(2 * Math.PI))) - 1)).toBeLessThan(1e-12);
    // Area / width = samples * P(|z| < 5) = samples * (1 - 5.73e-7); trapezoid error at step
    // 0.025 sigma is ~1e-5 relative, so 1e-4 relative is a safe bound.
    let area = 0;
    for (let i = 1; i < curve.length; i++) area += 0.5 * (curve[i]!.y + curve[i - 1]!.y) * (curve[i]!.x - curve[i - 1]!.x);
    expect(Math.abs(area / binWidthMv / input.samples - 1)).toBeLessThan(1e-4);
  });

  it('widens the curve to cover the spec rules when they lie outside the bins', () => {
    const input = { ...gaussianHistogram(50), spec: 20e-3 };
    const curve = valuesOf(layerNamed(histogramSpec(input), 'gaussian')) as { x: number }[];
    // Exact endpoints of the grid: -spec and +spec in mV.
    expect(curve[0]!.x).toBe(-20);
    expect(curve.at(-1)!.x).toBe(20);
  });

  it('puts the sample statistics and the caller subtitle under the title', () => {
    const spec = histogramSpec({ ...gaussianHistogram(40), subtitle: 'design demo.yaml' }) as unknown as AnyRecord;
    expect(spec['title']).toEqual({ text: 'Offset of the input pair', subtitle: ['design demo.yaml', '100000 samples, mean 0.2 mV, sigma 2 mV, spec ±5 mV'] });
  });

  it('names the bad field when the input is inconsistent', () => {
    const good = gaussianHistogram(10);
    expect(() => histogramSpec({ ...good, binEdges: good.binEdges.slice(1) })).toThrow(/binEdges must have counts.length \+ 1 = 11 entries, got 10/);
    expect(() => histogramSpec({ ...good, sigma: 0 })).toThrow(/sigma must be a positive finite number, got 0/);
    expect(() => histogramSpec({ ...good, counts: good.counts.map((c, i) => (i === 3 ? Number.NaN : c)) })).toThrow(/counts\[3\]/);
    expect(() => histogramSpec({ ...good, binEdges: good.binEdges.map((e, i) => (i === 5 ? good.binEdges[4]! : e)) })).toThrow(/binEdges must increase/);
  });
});

describe('histogramSvg', () => {
  it('renders 300 bins as 150 bars with the Gaussian path, titles, legend and spec labels', async () => {
    const warn = vi.spyOn(console, 'warn');
    const svg = await histogramSvg({ ...gaussianHistogram(300), subtitle: 'seed 7 & 100k samples' });
    expectWellFormedSvg(svg);
    // One <path> per bar in the bars mark group: 300 bins merged in pairs.
    expect(countPathsIn(svg, 'bars_marks')).toBe(150);
    const gaussian = /<g class="mark-line role-mark gaussian_marks"[^>]*><path[^>]* d="([^"]+)"/.exec(svg);
    expect(gaussian).not.toBeNull();
    // 401 curve points make one path of 401 vertices: at least 400 line-to segments (exact, 'L').
    expect((gaussian![1]!.match(/L/g) ?? []).length).toBeGreaterThanOrEqual(400);
    const texts = svgTexts(svg);
    for (const t of ['Offset of the input pair', 'seed 7 & 100k samples', 'offset Vos (mV)', 'samples per bin', 'histogram', 'Gaussian fit', 'spec', '-spec', '+spec']) {
      expect(texts).toContain(t);
    }
    // The specs compile and render without vega-lite or vega warnings.
    expect(warn).not.toHaveBeenCalled();
  });

  it('renders a 2000-bin, 100k-sample histogram as exactly 200 bars', async () => {
    const input = gaussianHistogram(2000);
    const svg = await histogramSvg(input);
    expectWellFormedSvg(svg);
    expect(countPathsIn(svg, 'bars_marks')).toBe(200);
  });
});

// ---------------------------------------------------------------------------------------------
// Sweep
// ---------------------------------------------------------------------------------------------

describe('sweepSpec', () => {
  it('uses a log x scale when asked and a linear one otherwise; failure probability is always log', () => {
    const logScales = compiledScaleTypes(sweepSpec(widthSweep()));
    expect(logScales.get('x')).toBe('log');
    expect(logScales.get('concat_0_y')).toBe('linear');
    expect(logScales.get('concat_1_y')).toBe('log');
    const linScales = compiledScaleTypes(sweepSpec(widthSweep({ log: false })));
    expect(linScales.get('x')).toBe('linear');
    expect(linScales.get('concat_1_y')).toBe('log');
  });

  it('shows x in display units and sigmas in millivolts', () => {
    const input = widthSweep();
    const spec = sweepSpec(input);
    const analytic = valuesOf(layerNamed(spec, 'analyticLine', 0));
    // x * 1e6 and sigma * 1e3, each one floating-point product (relative 1e-12).
    analytic.forEach((row, i) => {
      expect(row['x'] as number).toBeCloseTo(input.points[i]!.x * 1e6, 10);
      expect(row['sigma'] as number).toBeCloseTo(input.points[i]!.analyticSigma * 1e3, 10);
    });
    expect(valuesOf(layerNamed(spec, 'sigmaTarget', 0))[0]!['y']).toBe(3);
    const bars = valuesOf(layerNamed(spec, 'mcSigmaBars', 0));
    expect(bars).toHaveLength(8);
  });

  it('leaves out zero-failure points, counts them in the subtitle and breaks the line there', () => {
    const spec = sweepSpec(widthSweep());
    expect((spec as unknown as AnyRecord)['title']).toEqual({ text: 'Input width sweep & yield', subtitle: ['3 points with zero observed failures not shown'] });
    const rows = valuesOf(layerNamed(spec, 'failurePoints', 1)) as { x: number; p: number; series: string; segment: string }[];
    const mc = rows.filter((r) => r.series === 'Monte Carlo 1 - yield');
    // Failures at 0.5, 1, 2, 4 and 32 um are positive; 8, 16 and 64 um had none.
    expect(mc.map((r) => r.x)).toEqual([0.5, 1, 2, 4, 32]);
    expect(mc.every((r) => r.p > 0)).toBe(true);
    // The run before the gap shares one segment; the 32 um point starts another.
    expect(new Set(mc.slice(0, 4).map((r) => r.segment)).size).toBe(1);
    expect(mc[4]!.segment).not.toBe(mc[0]!.segment);
    // 1 - yield: 1 - (1 - 0.2) = 0.2 up to one rounding (absolute 1e-15).
    expect(Math.abs(mc[0]!.p - 0.2)).toBeLessThan(1e-15);
    const tail = rows.filter((r) => r.series === 'importance-sampling tail');
    expect(tail).toHaveLength(5);
  });

  it('says "1 point" for a single zero-failure point and names zero tail estimates', () => {
    const input = widthSweep();
    const points = input.points.map((p, i) => (i === 4 || i === 5 || i === 7 ? { ...p, yield: 0.99 } : p));
    const withTailZero = points.map((p, i) => (i === 5 ? { ...p, yield: 1, tailFailure: 0 } : p));
    const spec = sweepSpec({ ...input, points: withTailZero });
    expect((spec as unknown as AnyRecord)['title']).toEqual({
      text: 'Input width sweep & yield',
      subtitle: ['1 point with zero observed failures not shown', '1 tail estimate of zero not shown'],
    });
    const none = sweepSpec({ ...input, points });
    expect((none as unknown as AnyRecord)['title']).toEqual({ text: 'Input width sweep & yield' });
  });

  it('sets the failure axis to whole decades around every plotted value and the target', () => {
    const spec = sweepSpec(widthSweep());
    const layer = layerNamed(spec, 'failurePoints', 1)!;
    const y = (layer['encoding'] as AnyRecord)['y'] as { scale: { domain: number[] } };
    // Smallest plotted value: tail lower end 0.8e-3 * e^-7 = 7.3e-7 -> 1e-7; largest: the
    // 0.2 failure's upper end 0.2 * 1.4 + 1e-4 -> 1e0.
    expect(y.scale.domain).toEqual([1e-7, 1]);
  });

  it('runs an interval whose lower end is zero to the bottom of the axis', () => {
    const input = widthSweep();
    const points = input.points.map((p, i) => (i === 6 ? { ...p, yieldHi: 1 } : p));
    const spec = sweepSpec({ ...input, points });
    const bars = valuesOf(layerNamed(spec, 'failureBars', 1)) as { x: number; lo: number; hi: number; series: string }[];
    const at32 = bars.find((b) => b.series === 'Monte Carlo 1 - yield' && b.x === 32);
    expect(at32?.lo).toBe(1e-7);
    for (const b of bars) expect(b.lo).toBeGreaterThan(0);
  });

  it('titles the x axis with the field alone when it has no unit', () => {
    const spec = sweepSpec(widthSweep({ field: 'stage.m', fieldUnit: '', xScale: 1, log: false }));
    const x = ((layerNamed(spec, 'analyticLine', 0)!['encoding'] as AnyRecord)['x'] as AnyRecord)['title'];
    expect(x).toBe('stage.m');
  });

  it('names the bad point and field', () => {
    const input = widthSweep();
    expect(() => sweepSpec({ ...input, points: input.points.map((p, i) => (i === 2 ? { ...p, x: 0 } : p)) })).toThrow(/points\[2\]\.x must be > 0 on a log axis, got 0/);
    expect(() => sweepSpec({ ...input, points: input.points.map((p, i) => (i === 1 ? { ...p, yield: 1.2 } : p)) })).toThrow(/points\[1\]\.yield must be a probability in \[0, 1\], got 1.2/);
    expect(() => sweepSpec({ ...input, yieldTarget: 1 })).toThrow(/yieldTarget must lie strictly between 0 and 1/);
    expect(() => sweepSpec({ ...input, points: [] })).toThrow(/at least one point/);
  });
});

describe('sweepSvg', () => {
  it('renders both panels with units on the axes, every legend label and the omission note', async () => {
    const warn = vi.spyOn(console, 'warn');
    const svg = await sweepSvg(widthSweep());
    expectWellFormedSvg(svg);
    const texts = svgTexts(svg);
    for (const t of [
      'Input width sweep & yield',
      '3 points with zero observed failures not shown',
      'input.w (um)',
      'offset sigma (mV)',
      'failure probability',
      'analytic',
      'Monte Carlo',
      'target sigma',
      'Monte Carlo 1 - yield',
      'importance-sampling tail',
      'target failure',
    ]) {
      expect(texts).toContain(t);
    }
    // Both panels carry their own x axis title.
    expect(texts.filter((t) => t === 'input.w (um)')).toHaveLength(2);
    // The analytic line is one path.
    expect(countPathsIn(svg, 'analyticLine_marks')).toBe(1);
    expect(warn).not.toHaveBeenCalled();
  });

  it('renders without NaN when every point had zero failures and nothing else is on the log axis', async () => {
    const warn = vi.spyOn(console, 'warn');
    const input = widthSweep();
    const points = input.points.map(({ tailFailure: _t, tailLo: _l, tailHi: _h, ...p }) => ({ ...p, yield: 1, yieldLo: 0.999, yieldHi: 1 }));
    const { yieldTarget: _y, ...rest } = input;
    const svg = await sweepSvg({ ...rest, log: false, points });
    expectWellFormedSvg(svg);
    expect(svgTexts(svg)).toContain('8 points with zero observed failures not shown');
    expect(warn).not.toHaveBeenCalled();
  });

  it('renders a sweep with only the analytic sigma', async () => {
    const points = [1, 2, 3].map((k) => ({ x: k * 1e-6, analyticSigma: 1e-3 / k }));
    const svg = await sweepSvg({ title: 'analytic only', field: 'input.l', fieldUnit: 'um', xScale: 1e6, log: false, points });
    expectWellFormedSvg(svg);
    const texts = svgTexts(svg);
    expect(texts).toContain('input.l (um)');
    expect(texts).toContain('analytic');
    expect(texts).not.toContain('Monte Carlo');
  });
});

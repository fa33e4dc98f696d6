import { describe, expect, it } from 'vitest';
import { categoryAxis, linearAxis, logAxis, logTickLabel, positioner } from '../src/chart/axis.js';
import { chartSvg, type Chart } from '../src/chart/chart.js';
import { esc, px } from '../src/chart/svg.js';
import { COLOR } from '../src/chart/style.js';
import { expectWellFormedSvg, layerGroup, markerCentres, plotBox, svgTexts, textsOfClass } from './support/svg.js';

// Axis rules of our own (common practice, no source): the domain is the data's range plus a
// margin of 4% of the span (in decades on a log axis), never widened to whole decades.
describe('axes fitted to the data', () => {
  it('a log axis over 0.5-20 um stays within 4% of a decade-span of the data and ticks 1-2-5 inside it', () => {
    const a = logAxis('W (um)', [0.5, 1, 2, 5, 20]);
    // log10(20 / 0.5) = 1.602 decades; 4% of that is 0.0641 decades, a factor 10^0.0641 = 1.1591.
    expect(a.domain[0]).toBeCloseTo(0.5 / 1.1591, 3);
    expect(a.domain[1]).toBeCloseTo(20 * 1.1591, 2);
    expect(a.ticks).toEqual([0.5, 1, 2, 5, 10, 20]);
    expect(a.tickLabels).toEqual(['0.5', '1', '2', '5', '10', '20']);
  });

  it('a log axis over many decades labels powers of ten only, at most 9 of them', () => {
    const a = logAxis('p', [1e-12, 0.5]);
    for (const t of a.ticks) expect(Math.log10(t) % 1).toBeCloseTo(0, 12);
    expect(a.ticks.length).toBeLessThanOrEqual(9);
    expect(a.ticks.length).toBeGreaterThanOrEqual(3);
    expect(a.tickLabels[0]).toMatch(/^10\u207b/);
  });

  it('a log axis narrower than one mantissa step still gets two or more round ticks', () => {
    const a = logAxis('x', [2.1, 2.4]);
    expect(a.ticks.length).toBeGreaterThanOrEqual(2);
    for (const t of a.ticks) {
      expect(t).toBeGreaterThanOrEqual(a.domain[0]);
      expect(t).toBeLessThanOrEqual(a.domain[1]);
    }
  });

  it('caps a log axis at max (probabilities never above 1)', () => {
    // 0.01..0.99 is 2 decades: 4% more above 0.99 would pass 1.
    expect(logAxis('p', [0.01, 0.99], { max: 1 }).domain[1]).toBe(1);
  });

  it('a linear axis pads 4% of the span each side; with zero it starts at exactly 0', () => {
    const a = linearAxis('x', [10, 20]);
    expect(a.domain[0]).toBeCloseTo(9.6, 12);
    expect(a.domain[1]).toBeCloseTo(20.4, 12);
    expect(linearAxis('n', [0, 100], { zero: true }).domain[0]).toBe(0);
    // Ticks are round numbers inside the domain.
    for (const t of a.ticks) expect(t >= a.domain[0] && t <= a.domain[1]).toBe(true);
    expect(a.ticks).toEqual([10, 12, 14, 16, 18, 20]);
  });

  it('includes the values it is asked to (limits and targets)', () => {
    const a = linearAxis('x', [1, 2], { include: [5] });
    expect(a.domain[1]).toBeGreaterThan(5);
  });

  it('refuses an axis with nothing to fit, naming it', () => {
    expect(() => linearAxis('offset', [Number.NaN])).toThrow(/axis "offset": no finite value/);
    expect(() => logAxis('failure', [0, -1])).toThrow(/axis "failure": no positive value/);
  });

  it('labels log ticks as plain decimals from 0.001 to 1e4 and m x 10^n beyond', () => {
    // Exact text of the rule.
    expect(logTickLabel(0.001)).toBe('0.001');
    expect(logTickLabel(20000)).toBe('20000');
    expect(logTickLabel(1e-6)).toBe('10\u207b\u2076');
    expect(logTickLabel(5e-7)).toBe('5\u00d710\u207b\u2077');
  });

  it('positions values linearly and logarithmically, categories at row centres', () => {
    // Exact arithmetic of the maps: halfway in value (linear) and in log (log).
    expect(positioner({ kind: 'linear', label: '', domain: [0, 10], ticks: [], tickLabels: [] })(5)).toBeCloseTo(0.5, 15);
    expect(positioner({ kind: 'log', label: '', domain: [1, 100], ticks: [], tickLabels: [] })(10)).toBeCloseTo(0.5, 15);
    expect(positioner(categoryAxis('', ['a', 'b', 'c', 'd']))(1)).toBeCloseTo(0.375, 15);
  });
});

describe('svg helpers', () => {
  it('escapes markup and quotes, and rounds coordinates to 0.01 px', () => {
    expect(esc('a<b & "c">')).toBe('a&lt;b &amp; &quot;c&quot;&gt;');
    expect(px(1.23456)).toBe('1.23');
    expect(px(-0.001)).toBe('0');
    expect(() => px(Number.NaN)).toThrow(/plot coordinate is NaN/);
  });
});

function sampleChart(): Chart {
  const x = logAxis('gate area (um^2)', [0.5, 8]);
  return {
    id: 'test',
    title: 'A test chart',
    description: 'two series, two close rules',
    panels: [
      {
        x,
        y: linearAxis('sigma (mV)', [1, 7]),
        layers: [
          { kind: 'line', name: 'curve', legend: 'curve', points: [[0.5, 7], [1, 5], [2, 3.5], [4, 2.5], [8, 1]], stroke: '#000' },
          { kind: 'points', name: 'pts', legend: 'points', points: [{ x: 0.5, y: 7 }, { x: 8, y: 1 }], marker: 'square', fill: '#fff', stroke: '#000' },
          { kind: 'rule', name: 'today', axis: 'x', value: 2, label: 'today 2 um^2', stroke: '#000' },
          { kind: 'rule', name: 'meets', axis: 'x', value: 2.05, label: 'meets target 2.05 um^2', stroke: '#000' },
          { kind: 'rule', name: 'target', axis: 'y', value: 3, label: 'target sigma 3 mV', stroke: '#000' },
        ],
      },
    ],
  };
}

describe('chartSvg', () => {
  it('writes a well-formed SVG with its title, axis labels, legend and every rule labelled', () => {
    const svg = chartSvg(sampleChart());
    expectWellFormedSvg(svg);
    expect(textsOfClass(svg, 'axis-label x')).toEqual(['gate area (um^2)']);
    expect(textsOfClass(svg, 'axis-label y')).toEqual(['sigma (mV)']);
    const texts = svgTexts(svg);
    for (const t of ['A test chart', 'curve', 'points', 'today 2 um^2', 'meets target 2.05 um^2', 'target sigma 3 mV']) expect(texts).toContain(t);
  });

  it('puts the labels of two close x rules on different rows, so they do not overlap', () => {
    const svg = chartSvg(sampleChart());
    const ys = [...svg.matchAll(/<text class="rule-label" x="[\d.]+" y="([\d.]+)"/g)].map((m) => Number(m[1]));
    // Three rule labels: two x rules (stacked rows 15 px apart, exact layout constant) and one y rule.
    const box = plotBox(svg, 'test', 0);
    const above = ys.filter((y) => y < box.y0).sort((a, b) => a - b);
    expect(above).toHaveLength(2);
    expect(above[1]! - above[0]!).toBe(15);
  });

  it('keeps markers at the ends of the data inside the frame (the margin is 4% of the span)', () => {
    const svg = chartSvg(sampleChart());
    const box = plotBox(svg, 'test', 0);
    const pts = markerCentres(layerGroup(svg, 'pts')!);
    expect(pts).toHaveLength(2);
    // A marker of radius 3.5 px clears the frame when its centre is more than 3.5 px inside.
    for (const p of pts) {
      expect(p.x - box.x0).toBeGreaterThan(3.5);
      expect(box.x1 - p.x).toBeGreaterThan(3.5);
      expect(p.y - box.y0).toBeGreaterThan(3.5);
      expect(box.y1 - p.y).toBeGreaterThan(3.5);
    }
  });

  it('gives each chart its own clip ids, so several can share a page', () => {
    const a = chartSvg({ ...sampleChart(), id: 'one' });
    const b = chartSvg({ ...sampleChart(), id: 'two' });
    expect(a).toContain('id="one-clip-0"');
    expect(b).toContain('id="two-clip-0"');
    expect(() => chartSvg({ ...sampleChart(), id: 'not an id' })).toThrow(/chart id must be a word/);
  });
});

/** CIE 1976 L* of an sRGB colour (IEC 61966-2-1 transfer function, D65 luminance weights). */
function lightness(hex: string): number {
  const lin = (c: number): number => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
  const [r, g, b] = [1, 3, 5].map((i) => lin(parseInt(hex.slice(i, i + 2), 16) / 255)) as [number, number, number];
  const y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
  return y > 216 / 24389 ? 116 * Math.cbrt(y) - 16 : (y * 24389) / 27;
}

describe('grey-scale print', () => {
  it('gives the colours the lightness the style documents, within 1 L*', () => {
    const documented: Record<keyof typeof COLOR, number> = { fill: 76, fillEdge: 52, main: 33, fit: 43, second: 70, limit: 10, bandWide: 89, bandNarrow: 82 };
    for (const [k, l] of Object.entries(documented)) expect(Math.abs(lightness(COLOR[k as keyof typeof COLOR]) - l), k).toBeLessThan(1);
  });

  it('keeps the series drawn together apart in grey: data fill against its fit, points against each other', () => {
    // 15 L* is a clearly visible step in print (common practice, no source).
    expect(lightness(COLOR.fill) - lightness(COLOR.fit)).toBeGreaterThan(15);
    expect(lightness(COLOR.second) - lightness(COLOR.main)).toBeGreaterThan(15);
    expect(lightness(COLOR.bandNarrow) - lightness(COLOR.main)).toBeGreaterThan(15);
  });
});

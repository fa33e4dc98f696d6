/**
 * A small chart model and its SVG renderer: one or more panels stacked on a shared width, each
 * with its axes and layers (bars, lines, bands, points, interval bars, labelled rules). The SVG
 * is self-contained (presentation attributes, no scripts, no external fonts or images) so it
 * reads the same as a file and inline in a page.
 */
import { positioner, type Axis, type NumericAxis } from './axis.js';
import { el, esc, px, textWidth } from './svg.js';
import { FONT_FAMILY, FONT_SIZE, FRAME, GRID, INK, LABEL_SIZE, MUTED, TITLE_SIZE } from './style.js';

/** Marker shapes, told apart in grey-scale print. */
export type Marker = 'circle' | 'square' | 'triangle' | 'diamond';

interface LayerBase {
  /** A name for the layer's group (`data-name`), for readers and tests. */
  readonly name: string;
  /** Legend text; layers without one are not in the legend. */
  readonly legend?: string;
}

/** Vertical bars from zero (a histogram): x0..x1 wide, y high. */
export interface BarsLayer extends LayerBase {
  readonly kind: 'bars';
  readonly bars: readonly { readonly x0: number; readonly x1: number; readonly y: number }[];
  readonly fill: string;
  readonly stroke?: string;
}

/** Horizontal bars on a category y axis, from zero to `value`, with an optional end label. */
export interface HBarsLayer extends LayerBase {
  readonly kind: 'hbars';
  readonly bars: readonly { readonly row: number; readonly value: number; readonly label?: string }[];
  readonly fill: string;
  readonly stroke?: string;
}

/** A polyline; a point with a non-finite coordinate (or <= 0 on a log axis) breaks it. */
export interface LineLayer extends LayerBase {
  readonly kind: 'line';
  readonly points: readonly (readonly [number, number])[];
  readonly stroke: string;
  readonly width?: number;
  readonly dash?: string;
}

/** A filled band between lo and hi over x. */
export interface BandLayer extends LayerBase {
  readonly kind: 'band';
  readonly x: readonly number[];
  readonly lo: readonly number[];
  readonly hi: readonly number[];
  readonly fill: string;
}

/** Markers at points. */
export interface PointsLayer extends LayerBase {
  readonly kind: 'points';
  readonly points: readonly { readonly x: number; readonly y: number }[];
  readonly marker: Marker;
  readonly fill: string;
  readonly stroke: string;
  /** Marker radius, px (default 3.5). */
  readonly size?: number;
}

/**
 * Interval bars: along 'y' a vertical bar at x = at from lo to hi; along 'x' a horizontal bar at
 * y = at (a row index on a category axis). An end beyond the axis (or <= 0 on a log axis) runs
 * to the frame and ends in an arrow head: the interval continues past what is drawn.
 */
export interface IntervalsLayer extends LayerBase {
  readonly kind: 'intervals';
  readonly along: 'x' | 'y';
  readonly items: readonly { readonly at: number; readonly lo: number; readonly hi: number }[];
  readonly stroke: string;
}

/** A full-width or full-height line at a value, labelled with its value (a limit or target). */
export interface RuleLayer extends LayerBase {
  readonly kind: 'rule';
  readonly axis: 'x' | 'y';
  readonly value: number;
  readonly label: string;
  readonly stroke: string;
  readonly dash?: string;
  /** Where the label goes: before or after the line (x rules), left or right end (y rules). */
  readonly side?: 'start' | 'end';
}

/** A text note at a data position. */
export interface LabelLayer extends LayerBase {
  readonly kind: 'label';
  readonly x: number;
  readonly y: number;
  readonly text: string;
  readonly anchor?: 'start' | 'middle' | 'end';
  /** Vertical offset, px (negative is up). */
  readonly dy?: number;
}

export type Layer = BarsLayer | HBarsLayer | LineLayer | BandLayer | PointsLayer | IntervalsLayer | RuleLayer | LabelLayer;

/** One plot area with its axes. */
export interface Panel {
  readonly x: NumericAxis;
  readonly y: Axis;
  readonly layers: readonly Layer[];
  /** Plot-area height, px (default 260). */
  readonly height?: number;
  /** Grid lines at the ticks (default: y, plus x on a log x axis). */
  readonly grid?: 'x' | 'y' | 'xy' | 'none';
  /** Draw this panel's legend (default true; a panel repeating the one above leaves it out). */
  readonly legend?: boolean;
}

/** A chart: panels stacked top to bottom. */
export interface Chart {
  /** Unique within a page: prefixes the SVG's ids. */
  readonly id: string;
  readonly title?: string;
  readonly subtitle?: readonly string[];
  /** Width, px (default 640); the SVG scales to its container. */
  readonly width?: number;
  readonly panels: readonly Panel[];
  /** What the chart shows, in words (the SVG's title/desc for screen readers). */
  readonly description: string;
}

const HALO = { 'paint-order': 'stroke', stroke: '#ffffff', 'stroke-width': 3, 'stroke-linejoin': 'round' } as const;
const LEGEND_ROW = 18;
const RIGHT = 18;

function tickLabels(axis: Axis): readonly string[] {
  return axis.kind === 'category' ? axis.categories : axis.tickLabels;
}

/**
 * The y label in lines that fit the panel's height: one line, or two split at the space nearest
 * the middle when one would run past the plot.
 */
function yLabelLines(p: Panel): string[] {
  const label = p.y.label;
  if (label === '' || textWidth(label, LABEL_SIZE) <= (p.height ?? 260) - 8) return label === '' ? [] : [label];
  // Split at a space outside brackets, so a symbol such as "(I1 R1 - I2 R2)/R" stays whole.
  const spaces: number[] = [];
  let depth = 0;
  for (let i = 0; i < label.length; i++) {
    const ch = label[i];
    if (ch === '(') depth++;
    else if (ch === ')') depth--;
    else if (ch === ' ' && depth === 0) spaces.push(i);
  }
  if (spaces.length === 0) return [label];
  const mid = label.length / 2;
  const cut = spaces.reduce((a, b) => (Math.abs(b - mid) < Math.abs(a - mid) ? b : a));
  return [label.slice(0, cut), label.slice(cut + 1)];
}

/** Space left of the plot: y label, tick labels or category names. */
function leftMargin(p: Panel, width: number): number {
  const labels = tickLabels(p.y);
  const widest = Math.max(0, ...labels.map((t) => textWidth(t, FONT_SIZE)));
  const axisLabel = yLabelLines(p).length * (LABEL_SIZE + 3) + 7;
  return Math.min(0.45 * width, 8 + axisLabel + widest + 10);
}

/** One marker centred at (cx, cy). */
function marker(shape: Marker, cx: number, cy: number, r: number, fill: string, stroke: string): string {
  const paint = { fill, stroke, 'stroke-width': 1.2 };
  if (shape === 'circle') return el('circle', { cx, cy, r, ...paint });
  if (shape === 'square') return el('rect', { x: cx - r * 0.9, y: cy - r * 0.9, width: 1.8 * r, height: 1.8 * r, ...paint });
  if (shape === 'triangle') {
    const h = r * 1.15;
    return el('path', { d: `M${px(cx)} ${px(cy - h)}L${px(cx + h)} ${px(cy + 0.8 * h)}L${px(cx - h)} ${px(cy + 0.8 * h)}Z`, ...paint });
  }
  const d = r * 1.25;
  return el('path', { d: `M${px(cx)} ${px(cy - d)}L${px(cx + d)} ${px(cy)}L${px(cx)} ${px(cy + d)}L${px(cx - d)} ${px(cy)}Z`, ...paint });
}

/** The legend swatch of a layer, drawn in a 22 x 12 box at (x, y) (top left). */
function swatch(layer: Layer, x: number, y: number): string {
  const cy = y + 6;
  switch (layer.kind) {
    case 'bars':
    case 'hbars':
    case 'band':
      return el('rect', { x: x + 3, y: y + 1, width: 16, height: 10, fill: layer.fill, stroke: 'stroke' in layer ? layer.stroke : undefined, 'stroke-width': 'stroke' in layer && layer.stroke !== undefined ? 1 : undefined });
    case 'line':
      return el('line', { x1: x, y1: cy, x2: x + 22, y2: cy, stroke: layer.stroke, 'stroke-width': layer.width ?? 2, 'stroke-dasharray': layer.dash });
    case 'rule':
      return el('line', { x1: x, y1: cy, x2: x + 22, y2: cy, stroke: layer.stroke, 'stroke-width': 1.5, 'stroke-dasharray': layer.dash });
    case 'points':
      return marker(layer.marker, x + 11, cy, layer.size ?? 3.5, layer.fill, layer.stroke);
    case 'intervals':
      return el('path', { d: `M${px(x + 5)} ${px(cy)}H${px(x + 17)}M${px(x + 5)} ${px(cy - 4)}V${px(cy + 4)}M${px(x + 17)} ${px(cy - 4)}V${px(cy + 4)}`, stroke: layer.stroke, 'stroke-width': 1.5, fill: 'none' });
    case 'label':
      return '';
  }
}

/** Legend rows of a panel; returns the markup and the height used. */
function legend(layers: readonly Layer[], x0: number, x1: number, y0: number): { svg: string; height: number } {
  const entries = layers.filter((l) => l.legend !== undefined && l.kind !== 'label');
  if (entries.length === 0) return { svg: '', height: 0 };
  let x = x0;
  let y = y0;
  let out = '';
  for (const l of entries) {
    const text = l.legend!;
    const w = 28 + textWidth(text, FONT_SIZE) + 16;
    if (x > x0 && x + w > x1) {
      x = x0;
      y += LEGEND_ROW;
    }
    out += swatch(l, x, y);
    out += el('text', { x: x + 28, y: y + 10, 'font-size': FONT_SIZE, fill: INK }, esc(text));
    x += w;
  }
  return { svg: el('g', { class: 'legend' }, out), height: y - y0 + LEGEND_ROW };
}

/** Height of one row of x-rule labels above a plot, px. */
const RULE_ROW = 15;

/** Where each x rule's label goes: its row above the plot (0 nearest), x and anchor. */
type RuleLabels = Map<Layer, { row: number; x: number; anchor: 'start' | 'end' }>;

/**
 * Places the labels of a panel's x rules above the plot, beside their lines, each on the lowest
 * row where it overlaps no other label: rules close together never print over each other.
 */
function ruleLabels(p: Panel, x0: number, x1: number): { labels: RuleLabels; rows: number } {
  const X0 = positioner(p.x);
  const X = (v: number): number => x0 + X0(v) * (x1 - x0);
  const labels: RuleLabels = new Map();
  const taken: [number, number][][] = [];
  const rules = p.layers.filter((l): l is RuleLayer => l.kind === 'rule' && l.axis === 'x').map((l) => ({ l, x: X(l.value) }));
  rules.sort((a, b) => a.x - b.x);
  for (const { l, x } of rules) {
    if (!Number.isFinite(x) || x < x0 - 0.5 || x > x1 + 0.5) continue;
    const w = textWidth(l.label, FONT_SIZE);
    const side = l.side ?? (x - x0 < 0.6 * (x1 - x0) ? 'end' : 'start');
    // After the line when asked and there is room (or no room before it), else before it.
    const after = side === 'end' ? x + 5 + w <= x1 + RIGHT - 2 : x - 5 - w < x0;
    const lo = after ? x + 5 : x - 5 - w;
    const hi = lo + w;
    let row = 0;
    while ((taken[row] ?? []).some(([a, b]) => lo < b + 8 && hi > a - 8)) row++;
    (taken[row] ??= []).push([lo, hi]);
    labels.set(l, { row, x: after ? x + 5 : x - 5, anchor: after ? 'start' : 'end' });
  }
  return { labels, rows: taken.length };
}

interface Box {
  readonly x0: number;
  readonly x1: number;
  readonly y0: number;
  readonly y1: number;
}

/** Path data of a polyline in pixels, broken at unusable points. */
function polyline(points: readonly (readonly [number, number])[], X: (v: number) => number, Y: (v: number) => number): string {
  let d = '';
  let pen = false;
  for (const [a, b] of points) {
    const x = X(a);
    const y = Y(b);
    if (!Number.isFinite(x) || !Number.isFinite(y)) {
      pen = false;
      continue;
    }
    d += `${pen ? 'L' : 'M'}${px(x)} ${px(y)}`;
    pen = true;
  }
  return d;
}

/** Runs of indices where every given series is usable. */
function runs(n: number, ok: (i: number) => boolean): [number, number][] {
  const out: [number, number][] = [];
  let start = -1;
  for (let i = 0; i <= n; i++) {
    if (i < n && ok(i)) {
      if (start < 0) start = i;
    } else if (start >= 0) {
      out.push([start, i]);
      start = -1;
    }
  }
  return out;
}

function renderLayer(layer: Layer, box: Box, X: (v: number) => number, Y: (v: number) => number, yAxis: Axis, labels: RuleLabels): string {
  const inX = (x: number): boolean => x >= box.x0 - 0.5 && x <= box.x1 + 0.5;
  const inY = (y: number): boolean => y >= box.y0 - 0.5 && y <= box.y1 + 0.5;
  const clampX = (x: number): number => Math.min(box.x1, Math.max(box.x0, x));
  const clampY = (y: number): number => Math.min(box.y1, Math.max(box.y0, y));
  switch (layer.kind) {
    case 'bars': {
      const base = clampY(Y(yAxis.kind === 'linear' ? Math.max(0, yAxis.domain[0]) : 0));
      let out = '';
      for (const b of layer.bars) {
        const xa = X(b.x0);
        const xb = X(b.x1);
        const yt = clampY(Y(b.y));
        if (!Number.isFinite(xa) || !Number.isFinite(xb) || !Number.isFinite(yt) || b.y <= 0) continue;
        out += el('rect', { class: 'bar', x: Math.min(xa, xb), y: yt, width: Math.max(0.5, Math.abs(xb - xa)), height: Math.max(0, base - yt) });
      }
      return out;
    }
    case 'hbars': {
      const rowH = (box.y1 - box.y0) / (yAxis.kind === 'category' ? yAxis.categories.length : 1);
      const x0 = clampX(X(0));
      let out = '';
      for (const b of layer.bars) {
        const yc = Y(b.row);
        const xe = clampX(X(b.value));
        out += el('rect', { class: 'bar', x: Math.min(x0, xe), y: yc - 0.31 * rowH, width: Math.max(0.5, Math.abs(xe - x0)), height: 0.62 * rowH, fill: layer.fill, stroke: layer.stroke, 'stroke-width': layer.stroke === undefined ? undefined : 0.6 });
        if (b.label !== undefined) {
          const w = textWidth(b.label, FONT_SIZE);
          const outside = xe + 6 + w <= box.x1;
          out += el('text', { class: 'bar-label', x: outside ? xe + 6 : xe - 6, y: yc + 4, 'text-anchor': outside ? 'start' : 'end', 'font-size': FONT_SIZE, fill: INK, ...(outside ? {} : HALO) }, esc(b.label));
        }
      }
      return out;
    }
    case 'line': {
      const d = polyline(layer.points, X, Y);
      return d === '' ? '' : el('path', { d, fill: 'none', stroke: layer.stroke, 'stroke-width': layer.width ?? 2, 'stroke-dasharray': layer.dash, 'stroke-linejoin': 'round' });
    }
    case 'band': {
      const n = layer.x.length;
      let d = '';
      for (const [a, b] of runs(n, (i) => Number.isFinite(X(layer.x[i]!)) && Number.isFinite(Y(layer.lo[i]!)) && Number.isFinite(Y(layer.hi[i]!)))) {
        for (let i = a; i < b; i++) d += `${i === a ? 'M' : 'L'}${px(X(layer.x[i]!))} ${px(Y(layer.hi[i]!))}`;
        for (let i = b - 1; i >= a; i--) d += `L${px(X(layer.x[i]!))} ${px(Y(layer.lo[i]!))}`;
        d += 'Z';
      }
      return d === '' ? '' : el('path', { d, fill: layer.fill, stroke: 'none' });
    }
    case 'points': {
      let out = '';
      for (const p of layer.points) {
        const x = X(p.x);
        const y = Y(p.y);
        if (!Number.isFinite(x) || !Number.isFinite(y) || !inX(x) || !inY(y)) continue;
        out += marker(layer.marker, x, y, layer.size ?? 3.5, layer.fill, layer.stroke);
      }
      return out;
    }
    case 'intervals': {
      let d = '';
      const cap = 4;
      for (const it of layer.items) {
        if (layer.along === 'y') {
          const x = X(it.at);
          if (!Number.isFinite(x) || !inX(x)) continue;
          const lo = Y(it.lo);
          const hi = Y(it.hi);
          // Pixel y grows downwards: the low end is the larger pixel value.
          const a = Number.isFinite(lo) && inY(lo) ? lo : box.y1;
          const b = Number.isFinite(hi) && inY(hi) ? hi : box.y0;
          d += `M${px(x)} ${px(a)}V${px(b)}`;
          d += Number.isFinite(lo) && inY(lo) ? `M${px(x - cap)} ${px(a)}H${px(x + cap)}` : `M${px(x - cap)} ${px(a - 6)}L${px(x)} ${px(a)}L${px(x + cap)} ${px(a - 6)}`;
          d += Number.isFinite(hi) && inY(hi) ? `M${px(x - cap)} ${px(b)}H${px(x + cap)}` : `M${px(x - cap)} ${px(b + 6)}L${px(x)} ${px(b)}L${px(x + cap)} ${px(b + 6)}`;
        } else {
          const y = Y(it.at);
          if (!Number.isFinite(y) || !inY(y)) continue;
          const lo = X(it.lo);
          const hi = X(it.hi);
          const a = Number.isFinite(lo) && inX(lo) ? lo : box.x0;
          const b = Number.isFinite(hi) && inX(hi) ? hi : box.x1;
          d += `M${px(a)} ${px(y)}H${px(b)}`;
          d += Number.isFinite(lo) && inX(lo) ? `M${px(a)} ${px(y - cap)}V${px(y + cap)}` : `M${px(a + 6)} ${px(y - cap)}L${px(a)} ${px(y)}L${px(a + 6)} ${px(y + cap)}`;
          d += Number.isFinite(hi) && inX(hi) ? `M${px(b)} ${px(y - cap)}V${px(y + cap)}` : `M${px(b - 6)} ${px(y - cap)}L${px(b)} ${px(y)}L${px(b - 6)} ${px(y + cap)}`;
        }
      }
      return d === '' ? '' : el('path', { d, fill: 'none', stroke: layer.stroke, 'stroke-width': 1.5 });
    }
    case 'rule': {
      if (layer.axis === 'x') {
        const x = X(layer.value);
        if (!Number.isFinite(x) || !inX(x)) return '';
        // The label sits above the plot (see ruleLabels); the line reaches up to it.
        const placed = labels.get(layer);
        const top = placed === undefined ? box.y0 : box.y0 - RULE_ROW * placed.row - 4;
        const line = el('line', { x1: x, y1: top, x2: x, y2: box.y1, stroke: layer.stroke, 'stroke-width': 1.5, 'stroke-dasharray': layer.dash });
        if (placed === undefined) return line;
        const label = el('text', { class: 'rule-label', x: placed.x, y: box.y0 - 6 - RULE_ROW * placed.row, 'text-anchor': placed.anchor, 'font-size': FONT_SIZE, fill: INK, ...HALO }, esc(layer.label));
        return line + label;
      }
      const y = Y(layer.value);
      if (!Number.isFinite(y) || !inY(y)) return '';
      const line = el('line', { x1: box.x0, y1: y, x2: box.x1, y2: y, stroke: layer.stroke, 'stroke-width': 1.5, 'stroke-dasharray': layer.dash });
      const atStart = layer.side === 'start';
      const below = y - box.y0 < 18;
      const label = el('text', { class: 'rule-label', x: atStart ? box.x0 + 6 : box.x1 - 6, y: below ? y + 15 : y - 5, 'text-anchor': atStart ? 'start' : 'end', 'font-size': FONT_SIZE, fill: INK, ...HALO }, esc(layer.label));
      return line + label;
    }
    case 'label': {
      let x = X(layer.x);
      const y = Y(layer.y);
      if (!Number.isFinite(x) || !Number.isFinite(y)) return '';
      // Kept inside the plot: a label near the frame is moved in, not cut off.
      const w = textWidth(layer.text, FONT_SIZE);
      const anchor = layer.anchor ?? 'start';
      const left = anchor === 'start' ? x : anchor === 'end' ? x - w : x - w / 2;
      const shift = Math.max(box.x0 + 2 - left, Math.min(0, box.x1 - 2 - (left + w)));
      x += shift;
      return el('text', { class: 'data-label', x, y: y + (layer.dy ?? 0), 'text-anchor': anchor, 'font-size': FONT_SIZE, fill: INK, ...HALO }, esc(layer.text));
    }
  }
}

/** Paint of a layer's group (shared by its shapes). */
function groupPaint(layer: Layer): Record<string, string | number | undefined> {
  if (layer.kind === 'bars') return { fill: layer.fill, stroke: layer.stroke, 'stroke-width': layer.stroke === undefined ? undefined : 0.6 };
  return {};
}

function renderPanel(chart: Chart, p: Panel, index: number, box: Box, labels: RuleLabels): string {
  const X0 = positioner(p.x);
  const Y0 = positioner(p.y);
  const X = (v: number): number => box.x0 + X0(v) * (box.x1 - box.x0);
  // Numeric y grows upwards; category rows go top to bottom.
  const Y = p.y.kind === 'category' ? (v: number): number => box.y0 + Y0(v) * (box.y1 - box.y0) : (v: number): number => box.y1 - Y0(v) * (box.y1 - box.y0);
  const grid = p.grid ?? (p.x.kind === 'log' ? 'xy' : 'y');
  let out = '';
  // Grid.
  let g = '';
  if ((grid === 'y' || grid === 'xy') && p.y.kind !== 'category') for (const t of p.y.ticks) g += `M${px(box.x0)} ${px(Y(t))}H${px(box.x1)}`;
  if (grid === 'x' || grid === 'xy') for (const t of p.x.ticks) g += `M${px(X(t))} ${px(box.y0)}V${px(box.y1)}`;
  if (g !== '') out += el('path', { class: 'grid', d: g, stroke: GRID, 'stroke-width': 1, fill: 'none' });
  // Layers, clipped to the plot area (markers, rules and labels are placed inside it).
  const clip = `${chart.id}-clip-${index}`;
  let clipped = '';
  let free = '';
  for (const l of p.layers) {
    const body = renderLayer(l, box, X, Y, p.y, labels);
    if (body === '') continue;
    const group = el('g', { class: `layer ${l.kind}`, 'data-name': l.name, ...groupPaint(l) }, body);
    if (l.kind === 'bars' || l.kind === 'line' || l.kind === 'band' || l.kind === 'hbars') clipped += group;
    else free += group;
  }
  out += el('g', { 'clip-path': `url(#${clip})` }, clipped) + free;
  // Axes: left and bottom lines with outward ticks.
  let axes = `M${px(box.x0)} ${px(box.y0)}V${px(box.y1)}H${px(box.x1)}`;
  for (const t of p.x.ticks) axes += `M${px(X(t))} ${px(box.y1)}v5`;
  if (p.y.kind !== 'category') for (const t of p.y.ticks) axes += `M${px(box.x0)} ${px(Y(t))}h-5`;
  out += el('path', { class: 'axis', d: axes, stroke: FRAME, 'stroke-width': 1, fill: 'none' });
  // Tick ticks.
  let ticks = '';
  p.x.ticks.forEach((t, i) => {
    const x = X(t);
    const text = p.x.tickLabels[i]!;
    const w = textWidth(text, FONT_SIZE);
    const anchor = x - w / 2 < 2 ? 'start' : x + w / 2 > box.x1 + RIGHT - 2 ? 'end' : 'middle';
    ticks += el('text', { x, y: box.y1 + 19, 'text-anchor': anchor }, esc(text));
  });
  if (p.y.kind === 'category') p.y.categories.forEach((c, i) => (ticks += el('text', { x: box.x0 - 8, y: Y(i) + 4, 'text-anchor': 'end' }, esc(c))));
  else {
    const yl = p.y.tickLabels;
    p.y.ticks.forEach((t, i) => (ticks += el('text', { x: box.x0 - 8, y: Y(t) + 4, 'text-anchor': 'end' }, esc(yl[i]!))));
  }
  out += el('g', { class: 'tick', 'font-size': FONT_SIZE, fill: INK }, ticks);
  // Axis labels.
  out += el('text', { class: 'axis-label x', x: (box.x0 + box.x1) / 2, y: box.y1 + 38, 'text-anchor': 'middle', 'font-size': LABEL_SIZE, fill: INK }, esc(p.x.label));
  const lines = yLabelLines(p);
  if (lines.length > 0) {
    const cy = (box.y0 + box.y1) / 2;
    const body = lines.length === 1 ? esc(lines[0]!) : lines.map((l, i) => el('tspan', { x: 0, dy: i === 0 ? 0 : LABEL_SIZE + 3 }, esc(i === 0 ? `${l} ` : l))).join('');
    out += el('text', { class: 'axis-label y', x: 0, y: 0, transform: `translate(${px(8 + LABEL_SIZE - 2)} ${px(cy)}) rotate(-90)`, 'text-anchor': 'middle', 'font-size': LABEL_SIZE, fill: INK }, body);
  }
  return el('g', { class: 'panel' }, out);
}

/**
 * The chart as a standalone SVG document fragment (`<svg ...>...</svg>`).
 * @throws RangeError when a coordinate would not be finite (an internal fault)
 */
export function chartSvg(chart: Chart): string {
  if (!/^[A-Za-z][\w-]*$/.test(chart.id)) throw new RangeError(`chart id must be a word, got "${chart.id}"`);
  if (chart.panels.length === 0) throw new RangeError(`chart "${chart.id}" has no panel`);
  const width = chart.width ?? 640;
  const left = Math.max(...chart.panels.map((p) => leftMargin(p, width)));
  const x1 = width - RIGHT;
  let y = 6;
  let head = '';
  if (chart.title !== undefined) {
    y += TITLE_SIZE + 2;
    head += el('text', { class: 'chart-title', x: 8, y, 'font-size': TITLE_SIZE, 'font-weight': 600, fill: INK }, esc(chart.title));
    y += 6;
  }
  for (const s of chart.subtitle ?? []) {
    y += FONT_SIZE + 3;
    head += el('text', { class: 'chart-subtitle', x: 8, y, 'font-size': FONT_SIZE, fill: MUTED }, esc(s));
  }
  if (head !== '') y += 8;
  let body = '';
  let clips = '';
  chart.panels.forEach((p, i) => {
    const lg = p.legend === false ? { svg: '', height: 0 } : legend(p.layers, left, x1, y + 2);
    body += lg.svg;
    y += lg.height + 10;
    const rl = ruleLabels(p, left, x1);
    y += rl.rows * RULE_ROW;
    const h = p.height ?? 260;
    const box: Box = { x0: left, x1, y0: y, y1: y + h };
    clips += el('clipPath', { id: `${chart.id}-clip-${i}` }, el('rect', { x: box.x0, y: box.y0, width: box.x1 - box.x0, height: h }));
    body += renderPanel(chart, p, i, box, rl.labels);
    y += h + 50;
  });
  const height = Math.ceil(y - 4);
  const title = chart.title ?? chart.description;
  return el(
    'svg',
    {
      xmlns: 'http://www.w3.org/2000/svg',
      class: 'twinfet-chart',
      id: chart.id,
      viewBox: `0 0 ${width} ${height}`,
      width,
      height,
      role: 'img',
      'aria-labelledby': `${chart.id}-title ${chart.id}-desc`,
      'font-family': FONT_FAMILY,
      'font-size': FONT_SIZE,
    },
    el('title', { id: `${chart.id}-title` }, esc(title)) +
      el('desc', { id: `${chart.id}-desc` }, esc(chart.description)) +
      el('defs', {}, clips) +
      el('rect', { class: 'background', x: 0, y: 0, width, height, fill: '#ffffff' }) +
      head +
      body,
  );
}

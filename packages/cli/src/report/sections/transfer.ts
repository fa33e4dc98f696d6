/** Section 7: the stage's transfer curve under mismatch. */
import { chartSvg, type Layer, type Panel } from '../../chart/chart.js';
import { linearAxis } from '../../chart/axis.js';
import { COLOR, DASH, OUTLINE } from '../../chart/style.js';
import { shown, type PlotFigure } from '../../plot.js';
import type { TransferStudy, TransferView } from '../analyses/transfer.js';
import type { ReportData } from '../data.js';
import { esc, figure, num, pairs, type Section } from '../html.js';
import { figureUnit, percent, q } from '../units.js';
import { displayQuantity } from '../../displayQuantity.js';

/** Bins of the slope-spread histogram. */
const SLOPE_BINS = 24;

function panel(t: TransferStudy, v: TransferView, xq: PlotFigure, yq: PlotFigure, spec: number | null, height: number): Panel {
  const xs = v.x.map((x) => x * xq.scale);
  const band = (p: number): number[] => v.bands.find((b) => b.p === p)!.values.map((y) => (y === null ? Number.NaN : y * yq.scale));
  const lo = band(0.01);
  const hi = band(0.99);
  const median = band(0.5);
  const nominal = v.nominal.map((y) => (y === null ? Number.NaN : y * yq.scale));
  const layers: Layer[] = [
    { kind: 'band', name: 'band-1-99', legend: `1% to 99% of ${t.instances} instances`, x: xs, lo, hi, fill: COLOR.bandNarrow },
    { kind: 'line', name: 'median', legend: 'median instance (50%)', points: xs.map((x, i) => [x, median[i]!] as const), stroke: COLOR.main, width: 1.5, dash: '6 3' },
    { kind: 'line', name: 'nominal', legend: 'nominal (no mismatch)', points: xs.map((x, i) => [x, nominal[i]!] as const), stroke: '#111111', width: 1.8 },
  ];
  if (v.law !== null && !('none' in t.law)) {
    const law = v.law.map((y) => y * yq.scale);
    layers.push({ kind: 'line', name: 'law', legend: t.law.name, points: xs.map((x, i) => [x, law[i]!] as const), stroke: COLOR.fit, width: 2, dash: DASH.law });
  }
  const ys = [...lo, ...hi, ...nominal, ...(v.law ?? []).map((y) => y * yq.scale)];
  if (spec !== null) {
    for (const s of [-spec, spec]) {
      const x = s * xq.scale;
      if (x > xs[0]! && x < xs[xs.length - 1]!) layers.push({ kind: 'rule', name: s < 0 ? 'spec-low' : 'spec-high', axis: 'x', value: x, label: `${s < 0 ? '\u2212spec' : '+spec'} ${shown(x, xq.unit)}`, stroke: COLOR.limit, dash: DASH.spec, side: s < 0 ? 'start' : 'end' });
    }
  }
  return { x: linearAxis(`${xq.label} ${xq.symbol} (${xq.unit})`, xs, { pad: 0 }), y: linearAxis(`${yq.label} ${yq.symbol} (${yq.unit})`, ys, { pad: 0.06 }), layers, height, grid: 'xy' };
}

export function transferSection(d: ReportData): Section {
  const t = d.transfer;
  if ('none' in t) {
    return { id: 'transfer', title: 'The transfer curve under mismatch', html: `<p class="note">No transfer curve: ${esc(t.none)}.</p>` };
  }
  const xq = displayQuantity(t.input, Math.max(...t.full.x.map(Math.abs)));
  const xz = displayQuantity(t.input, Math.max(...t.zoom.x.map(Math.abs)));
  const yq = displayQuantity(t.output, Math.max(...t.full.nominal.map((y) => Math.abs(y ?? 0))));
  // The spec lines mark the input: they are drawn when the figure is measured in the input's unit (it is the balance input).
  const spec = figureUnit(d.stage.figure) === t.input.unit ? d.run.yield.spec : null;
  const svg = chartSvg({
    id: 'fig-transfer',
    description: `${t.output.name} against ${t.input.name} for ${t.instances} sampled instances: nominal curve, median and the 1%-99% band, over the whole range and close up.`,
    panels: [panel(t, t.full, xq, yq, null, 240), { ...panel(t, t.zoom, xz, yq, spec, 220), legend: false }],
  });
  const finite = t.balances.filter((x): x is number => x !== null).sort((a, b) => a - b);
  const at = (p: number): number => finite[Math.min(finite.length - 1, Math.max(0, Math.round(p * (finite.length - 1))))]!;
  const lawText =
    'none' in t.law
      ? t.law.none
      : (() => {
          const nominal = t.full.nominal.map((y) => y ?? Number.NaN);
          const ref = Math.max(...nominal.filter((y) => y === y).map(Math.abs));
          const dev = Math.max(...nominal.map((y, i) => (y === y ? Math.abs(y - t.full.law![i]!) : 0))) / ref;
          return `The ${t.law.name} ${t.law.formula} (${t.law.source}, dotted) stays within ${percent(dev, 2)} of full scale of the nominal curve.`;
        })();
  const title = `${t.output.name.charAt(0).toUpperCase()}${t.output.name.slice(1)} (${t.output.symbol}) against ${t.input.name} (${t.input.symbol}), ${t.slope === null ? 'over the range and close to the nominal input' : 'whole transition and close to balance'}`;
  const instancesText = `${t.instances}: the first samples of the run (seed ${esc(t.seed)}), the same draws as the first rows of <code>run --samples-out</code>`;
  if (t.slope === null) {
    const readingFlat = `The 1% to 99% band of ${t.instances} instances (the run's first samples) against the nominal curve shows how the spread moves with ${esc(t.input.name)}; the spec applies at the nominal input. ${esc(lawText)}`;
    return {
      id: 'transfer',
      title: 'The transfer curve under mismatch',
      html: `${figure('fig-transfer', 'Figure 7.1', title, readingFlat, svg)}${pairs([['instances', instancesText]])}`,
    };
  }
  const reading = `Each instance crosses zero at its own ${esc(d.stage.figure.label)} (these ${t.instances} instances are the run's first samples): near balance the 1% to 99% band spans ${esc(q(at(0.01), t.input.unit))} to ${esc(q(at(0.99), t.input.unit))} of ${esc(t.input.name)}, while far from it every instance saturates. ${esc(lawText)}`;

  // The spread of the slope at balance, relative to the nominal slope.
  const sl = t.slope;
  const rel = sl.values.map((g) => 100 * (g / sl.nominal - 1));
  const rlo = Math.min(...rel);
  const rhi = Math.max(...rel);
  const width = (rhi - rlo) / SLOPE_BINS || 1;
  const counts = new Array<number>(SLOPE_BINS).fill(0);
  for (const r of rel) counts[Math.min(SLOPE_BINS - 1, Math.floor((r - rlo) / width))]!++;
  const qv = (p: number): number => sl.quantiles.find((x) => x.p === p)!.value;
  const qRel = (p: number): number => 100 * (qv(p) / sl.nominal - 1);
  const spread = chartSvg({
    id: 'fig-slope',
    description: `Histogram of the ${sl.quantity.name} of ${sl.values.length} instances relative to the nominal stage's.`,
    panels: [
      {
        x: linearAxis(`${sl.quantity.symbol} at balance relative to nominal (%)`, [rlo, rhi, 0]),
        y: linearAxis('instances per bin', [0, Math.max(...counts) * 1.05], { zero: true, pad: 0.02 }),
        layers: [
          { kind: 'bars', name: 'slope-histogram', legend: `${sl.values.length} instances`, bars: counts.map((c, i) => ({ x0: rlo + i * width, x1: rlo + (i + 1) * width, y: c })), fill: COLOR.fill, stroke: COLOR.fillEdge },
          { kind: 'rule', name: 'slope-nominal', axis: 'x', value: 0, label: `nominal ${shown(sl.nominal * displayQuantity(sl.quantity, sl.nominal).scale, displayQuantity(sl.quantity, sl.nominal).unit)}`, stroke: '#111111', side: 'end' },
          { kind: 'rule', name: 'slope-p01', axis: 'x', value: qRel(0.01), label: `1% ${shown(qRel(0.01), '%')}`, stroke: OUTLINE, dash: DASH.law, side: 'start' },
          { kind: 'rule', name: 'slope-p99', axis: 'x', value: qRel(0.99), label: `99% ${shown(qRel(0.99), '%')}`, stroke: OUTLINE, dash: DASH.law, side: 'end' },
        ],
        height: 200,
      },
    ],
  });
  const gu = sl.quantity.unit;
  const readingSlope = `${esc(sl.quantity.name.charAt(0).toUpperCase() + sl.quantity.name.slice(1))}: nominal ${esc(q(sl.nominal, gu))}; over the instances mean ${esc(q(sl.mean, gu))} and sigma ${esc(q(sl.sigma, gu))} (${esc(percent(sl.sigma / sl.nominal, 2))} of nominal), 1% to 99% from ${esc(q(qv(0.01), gu))} to ${esc(q(qv(0.99), gu))}.`;
  const numbers = pairs([
    ['instances', instancesText],
    [`${esc(sl.quantity.symbol)} nominal`, num(sl.nominal, q(sl.nominal, gu), { key: 'transfer.slope.nominal', unit: gu })],
    [`${esc(sl.quantity.symbol)} mean / sigma`, `${num(sl.mean, q(sl.mean, gu), { key: 'transfer.slope.mean', unit: gu })} / ${num(sl.sigma, q(sl.sigma, gu), { key: 'transfer.slope.sigma', unit: gu })}`],
    ...(t.full.unsolved + t.zoom.unsolved > 0 ? ([['unsolved', `${t.full.unsolved + t.zoom.unsolved} grid points where some instance had no solution (left out of the bands there)`]] as [string, string][]) : []),
  ]);
  return {
    id: 'transfer',
    title: 'The transfer curve under mismatch',
    html: `${figure('fig-transfer', 'Figure 7.1', title, reading, svg)}${figure('fig-slope', 'Figure 7.2', `Spread of the ${sl.quantity.name}`, readingSlope, spread)}${numbers}`,
  };
}

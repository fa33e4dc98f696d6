/**
 * Section 8: the figure under each operating condition, and its drift between conditions.
 * Rendered only when the design has conditions (ReportData.conditions); the data shape is
 * ConditionsData in ../data.ts.
 */
import { chartSvg } from '../../chart/chart.js';
import { categoryAxis, linearAxis } from '../../chart/axis.js';
import { COLOR, OUTLINE } from '../../chart/style.js';
import { histogramChart } from '../../plot.js';
import type { ConditionsData, ReportData } from '../data.js';
import { esc, figure, num, table, type Section } from '../html.js';
import { yieldDigits, yieldText } from '../../commands/inspect.js';
import { figureQuantity, figureUnit, plain, q } from '../units.js';
import { displayQuantity } from '../../displayQuantity.js';

/** A setting as the table shows it: kelvin with Celsius beside it, other units prefixed. */
function settingText(s: { field: string; value: number; unit: string }): string {
  return s.unit === 'K' ? `${s.field} ${plain(s.value, 5)} K (${plain(s.value - 273.15, 4)} \u00b0C)` : `${s.field} ${q(s.value, s.unit)}`;
}

export function conditionsSection(d: ReportData, c: ConditionsData): Section {
  const f = d.stage.figure;
  const u = figureUnit(f);
  const fq = displayQuantity(figureQuantity(f), Math.max(...c.rows.map((r) => r.sigma)));
  const s = fq.scale;
  const digits = yieldDigits(Math.min(...c.rows.map((r) => r.yieldInterval[0])));
  const tbl = table(
    ['condition', 'settings', 'samples', 'mean', '\u03c3', 'interval', 'yield', 'interval', 'chip yield'],
    c.rows.map((r, i) => [
      esc(r.name),
      esc(r.settings.map(settingText).join(', ')),
      String(r.samples),
      num(r.mean, q(r.mean, u), { key: `conditions.rows.${i}.mean`, unit: u }),
      num(r.sigma, q(r.sigma, u), { key: `conditions.rows.${i}.sigma`, unit: u }),
      `[${esc(q(r.sigmaInterval[0], u))}, ${esc(q(r.sigmaInterval[1], u))}]`,
      num(r.yield, yieldText(r.yield, digits), { key: `conditions.rows.${i}.yield` }),
      `[${esc(yieldText(r.yieldInterval[0], digits))}, ${esc(yieldText(r.yieldInterval[1], digits))}]`,
      esc(yieldText(r.chipYield, digits)),
    ]),
    { numeric: [2, 3, 4, 5, 6, 7, 8], caption: 'Per condition (the same mismatch draws under every condition)' },
  );
  const names = c.rows.map((r) => r.name);
  const sigmas = c.rows.flatMap((r) => [r.sigma * s, r.sigmaInterval[0] * s, r.sigmaInterval[1] * s]);
  const svg = chartSvg({
    id: 'fig-conditions',
    description: `Sigma of the ${f.label} under each operating condition with its confidence interval.`,
    panels: [
      {
        x: linearAxis(`sigma of the ${fq.label} ${fq.symbol} (${fq.unit})`, sigmas, { pad: 0.1 }),
        y: categoryAxis('condition', names),
        layers: [
          { kind: 'intervals', name: 'sigma-interval', legend: 'interval', along: 'x', items: c.rows.map((r, i) => ({ at: i, lo: r.sigmaInterval[0] * s, hi: r.sigmaInterval[1] * s })), stroke: COLOR.main },
          { kind: 'points', name: 'sigma', legend: 'Monte Carlo sigma', points: c.rows.map((r, i) => ({ x: r.sigma * s, y: i })), marker: 'circle', fill: COLOR.main, stroke: OUTLINE, size: 4.5 },
        ],
        height: 34 * names.length + 20,
        grid: 'x',
      },
    ],
  });
  const worst = [...c.rows].sort((a, b) => b.sigma - a.sigma)[0]!;
  const best = [...c.rows].sort((a, b) => a.sigma - b.sigma)[0]!;
  let html = tbl + figure('fig-conditions', 'Figure 8.1', 'Sigma by operating condition', `Sigma ranges from ${esc(q(best.sigma, u))} (${esc(best.name)}) to ${esc(q(worst.sigma, u))} (${esc(worst.name)}).`, svg);
  const dr = c.drift;
  if (dr !== undefined) {
    const dq = displayQuantity({ name: `drift of the ${f.label}`, symbol: `\u0394${f.symbol}`, unit: u }, dr.sigma);
    const edges = Array.from({ length: dr.histogram.counts.length + 1 }, (_, i) => dr.histogram.lo + i * dr.histogram.binWidth);
    const chart = histogramChart({ id: 'fig-drift', binEdges: edges, counts: dr.histogram.counts, samples: dr.samples, mean: dr.mean, sigma: dr.sigma, figure: dq, subtitle: `${dr.from} \u2192 ${dr.to}` });
    html += figure(
      'fig-drift',
      'Figure 8.2',
      `Drift of the ${f.label} from ${dr.from} to ${dr.to}`,
      `Per instance, the ${esc(f.label)} moves by ${num(dr.mean, q(dr.mean, u), { key: 'conditions.drift.mean', unit: u })} on average with a sigma of ${num(dr.sigma, q(dr.sigma, u), { key: 'conditions.drift.sigma', unit: u })} between ${esc(dr.from)} and ${esc(dr.to)}.`,
      chartSvg(chart),
    );
  }
  return { id: 'conditions', title: 'Operating conditions', html };
}

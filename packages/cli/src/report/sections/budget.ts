/** Section 4: where the spread comes from, by device and mismatch parameter. */
import { chartSvg } from '../../chart/chart.js';
import { categoryAxis, linearAxis } from '../../chart/axis.js';
import { COLOR } from '../../chart/style.js';
import type { ReportData } from '../data.js';
import { esc, figure, num, table, type Section } from '../html.js';
import { figureUnit, percent, q } from '../units.js';

/** A mismatch parameter in words. */
export function parameterText(parameter: string): string {
  return parameter === 'vt' ? 'dV_T' : parameter === 'beta' ? 'd\u03b2/\u03b2' : parameter === 'r' ? 'dR/R' : parameter;
}

/** A block's label ("input pair", "mirror load", "load resistors") from its key. */
export function blockLabel(d: ReportData, role: string): string {
  return d.stage.blocks.find((b) => b.key === role)?.label ?? role;
}

export function budgetSection(d: ReportData): Section {
  const a = d.run.analytic;
  const u = figureUnit(d.stage.figure);
  const rows = a.budget.map((e) => `${e.device} ${parameterText(e.parameter)}`);
  const shares = a.budget.map((e) => 100 * e.share);
  const svg = chartSvg({
    id: 'fig-budget',
    description: `Share of the linearised variance of the ${d.stage.figure.label} from each element's mismatch parameters.`,
    panels: [
      {
        x: linearAxis('share of the variance sigma\u00b2 (%)', [0, ...shares], { zero: true, include: [Math.max(...shares) * 1.45] }),
        y: categoryAxis('device and parameter', rows),
        layers: [
          {
            kind: 'hbars',
            name: 'budget',
            bars: a.budget.map((e, i) => ({ row: i, value: 100 * e.share, label: `${percent(e.share, 3)} (${q(Math.sqrt(e.variance), u)})` })),
            fill: COLOR.fill,
            stroke: COLOR.fillEdge,
          },
        ],
        height: 26 * rows.length + 10,
        grid: 'x',
      },
    ],
  });
  const sorted = [...a.grouped].sort((x, y) => y.share - x.share);
  const top = sorted[0]!;
  const next = sorted[1];
  const reading = `The ${esc(blockLabel(d, top.role))}'s ${esc(parameterText(top.parameter))} gives ${esc(percent(top.share, 3))} of the variance${next === undefined ? '' : `, the ${esc(blockLabel(d, next.role))}'s ${esc(parameterText(next.parameter))} ${esc(percent(next.share, 3))}`}; in brackets each term's own sigma (the terms add in quadrature to the linearised ${esc(q(a.sigma, u))}).`;
  const grouped = table(
    ['contribution', 'share of \u03c3\u00b2', '\u03c3 part'],
    a.grouped.map((g, i) => [`${esc(blockLabel(d, g.role))} ${esc(parameterText(g.parameter))}`, num(g.share, percent(g.share, 3), { path: `analytic.grouped.${i}.share`, unit: '%' }), q(Math.sqrt(g.variance), u)]),
    { numeric: [1, 2], caption: 'The budget per block and parameter (first-order: Pelgrom 1989; Kinget, IEEE JSSC 40(6), 2005)' },
  );
  const perDevice = table(
    ['device', 'parameter', 'share of \u03c3\u00b2'],
    a.budget.map((e, i) => [esc(e.device), esc(parameterText(e.parameter)), num(e.share, percent(e.share, 4), { path: `analytic.budget.${i}.share`, unit: '%' })]),
    { numeric: [2], className: 'compact' },
  );
  return {
    id: 'budget',
    title: 'Where it comes from',
    html: `${figure('fig-budget', 'Figure 4.1', 'Variance budget by device and parameter', reading, svg)}${grouped}${perDevice}`,
  };
}

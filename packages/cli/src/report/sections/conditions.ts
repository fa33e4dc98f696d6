/**
 * Section 8: the figure under each operating condition (the same mismatch draws at every one),
 * the all-conditions yield, and the drift between two conditions. Rendered only when the design
 * has conditions; every number is the run's (`run.conditions`, `run.yield`, `run.drift`) and is
 * tagged with its path in `twinfet run --json`.
 */
import { chartSvg } from '../../chart/chart.js';
import { categoryAxis, linearAxis } from '../../chart/axis.js';
import { COLOR, OUTLINE } from '../../chart/style.js';
import { histogramChart } from '../../plot.js';
import type { ConditionsData, ReportData } from '../data.js';
import { esc, figure, num, pairs, table, type Section } from '../html.js';
import { yieldDigits, yieldText } from '../../commands/inspect.js';
import { figureQuantity, figureUnit, plain, q } from '../units.js';
import { displayQuantity } from '../../displayQuantity.js';

/** A setting as the table shows it: kelvin with Celsius beside it, a shift in %, other units prefixed. */
function settingText(s: { field: string; value: number; unit: string }): string {
  if (s.unit === 'K') return `${s.field} ${plain(s.value, 5)} K (${plain(s.value - 273.15, 4)} \u00b0C)`;
  if (s.unit === '%') return `${s.field} ${s.value >= 0 ? '+' : ''}${q(s.value, '%', 3)}`;
  return `${s.field} ${s.unit === '' ? plain(s.value, 4) : q(s.value, s.unit)}`;
}

/** A yield with the decimals that show its failure part; exactly 1 as 1. */
function yieldNum(path: string, y: number, digits: number): string {
  return num(y, y === 1 ? '1' : yieldText(y, digits), { path });
}

export function conditionsSection(d: ReportData, c: ConditionsData): Section {
  const r = d.run;
  const rows = r.conditions ?? [];
  const f = d.stage.figure;
  const u = figureUnit(f);
  const conf = `${plain(r.yield.confidence * 100, 3)}%`;
  const digits = yieldDigits(Math.min(r.yield.interval[0], ...rows.map((x) => x.yield.interval[0])));
  const P = (i: number, rest: string): string => `conditions.${i}.${rest}`;
  const tbl = table(
    ['condition', 'settings', 'samples', 'mean', '\u03c3', `${conf} interval`, 'yield', `${conf} interval`, `chip yield (${r.chip.instances})`],
    rows.map((x, i) => {
      const o = x.offset;
      const row = c.rows[i]!;
      return [
        esc(x.name),
        esc(row.settings.map(settingText).join(', ')),
        num(x.evaluated, String(x.evaluated), { path: P(i, 'evaluated') }),
        num(o.mean, q(o.mean, u), { path: P(i, 'offset.mean'), unit: u }),
        num(o.sigma, q(o.sigma, u), { path: P(i, 'offset.sigma'), unit: u }),
        `[${num(o.sigmaInterval[0], q(o.sigmaInterval[0], u), { path: P(i, 'offset.sigmaInterval.0'), unit: u })}, ${num(o.sigmaInterval[1], q(o.sigmaInterval[1], u), { path: P(i, 'offset.sigmaInterval.1'), unit: u })}]`,
        yieldNum(P(i, 'yield.estimate'), x.yield.estimate, digits),
        `[${yieldNum(P(i, 'yield.interval.0'), x.yield.interval[0], digits)}, ${yieldNum(P(i, 'yield.interval.1'), x.yield.interval[1], digits)}]`,
        esc(yieldText(row.chipYield, yieldDigits(row.chipYieldInterval[0]))),
      ];
    }),
    { numeric: [2, 3, 4, 5, 6, 7, 8], caption: `Per condition (the same mismatch draws under every condition; \u03c3 interval by ${rows[0]?.offset.sigmaIntervalMethod === 'bonett' ? 'Bonett' : 'chi-square'}, yield interval by ${esc(r.yield.method)})` },
  );
  const y = r.yield;
  const all = pairs([
    [
      'failures, all conditions',
      `${num(y.failures, String(y.failures), { path: 'yield.failures' })} of ${num(y.evaluated ?? r.evaluated, String(y.evaluated ?? r.evaluated), { path: 'yield.evaluated' })} instances fail at one condition at least`,
    ],
    [
      'instance yield, all conditions',
      `${yieldNum('yield.estimate', y.estimate, digits)}   ${conf} [${yieldNum('yield.interval.0', y.interval[0], digits)}, ${yieldNum('yield.interval.1', y.interval[1], digits)}] (${esc(y.method)}; an instance passes only if it passes at every condition)`,
    ],
    ['worst condition', `${esc(y.worst ?? '-')} (the lowest yield of its own)`],
    [`chip yield (${r.chip.instances}), all conditions`, `${yieldNum('chip.estimate', r.chip.estimate, yieldDigits(r.chip.interval[0]))}   ${conf} [${yieldNum('chip.interval.0', r.chip.interval[0], yieldDigits(r.chip.interval[0]))}, ${yieldNum('chip.interval.1', r.chip.interval[1], yieldDigits(r.chip.interval[0]))}]`],
  ]);

  const fq = displayQuantity(figureQuantity(f), Math.max(...rows.map((x) => x.offset.sigma)));
  const s = fq.scale;
  const names = rows.map((x) => x.name);
  const sigmas = rows.flatMap((x) => [x.offset.sigma * s, x.offset.sigmaInterval[0] * s, x.offset.sigmaInterval[1] * s]);
  const svg = chartSvg({
    id: 'fig-conditions',
    description: `Sigma of the ${f.label} under each operating condition with its confidence interval.`,
    panels: [
      {
        x: linearAxis(`sigma of the ${fq.label} ${fq.symbol} (${fq.unit})`, sigmas, { pad: 0.1 }),
        y: categoryAxis('condition', names),
        layers: [
          { kind: 'intervals', name: 'sigma-interval', legend: `${conf} interval`, along: 'x', items: rows.map((x, i) => ({ at: i, lo: x.offset.sigmaInterval[0] * s, hi: x.offset.sigmaInterval[1] * s })), stroke: COLOR.main },
          { kind: 'points', name: 'sigma', legend: 'Monte Carlo sigma', points: rows.map((x, i) => ({ x: x.offset.sigma * s, y: i })), marker: 'circle', fill: COLOR.main, stroke: OUTLINE, size: 4.5 },
        ],
        height: 34 * names.length + 20,
        grid: 'x',
      },
    ],
  });
  const largest = rows.reduce((a, b) => (b.offset.sigma > a.offset.sigma ? b : a));
  const smallest = rows.reduce((a, b) => (b.offset.sigma < a.offset.sigma ? b : a));
  let html =
    tbl +
    all +
    figure(
      'fig-conditions',
      'Figure 8.1',
      'Sigma by operating condition',
      `Sigma ranges from ${esc(q(smallest.offset.sigma, u))} (${esc(smallest.name)}) to ${esc(q(largest.offset.sigma, u))} (${esc(largest.name)}); the all-conditions yield is at most the lowest condition's own.`,
      svg,
    );

  const dr = r.drift;
  const hist = c.drift?.histogram;
  if (dr !== undefined && dr !== null && hist !== undefined) {
    // Per kelvin: the figure's unit with the prefix that suits the drift's sigma, then "/K".
    const base = displayQuantity(figureQuantity(f), dr.sigma);
    const dq = { ...base, label: `drift of the ${f.label}`, symbol: `d${f.symbol}/dT`, unit: `${base.unit}/K` };
    const edges = Array.from({ length: hist.counts.length + 1 }, (_, i) => hist.lo + i * hist.binWidth);
    const chart = histogramChart({ id: 'fig-drift', binEdges: edges, counts: hist.counts, samples: dr.samples, mean: dr.mean, sigma: dr.sigma, figure: dq, subtitle: `${dr.from} \u2192 ${dr.to}` });
    // The figure's unit per kelvin with a prefix (a dimensionless figure's drift is shown in ppm/K, not tagged by unit).
    const du = u === '%' ? undefined : `${u}/K`;
    const dv = (path: string, v: number): string => (du === undefined ? num(v, `${plain(v * 1e6, 4)} ppm/K`, { key: path }) : num(v, q(v, du), { path, unit: du }));
    html += figure(
      'fig-drift',
      'Figure 8.2',
      `Drift of the ${f.label} from ${dr.from} to ${dr.to}`,
      `Per instance, (${esc(f.symbol)}(${esc(dr.to)}) \u2212 ${esc(f.symbol)}(${esc(dr.from)})) / (T<sub>${esc(dr.to)}</sub> \u2212 T<sub>${esc(dr.from)}</sub>) over ${num(dr.samples, String(dr.samples), { path: 'drift.samples' })} samples: mean ${dv('drift.mean', dr.mean)}, sigma ${dv('drift.sigma', dr.sigma)} (${conf} [${dv('drift.sigmaInterval.0', dr.sigmaInterval[0])}, ${dv('drift.sigmaInterval.1', dr.sigmaInterval[1])}]), linearised ${dv('drift.linearisedSigma', dr.linearisedSigma)}${dr.correlation === null ? '' : `; correlation with the ${esc(f.label)} at ${esc(dr.from)} ${num(dr.correlation, plain(dr.correlation, 4), { path: 'drift.correlation' })}`}.`,
      chartSvg(chart),
    );
  } else {
    html += `<p class="note">No drift is shown: no two conditions differ only in temperature (<code>twinfet run --drift A,B</code> names a pair).</p>`;
  }
  return { id: 'conditions', title: 'Operating conditions', html };
}

/** Section 6: what a smaller spread costs in gate area. */
import { chartSvg, type Layer } from '../../chart/chart.js';
import { linearAxis, logAxis } from '../../chart/axis.js';
import { COLOR, DASH, OUTLINE } from '../../chart/style.js';
import { shown } from '../../plot.js';
import { AREA_RANGE } from '../analyses/area.js';
import type { ReportData } from '../data.js';
import { esc, figure, num, pairs, type Section } from '../html.js';
import { figureUnit, percent, plain, q, um2 } from '../units.js';
import { figureDisplay } from './distribution.js';

export function areaSection(d: ReportData): Section {
  const a = d.area;
  const fq = figureDisplay(d);
  const s = fq.scale;
  const u = figureUnit(d.stage.figure);
  const t = a.target;
  const um2f = 1e12;
  const xs = a.curve.map((p) => p.inputArea * um2f);
  const x = logAxis('gate area of one input device W\u00b7L (\u00b5m\u00b2)', xs);
  const today = a.today.inputArea * um2f;
  const meets = a.meets;
  // The two vertical lines are often close: each label goes on its own outer side.
  const meetsLeft = meets.reached && meets.inputArea * um2f < today;
  const meetRule = (name: string): Layer[] =>
    meets.reached && meets.inRange ? [{ kind: 'rule', name, axis: 'x', value: meets.inputArea * um2f, label: `meets target: ${plain(meets.inputArea * um2f, 3)} \u00b5m\u00b2`, stroke: COLOR.fit, dash: DASH.spec, side: meetsLeft ? 'start' : 'end' }] : [];
  const todayRule = (name: string): Layer => ({ kind: 'rule', name, axis: 'x', value: today, label: `today ${plain(today, 3)} \u00b5m\u00b2`, stroke: OUTLINE, dash: DASH.law, side: meetsLeft ? 'end' : 'start' });
  const mc = a.monteCarlo;
  const sigmaLayers: Layer[] = [
    { kind: 'line', name: 'sigma-linearised', legend: 'linearised', points: a.curve.map((p, i) => [xs[i]!, p.sigma * s] as const), stroke: COLOR.main, width: 2 },
    { kind: 'intervals', name: 'sigma-mc-interval', along: 'y', items: mc.map((p) => ({ at: p.inputArea * um2f, lo: p.sigmaInterval[0] * s, hi: p.sigmaInterval[1] * s })), stroke: COLOR.fit },
    { kind: 'points', name: 'sigma-mc', legend: `Monte Carlo (${mc[0]?.samples ?? 0} samples each)`, points: mc.map((p) => ({ x: p.inputArea * um2f, y: p.sigma * s })), marker: 'square', fill: COLOR.second, stroke: OUTLINE },
    { kind: 'rule', name: 'sigma-target', legend: 'target', axis: 'y', value: t.sigma * s, label: `target sigma ${shown(t.sigma * s, fq.unit)}`, stroke: COLOR.limit, dash: DASH.target },
    todayRule('today-sigma'),
    ...meetRule('meets-sigma'),
  ];
  const sigmaValues = [...a.curve.map((p) => p.sigma * s), ...mc.flatMap((p) => [p.sigmaInterval[0] * s, p.sigmaInterval[1] * s]), t.sigma * s];
  const yieldLayers: Layer[] = [
    { kind: 'line', name: 'yield-gaussian', legend: 'Gaussian from the linearised sigma', points: a.curve.map((p, i) => [xs[i]!, p.chipYield] as const), stroke: COLOR.main, width: 2 },
    { kind: 'intervals', name: 'yield-mc-interval', along: 'y', items: mc.map((p) => ({ at: p.inputArea * um2f, lo: p.chipYieldInterval[0], hi: p.chipYieldInterval[1] })), stroke: COLOR.fit },
    { kind: 'points', name: 'yield-mc', legend: 'Monte Carlo', points: mc.map((p) => ({ x: p.inputArea * um2f, y: p.chipYield })), marker: 'square', fill: COLOR.second, stroke: OUTLINE },
    { kind: 'rule', name: 'yield-target', axis: 'y', value: t.chipYield, label: `target chip yield ${t.chipYield}`, stroke: COLOR.limit, dash: DASH.target, side: 'start' },
    todayRule('today-yield'),
    ...meetRule('meets-yield'),
  ];
  const yieldValues = [...a.curve.map((p) => p.chipYield), ...mc.flatMap((p) => [...p.chipYieldInterval]), t.chipYield];
  const svg = chartSvg({
    id: 'fig-area',
    description: `Linearised sigma and chip yield against the input pair's gate area from ${AREA_RANGE[0]} to ${AREA_RANGE[1]} times today's (W/L kept), with Monte Carlo at five areas and the chip-yield target.`,
    panels: [
      { x, y: linearAxis(`sigma of the ${fq.label} ${fq.symbol} (${fq.unit})`, sigmaValues, { pad: 0.08 }), layers: sigmaLayers, height: 220, grid: 'xy' },
      { x, y: linearAxis(`chip yield (${t.instances} instance${t.instances === 1 ? '' : 's'})`, yieldValues, { pad: 0.06 }), layers: yieldLayers, height: 200, grid: 'xy' },
    ],
  });
  const targetText = `chip yield ${t.chipYield} over ${t.instances} instance${t.instances === 1 ? '' : 's'} allows ${plain(t.allowedFailure, 3)} failures per instance, so sigma must be at most ${q(t.sigma, u)} (the spec at ${plain(t.sigmaLevel, 4)} sigma)`;
  const meetText = meets.reached
    ? `the target is met from ${um2(meets.inputArea, 3)} per input device, ${plain(meets.factor, 3)}\u00d7 today's ${um2(a.today.inputArea, 3)}${meets.inRange ? '' : ' (outside the plotted range)'}`
    : `the input pair alone cannot meet it: even at ${plain(meets.atFactor, 3)}\u00d7 today's area sigma stays at ${q(meets.floor, u)}, set by the terms the input area does not reach`;
  const reading = `The ${esc(targetText)}; ${esc(meetText)}. Sigma falls as 1/\u221aarea while the input terms dominate.`;
  let html = figure('fig-area', 'Figure 6.1', `Sigma and chip yield against the input pair's gate area (${AREA_RANGE[0]}\u00d7 to ${AREA_RANGE[1]}\u00d7 today's, W/L kept)`, reading, svg);
  html += pairs([
    ['target', esc(targetText)],
    ['today', `${um2(a.today.inputArea)} per input device: linearised sigma ${esc(q(a.today.sigma, u))}, Gaussian chip yield ${plain(a.today.chipYield, 6)}`],
    ['area meeting the target', meets.reached ? `${num(meets.inputArea, um2(meets.inputArea), { key: 'area.meets.inputArea', unit: 'm^2' })} per input device (${plain(meets.factor, 4)}\u00d7 today's), linearised` : esc(meetText)],
    ...(a.refused.length > 0 ? ([['not drawn', `areas that are not valid designs: ${esc(a.refused.join('; '))}`]] as [string, string][]) : []),
  ]);

  const sp = a.split;
  if (sp !== null) {
    const names = sp.blocks.map((b) => b.label);
    const todayText = sp.blocks.map((b, k) => `${percent(sp.todayShares[k]!, 2)} ${b.label}`).join(', ');
    const optimumText = sp.blocks.map((b, k) => `${percent(sp.optimumShares[k]!, 2)} ${b.label}`).join(', ');
    const readingSplit = `For sigma \u2264 ${esc(q(t.sigma, u))} the least total is ${esc(um2(sp.optimumTotal, 3))} (${esc(optimumText)}), against ${esc(um2(sp.equalTotal, 3))} scaling every block from today's split (${esc(todayText)}): ${esc(percent(sp.saving, 2))} less area (linearised; with W/L kept sigma\u00b2 = \u03a3 C_k/a_k, least with a_k in proportion to \u221aC_k).`;
    if (sp.curve !== null) {
      const s0 = sp.todayShares[0]!;
      const s1 = sp.optimumShares[0]!;
      const layers: Layer[] = [
        { kind: 'line', name: 'split-total', legend: 'total area meeting the target', points: sp.curve.map((p) => [100 * p.share, p.total * um2f] as const), stroke: COLOR.main, width: 2 },
        { kind: 'points', name: 'split-optimum', legend: 'least total', points: [{ x: 100 * s1, y: sp.optimumTotal * um2f }], marker: 'circle', fill: COLOR.fit, stroke: OUTLINE, size: 5 },
        { kind: 'points', name: 'split-today', legend: "today's split, both blocks scaled", points: [{ x: 100 * s0, y: sp.equalTotal * um2f }], marker: 'square', fill: COLOR.second, stroke: OUTLINE, size: 5 },
        { kind: 'label', name: 'split-optimum-label', x: 100 * s1, y: sp.optimumTotal * um2f, text: `${plain(sp.optimumTotal * um2f, 3)} \u00b5m\u00b2 at ${percent(s1, 2)}`, dy: 18, anchor: 'middle' },
        { kind: 'label', name: 'split-today-label', x: 100 * s0, y: sp.equalTotal * um2f, text: `${plain(sp.equalTotal * um2f, 3)} \u00b5m\u00b2 at ${percent(s0, 2)}`, dy: -10, anchor: 'middle' },
      ];
      const ys = [sp.optimumTotal * um2f, sp.equalTotal * um2f, ...sp.curve.map((p) => p.total * um2f)];
      // Far from the optimum the curve climbs steeply: the axis stops at 3x the least total or at today's point.
      const cap = Math.max(3 * sp.optimumTotal * um2f, 1.15 * sp.equalTotal * um2f);
      const split = chartSvg({
        id: 'fig-split',
        description: `Total area (one element of each of: ${names.join(', ')}) that meets the sigma target, against the share of it given to the ${names[0]}.`,
        panels: [{ x: linearAxis(`${names[0]}'s share of the area (%)`, sp.curve.map((p) => 100 * p.share)), y: linearAxis(`W\u00b7L ${names.join(' + W\u00b7L ')} (\u00b5m\u00b2)`, ys.filter((v) => v <= cap), { zero: true }), layers, height: 240, grid: 'xy' }],
      });
      html += figure('fig-split', 'Figure 6.2', `The split of area between the ${names.join(' and the ')}`, readingSplit, split);
    } else {
      html += pairs([['least-area split', readingSplit]]);
    }
  }
  return { id: 'area', title: 'What it costs to do better', html };
}

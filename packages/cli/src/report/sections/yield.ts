/** Section 5: instance and chip yield, the Gaussian estimate and the high-sigma tail. */
import { linearisedEstimate } from '@twinfet/montecarlo';
import { chartSvg, type Layer } from '../../chart/chart.js';
import { categoryAxis, logAxis } from '../../chart/axis.js';
import { COLOR, DASH, OUTLINE } from '../../chart/style.js';
import { probabilityText } from '../../plot.js';
import { yieldDigits, yieldText } from '../../commands/inspect.js';
import { seenText } from '../../describe.js';
import type { ReportData } from '../data.js';
import { esc, figure, num, pairs, table, type Section } from '../html.js';
import { parameterText } from './budget.js';
import { figureUnit, plain, q } from '../units.js';

/** A yield with enough decimals to show its failure part (`digits` to align an interval). */
function yieldNum(path: string, y: number, digits: number): string {
  return num(y, y === 1 ? '1' : yieldText(y, digits), { path });
}

/** A probability in scientific form for tables. */
function pNum(path: string, p: number): string {
  return num(p, plain(p, 4), { path });
}

export function yieldSection(d: ReportData): Section {
  const r = d.run;
  const y = r.yield;
  // The linearised estimate in the figure's own law (Gaussian, or Bechhofer's for a selector).
  const e = linearisedEstimate(r.analytic);
  const g = { ...e, sigmaLevel: e.level, yield: 1 - e.failure };
  const is = r.importance;
  const c = `${plain(y.confidence * 100, 3)}%`;
  // Each row gets the decimals that show its own failure part (an interval shares its estimate's).
  const dInstance = yieldDigits(Math.min(y.interval[0], g.yield));
  const dChip = yieldDigits(Math.min(r.chip.interval[0], g.chipYield));
  const u = figureUnit(d.stage.figure);

  // The forest plot: each estimate of the instance failure probability with its interval.
  const rows: string[] = [`Monte Carlo (${r.evaluated} samples)`, 'Gaussian (linearised sigma)'];
  const points: { x: number; y: number }[] = [];
  const bars: { at: number; lo: number; hi: number }[] = [{ at: 0, lo: y.failure.interval[0], hi: y.failure.interval[1] }];
  if (y.failure.estimate > 0) points.push({ x: y.failure.estimate, y: 0 });
  const gaussianPts = g.failure > 0 ? [{ x: g.failure, y: 1 }] : [];
  const isPts: { x: number; y: number }[] = [];
  const formPts: { x: number; y: number }[] = [];
  if (is !== undefined) {
    rows.push(`importance sampling (${is.samples} samples)`, 'FORM (design points)');
    if (is.failureProbability > 0) {
      isPts.push({ x: is.failureProbability, y: 2 });
      bars.push({ at: 2, lo: is.interval[0], hi: is.interval[1] });
    }
    if (is.form.failureProbability > 0) formPts.push({ x: is.form.failureProbability, y: 3 });
  }
  const allowed = d.area.target.allowedFailure;
  const values = [...points, ...gaussianPts, ...isPts, ...formPts].map((p) => p.x).concat(bars.flatMap((b) => [b.lo, b.hi]), [allowed]).filter((v) => v > 0);
  const layers: Layer[] = [
    { kind: 'intervals', name: 'intervals', legend: `${c} interval`, along: 'x', items: bars, stroke: COLOR.main },
    { kind: 'points', name: 'monte-carlo', legend: 'Monte Carlo', points, marker: 'circle', fill: COLOR.main, stroke: COLOR.main, size: 4.5 },
    { kind: 'points', name: 'gaussian', legend: 'Gaussian', points: gaussianPts, marker: 'square', fill: COLOR.second, stroke: OUTLINE, size: 4.5 },
    ...(is === undefined
      ? []
      : ([
          { kind: 'points', name: 'importance', legend: 'importance sampling', points: isPts, marker: 'triangle', fill: COLOR.fit, stroke: OUTLINE, size: 4.5 },
          { kind: 'points', name: 'form', legend: 'FORM', points: formPts, marker: 'diamond', fill: '#ffffff', stroke: OUTLINE, size: 4.5 },
        ] as Layer[])),
    { kind: 'rule', name: 'allowed', axis: 'x', value: allowed, label: `allowed ${probabilityText(allowed)} (chip yield ${d.area.target.chipYield})`, stroke: COLOR.limit, dash: DASH.target },
  ];
  const svg = chartSvg({
    id: 'fig-yield',
    description: 'Estimates of the probability that one instance fails the spec, each with its confidence interval, and the failure allowed per instance by the chip-yield target.',
    panels: [{ x: logAxis('failure probability per instance', values, { pad: 0.08, max: 1 }), y: categoryAxis('estimate', rows), layers, height: 34 * rows.length + 30, grid: 'x' }],
  });
  const mcN = y.evaluated ?? r.evaluated;
  const mcText = `${y.failures === 0 ? `no failure in ${mcN} samples (the interval runs from 0, drawn as an arrow)` : `${y.failures} failures in ${mcN} samples`}${y.over === undefined ? '' : ' over all the operating conditions (section 8)'}`;
  const reading = `Monte Carlo: ${mcText}${is === undefined ? '' : `; importance sampling ${probabilityText(is.failureProbability)} against FORM ${probabilityText(is.form.failureProbability)}`}; the Gaussian estimate from the linearised sigma is ${probabilityText(g.failure)} (spec at ${plain(g.sigmaLevel, 4)} sigma).`;

  // With conditions the run's yield is over all of them (section 8); the linearised estimate is the design's own.
  const over = y.over === undefined ? '' : ', all conditions';
  const cells: [string, string][] = [
    [
      `failures${over}`,
      y.over === undefined
        ? `${num(y.failures, String(y.failures), { path: 'yield.failures' })} of ${r.evaluated} (${num(y.failuresHigh, String(y.failuresHigh), { path: 'yield.failuresHigh' })} above, ${num(y.failuresLow, String(y.failuresLow), { path: 'yield.failuresLow' })} below the spec)`
        : `${num(y.failures, String(y.failures), { path: 'yield.failures' })} of ${y.evaluated ?? r.evaluated} fail at one condition at least (${num(y.failuresHigh, String(y.failuresHigh), { path: 'yield.failuresHigh' })} above, ${num(y.failuresLow, String(y.failuresLow), { path: 'yield.failuresLow' })} below the spec somewhere)`,
    ],
    [`instance yield${over}`, `${yieldNum('yield.estimate', y.estimate, dInstance)}${y.failures === 0 ? ' (no failures seen)' : ''}   ${c} [${yieldNum('yield.interval.0', y.interval[0], dInstance)}, ${yieldNum('yield.interval.1', y.interval[1], dInstance)}] (${esc(y.method)})`],
    ['failure probability', `${pNum('yield.failure.estimate', y.failure.estimate)}   ${c} [${pNum('yield.failure.interval.0', y.failure.interval[0])}, ${pNum('yield.failure.interval.1', y.failure.interval[1])}]`],
    [y.over === undefined ? 'Gaussian estimate' : "Gaussian estimate (the design's own temperature and bias)", `${yieldNum('analytic.gaussian.yield', g.yield, yieldDigits(g.yield))} (failure ${pNum('analytic.gaussian.failure', g.failure)}; spec / linearised sigma = ${num(g.sigmaLevel, plain(g.sigmaLevel, 4), { path: 'analytic.gaussian.sigmaLevel' })})`],
    [`chip yield (${r.chip.instances} instance${r.chip.instances === 1 ? '' : 's'})${over}`, `${yieldNum('chip.estimate', r.chip.estimate, dChip)}   ${c} [${yieldNum('chip.interval.0', r.chip.interval[0], dChip)}, ${yieldNum('chip.interval.1', r.chip.interval[1], dChip)}]; Gaussian ${yieldNum('analytic.gaussian.chipYield', g.chipYield, dChip)}`],
  ];
  if (y.limitedBySamples && is === undefined) cells.push(['note', `${seenText(y.failures)}: the Monte Carlo yield is limited by the sample count`]);
  let points3 = '';
  if (is !== undefined) {
    cells.push(
      ['high-sigma failure', `${pNum('importance.failureProbability', is.failureProbability)}   ${c} [${pNum('importance.interval.0', is.interval[0])}, ${pNum('importance.interval.1', is.interval[1])}] (importance sampling about the most probable failure points, ${num(is.samples, String(is.samples), { path: 'importance.samples' })} samples, stop rule ${esc(is.stopRule)})`],
      ['sigma level', is.sigmaLevel === null ? 'not available (no failure seen)' : `${num(is.sigmaLevel, plain(is.sigmaLevel, 4), { path: 'importance.sigmaLevel' })} (two-sided)`],
      ['FORM', `${pNum('importance.form.failureProbability', is.form.failureProbability)} (${num(is.form.sigmaLevel, plain(is.form.sigmaLevel, 4), { path: 'importance.form.sigmaLevel' })} sigma; first-order reliability at the design points: Hasofer & Lind 1974, Rackwitz & Fiessler 1978)`],
      [`chip failure (${is.chip.instances})`, `${pNum('importance.chip.failure', is.chip.failure)}   ${c} [${pNum('importance.chip.interval.0', is.chip.interval[0])}, ${pNum('importance.chip.interval.1', is.chip.interval[1])}]`],
    );
    points3 = table(
      ['side', 'distance (sigma)', 'FORM p', 'dominant mismatch at the point'],
      is.designPoints.map((p, i) => [
        esc(p.side),
        num(p.distance, plain(p.distance, 5), { path: `importance.designPoints.${i}.distance` }),
        num(p.form, plain(p.form, 4), { path: `importance.designPoints.${i}.form` }),
        [...p.coordinates]
          .sort((a, b) => Math.abs(b.u) - Math.abs(a.u))
          .slice(0, 3)
          .map((t) => `${esc(t.device)} ${esc(parameterText(t.parameter))} ${esc(t.parameter === 'vt' ? q(t.deviation, 'V', 3) : q(t.deviation, '%', 3))} (${plain(t.u, 3)} \u03c3)`)
          .join(', '),
      ]),
      { numeric: [1, 2], caption: 'Most probable failure points (standard-normal space; the largest coordinates)' },
    );
  } else {
    cells.push(['high-sigma estimate', `not run: ${esc(d.highSigma.reason)}`]);
  }
  return {
    id: 'yield',
    title: 'Yield',
    html: `${figure('fig-yield', 'Figure 5.1', 'Failure probability per instance, by method', reading, svg)}${pairs(cells)}${points3}<p class="note">Spec ${esc(d.stage.figure.sided === 'two' ? '\u00b1' : '')}${esc(q(y.spec, u))}; intervals at ${c} confidence. ${d.highSigma.ran ? `The high-sigma estimate ran because ${esc(d.highSigma.reason)}.` : ''}</p>`,
  };
}

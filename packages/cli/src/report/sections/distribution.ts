/** Section 3: the distribution of the stage's figure over the Monte Carlo samples. */
import { chartSvg, type Layer } from '../../chart/chart.js';
import { linearAxis } from '../../chart/axis.js';
import { COLOR, DASH } from '../../chart/style.js';
import { shown } from '../../plot.js';
import { runHistogramChart } from '../../runHistogram.js';
import { END_POINTS } from '../analyses/distribution.js';
import type { ReportData } from '../data.js';
import { esc, figure, num, pairs, table, type Section } from '../html.js';
import { figureQuantity, figureUnit, minus, percent, plain, q } from '../units.js';
import { displayQuantity } from '../../displayQuantity.js';

/** A tail quantile is called Gaussian when it lies within this many standard errors of the line (common practice, no source). */
const TAIL_Z = 4;

export function figureDisplay(d: ReportData) {
  return displayQuantity(figureQuantity(d.stage.figure), Math.max(d.run.offset.sigma, Math.abs(d.run.offset.mean)));
}

export function distributionSection(d: ReportData): Section {
  const r = d.run;
  const f = d.stage.figure;
  const u = figureUnit(f);
  const F = r.figure.name;
  const fq = figureDisplay(d);
  const o = r.offset;
  const k = r.yield.spec / o.sigma;
  const c = `${plain(r.yield.confidence * 100, 3)}%`;
  const V = (path: string, v: number, digits = 4): string => num(v, q(v, u, digits), { path, unit: u });
  const interval = (path: string, iv: readonly [number, number]): string => `${c} [${V(`${path}.0`, iv[0])}, ${V(`${path}.1`, iv[1])}]`;

  const hist = chartSvg(runHistogramChart(r, { id: 'fig-histogram', figure: fq, specSides: f.sided }));
  const outside = `${r.yield.failures} of ${r.evaluated} samples (${r.yield.failuresHigh} above, ${r.yield.failuresLow} below) fall outside the spec`;
  const histReading = `Sigma ${esc(q(o.sigma, u))} from ${r.evaluated} samples; the spec ${f.sided === 'two' ? '\u00b1' : ''}${esc(q(r.yield.spec, u))} lies at ${plain(k, 3)} sigma, and ${outside}.`;

  // Normal-probability plot: sample quantiles against normal quantiles, with the fitted line.
  const pts = d.distribution.probabilityPlot.points;
  const zs = pts.map((p) => p.z);
  const zLo = Math.min(...zs);
  const zHi = Math.max(...zs);
  const s = fq.scale;
  const line: [number, number][] = [[zLo, (o.mean + o.sigma * zLo) * s], [zHi, (o.mean + o.sigma * zHi) * s]];
  const ys = [...pts.map((p) => p.value * s), ...line.map((l) => l[1])];
  const specLines = f.sided === 'two' ? [-r.yield.spec, r.yield.spec] : [r.yield.spec];
  // The spec lines are drawn when they fall within the sampled range or just beyond it.
  const yMin = Math.min(...ys);
  const yMax = Math.max(...ys);
  const span = yMax - yMin;
  const drawn = specLines.filter((v) => v * s >= yMin - 0.25 * span && v * s <= yMax + 0.25 * span);
  const layers: Layer[] = [
    { kind: 'line', name: 'gaussian-line', legend: 'Gaussian with the sample mean and sigma', points: line, stroke: COLOR.fit, width: 1.5 },
    { kind: 'points', name: 'quantiles', legend: 'sample quantiles', points: pts.map((p) => ({ x: p.z, y: p.value * s })), marker: 'circle', fill: COLOR.main, stroke: COLOR.main, size: 2.2 },
    ...drawn.map((v): Layer => ({ kind: 'rule', name: v < 0 ? 'spec-low' : 'spec-high', axis: 'y', value: v * s, label: `${v < 0 ? '\u2212spec' : '+spec'} ${shown(v * s, fq.unit)}`, stroke: COLOR.limit, dash: DASH.spec, side: v < 0 ? 'end' : 'start' })),
  ];
  const prob = chartSvg({
    id: 'fig-probability',
    description: `Normal-probability plot: ${pts.length} sample quantiles of the ${f.label} against the normal quantiles of their plotting positions, with the fitted Gaussian as a straight line.`,
    panels: [
      {
        x: linearAxis('normal quantile (standard deviations)', zs),
        y: linearAxis(`${fq.label} ${fq.symbol} quantile (${fq.unit})`, [...ys, ...drawn.map((v) => v * s)]),
        layers,
        height: 280,
        grid: 'xy',
      },
    ],
  });
  const tails = d.distribution.tails;
  const heavy = tails.filter((t) => Math.abs(t.standardErrors) > TAIL_Z);
  const tailText = tails.map((t) => `the ${plain(t.p * 100, 3)}% quantile lies ${percent(Math.abs(t.relative), 2)} ${t.relative >= 0 ? 'beyond' : 'inside'} the line (${minus(t.standardErrors.toFixed(1))} standard errors)`).join(', ');
  const probReading =
    tails.length === 0
      ? `Points on the line mean Gaussian tails; ${r.evaluated} samples are too few to judge the 0.1% quantiles (at least 10000 are needed).`
      : heavy.length === 0
        ? `The points follow the line out to ${plain(Math.max(-zLo, zHi), 3)} sigma, so the tails are Gaussian within sampling error: ${tailText}.`
        : `The tails are not Gaussian: ${tailText}. ${heavy.some((t) => t.relative > 0) ? 'A heavier tail than the Gaussian makes the Gaussian yield estimate optimistic.' : 'A lighter tail makes the Gaussian yield estimate pessimistic.'}`;

  const pp = d.distribution.probabilityPlot;
  const bin = plain(pp.binWidth / o.sigma, 2);
  const how = pp.method === 'samples' ? ` The ${END_POINTS} most extreme samples at each end are drawn exactly, the points between them from the histogram (to ${bin} sigma).` : ` Every point comes from the histogram (to ${bin} sigma): the run was too large to keep its samples.`;
  const kt = d.distribution.kurtosis;
  const agree = r.analytic.agreement;
  const numbers = pairs([
    ['samples evaluated', `${num(r.evaluated, String(r.evaluated), { path: 'evaluated' })} of ${num(r.samples, String(r.samples), { path: 'samples' })}${r.nonConverged > 0 ? ` (${num(r.nonConverged, String(r.nonConverged), { path: 'nonConverged' })} balance solves did not converge and are left out)` : ''}`],
    ['mean', `${V(`${F}.mean`, o.mean)}   ${interval(`${F}.meanInterval`, o.meanInterval)}`],
    ['sigma', `${V(`${F}.sigma`, o.sigma)}   ${interval(`${F}.sigmaInterval`, o.sigmaInterval)} (chi-square)`],
    ['linearised sigma', `${V('analytic.sigma', r.analytic.sigma)}; the Monte Carlo sigma differs by ${num(agree.relativeDifference, percent(agree.relativeDifference, 2), { path: 'analytic.agreement.relativeDifference', unit: '%' })} (${minus(agree.standardErrors.toFixed(1))} standard errors)${agree.consistent ? '' : ' \u2014 more than sampling error allows: the figure is not linear in the mismatch here'}`],
    ['kurtosis', `${num(kt.value, plain(kt.value, 4), { key: 'distribution.kurtosis.value' })} \u00b1 ${plain(kt.standardError, 2)} (one standard error; a Gaussian has 3), ${kt.method === 'samples' ? 'from every sample' : 'from the histogram'}`],
    ['min / max', `${V(`${F}.min`, o.min)} / ${V(`${F}.max`, o.max)}`],
  ]);
  const qs = o.quantiles;
  const qcell = (path: string, v: number | null): string => (v === null ? 'beyond the histogram' : V(path, v));
  const quant = table(
    ['p', ...qs.signed.map((x) => `${plain(x.p * 100, 3)}%`)],
    [
      [esc(f.symbol), ...qs.signed.map((x, i) => qcell(`${F}.quantiles.signed.${i}.value`, x.value))],
      [`|${esc(f.symbol)}|`, ...qs.absolute.map((x, i) => qcell(`${F}.quantiles.absolute.${i}.value`, x.value))],
    ],
    { numeric: qs.signed.map((_, i) => i + 1), caption: `Quantiles (${o.quantileMethod === 'exact' ? 'exact, from every sample' : 'from the histogram, within one bin width'})` },
  );
  const name = f.label.charAt(0).toUpperCase() + f.label.slice(1);
  return {
    id: 'distribution',
    title: `${name} distribution`,
    html: `${figure('fig-histogram', 'Figure 3.1', `${name} histogram with the fitted Gaussian and the spec`, histReading, hist)}${figure('fig-probability', 'Figure 3.2', 'Normal-probability plot', `${probReading}${how}`, prob)}${numbers}${quant}`,
  };
}

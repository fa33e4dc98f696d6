import { createWriteStream } from 'node:fs';
import { compileStage, InputError, isInputError, MISMATCH_PARAMETERS, stageDefinition, variableDeviation, type Design } from '@twinfet/core';
import { chunkCount, createExecutor, DEFAULT_SAMPLES, EAGER_POOL_SAMPLES, linearisedEstimate, responseEnvelope, RUN_LIMITS, simulateWithSamples, type RunOutcome, type RunReport } from '@twinfet/montecarlo';
import type { Command } from 'commander';
import { readCommon, readSpec, withCommonOptions, type CommonFlags } from '../commonOptions.js';
import { figureJson, figureText, headerLine, pct, plotFigure, sci, seenText, type FigureText } from '../describe.js';
import { loadDesign } from '../designFile.js';
import { warnUnitSlips } from '../unitWarnings.js';
import { parseCount } from '../options.js';
import { assertFinite, printJson, type Io } from '../output.js';
import { withInterrupt } from '../interrupt.js';
import { renderPairs } from '../table.js';
import { textHistogram } from '../textHistogram.js';
import { renderBudget, selectionPairs, yieldBound, yieldDigits, yieldFromFailure } from './inspect.js';
import { renderTail } from './tail.js';
import { writeOutputFile } from '../files.js';
import { renderRunConditions } from '../conditionsText.js';

interface RunFlags extends CommonFlags {
  samples?: string;
  samplesOut?: string;
  plot?: string;
  interval?: string;
  method?: string;
  drift?: string;
}

/** `--drift A,B`: two condition names (checked against the design by the library). */
export function parseDrift(text: string | undefined): readonly [string, string] | undefined {
  if (text === undefined) return undefined;
  const parts = text.split(',').map((x) => x.trim());
  if (parts.length !== 2 || parts.some((x) => x === '')) {
    throw new InputError('--drift', `expected two condition names joined by a comma, such as --drift cold,hot, got "${text}"`);
  }
  return [parts[0]!, parts[1]!];
}

/** Largest run whose every draw may be written to --samples-out. */

function parseRunFlags(flags: RunFlags) {
  const common = readCommon(flags);
  const samples = flags.samples === undefined ? 100_000 : parseCount(flags.samples, '--samples', ...RUN_LIMITS.samples);
  const interval = flags.interval ?? 'clopper-pearson';
  if (interval !== 'clopper-pearson' && interval !== 'wilson') {
    throw new InputError('--interval', `expected clopper-pearson or wilson, got "${interval}"`);
  }
  const method = flags.method ?? 'plain';
  if (method !== 'plain' && method !== 'importance') throw new InputError('--method', `expected plain or importance, got "${method}"`);
  if (flags.samplesOut !== undefined) {
    if (!flags.samplesOut.toLowerCase().endsWith('.csv')) throw new InputError('--samples-out', `expected a file name ending in .csv, got "${flags.samplesOut}"`);
    if (samples > RUN_LIMITS.keptDraws) throw new InputError('--samples-out', `writing every sample is limited to ${RUN_LIMITS.keptDraws.toExponential(0)} samples; got ${samples}`);
  }
  if (flags.plot !== undefined && !flags.plot.toLowerCase().endsWith('.svg')) {
    throw new InputError('--plot', `expected a file name ending in .svg, got "${flags.plot}"`);
  }
  return { ...common, samples, interval: interval as 'clopper-pearson' | 'wilson', method, drift: parseDrift(flags.drift) };
}

/** Writes every sample's figure and physical mismatch draws as CSV. */
async function writeSamplesCsv(path: string, outcome: RunOutcome): Promise<void> {
  const { offsets, draws, dimension, variables } = outcome;
  if (offsets === undefined || draws === undefined) throw new Error('internal: samples were not kept');
  const fig = outcome.figure;
  const column = `${fig.name}_${fig.unit === '' ? 'rel' : fig.unit}`;
  const atConditions = outcome.conditionFigures ?? [];
  const names = outcome.report.conditions?.map((c) => c.name) ?? [];
  const header = [
    'sample',
    column,
    ...names.map((n) => `${column}_at_${n}`),
    ...variables.map((v) => `${v.device}_${MISMATCH_PARAMETERS[v.parameter].column}`),
  ];
  const figureCell = (x: number): string => (Number.isNaN(x) ? 'NaN' : x.toPrecision(9));
  const stream = createWriteStream(path);
  const done = new Promise<void>((resolve, reject) => {
    stream.on('error', (e) => reject(new InputError('--samples-out', `cannot write "${path}": ${e.message}`)));
    stream.on('finish', resolve);
  });
  stream.write(`${header.join(',')}\n`);
  let chunk = '';
  for (let i = 0; i < offsets.length; i++) {
    const row: string[] = [String(i), figureCell(offsets[i]!), ...atConditions.map((a) => figureCell(a[i]!))];
    for (let j = 0; j < dimension; j++) row.push(variableDeviation(variables, draws, i * dimension, j).toPrecision(9));
    chunk += `${row.join(',')}\n`;
    if (chunk.length > 1 << 20) {
      if (!stream.write(chunk)) await new Promise<void>((r) => stream.once('drain', () => r()));
      chunk = '';
    }
  }
  stream.end(chunk);
  await done;
}

/** The histogram plot of a run, in the display unit of its figure. */
export async function runPlot(report: RunReport, title: string): Promise<string> {
  // Loaded on demand, so a run without --plot does not load the plotting code.
  const [{ chartSvg }, { runHistogramChart }] = await Promise.all([import('../chart/chart.js'), import('../runHistogram.js')]);
  return chartSvg(runHistogramChart(report, { title, figure: plotFigure(report.figure), specSides: report.figure.sided }));
}

/** Row labels of the text histogram: the offset in mV to 3 decimals as before, a dimensionless figure in %. */
function histogramRowLabel(f: FigureText): (v: number) => string {
  const { unit, scale } = f.display;
  return (v) => `${(Math.abs(v) < 1e-15 ? 0 : v * scale).toFixed(3)} ${unit}`;
}

/** Points of the response plot's lead grid. */
const RESPONSE_POINTS = 41;

/**
 * The response plot of a stage that has a transfer curve (a selector's winner's share against
 * the lead): the nominal curve and the percentile bands over samples, the spec marked. The lead
 * runs from -spec to where the nominal share reaches 90% (at least 3 spec).
 */
export async function responsePlot(design: Design, report: RunReport, title: string): Promise<string> {
  const { responseSvg } = await import('../plot.js');
  const stage = compileStage(design);
  const curve = stage.response!;
  const zero = new Float64Array(stage.dimension);
  const spec = report.yield.spec;
  let top = Math.max(3 * spec, 1e-3);
  for (let i = 0; i < 60 && curve.evaluate(zero, 0, top) < 0.9; i++) top *= 1.5;
  const xs = Array.from({ length: RESPONSE_POINTS }, (_, i) => -spec + ((top + spec) * i) / (RESPONSE_POINTS - 1));
  const envelope = responseEnvelope(stage, xs, report.seed);
  // No sample could be evaluated at some lead (every solve failed): the histogram instead.
  if (envelope === undefined) return runPlot(report, title);
  const pf = plotFigure(report.figure);
  return responseSvg({ title, envelope, spec, subtitle: `seed ${report.seed}`, figure: pf });
}

const range = (iv: readonly [number, number], f: (v: number) => string): string => `[${f(iv[0])}, ${f(iv[1])}]`;
/**
 * A yield estimated from `failures` in `samples`, and its interval, printed with one number of
 * decimals: enough to show the failure part of the largest value below 1 (with no failures,
 * of the lower end) to three figures.
 */
const yieldWithInterval = (y: number, iv: readonly [number, number], c: string, failures: number, samples: number): string => {
  const below1 = [y, iv[1]].filter((v) => v < 1);
  const digits = yieldDigits(below1.length > 0 ? Math.max(...below1) : iv[0]);
  const estimate = failures === 0 ? `1 (no failures in ${samples} samples)` : yieldBound(y, digits);
  return `${estimate}   ${c} ${range(iv, (v) => yieldBound(v, digits))}`;
};

/** Text form of the run report. */
export function renderRun(r: RunReport, design: Design): string {
  const f = figureText(r.figure);
  const mv = f.format;
  const c = `${Math.round(r.yield.confidence * 1000) / 10}%`;
  const q = r.offset.quantiles;
  // Columns 11 wide, or wider when a value needs it (a small percentage), so that they never run together.
  const cellText = (x: (typeof q.signed)[number]): string => (x.value === null ? 'beyond' : mv(x.value));
  const qWidth = Math.max(11, ...[...q.signed, ...q.absolute].map((x) => cellText(x).length + 1));
  const qHead = q.signed.map((x) => `${x.p * 100}%`.padStart(qWidth)).join('');
  const qRow = (xs: typeof q.signed): string => xs.map((x) => cellText(x).padStart(qWidth)).join('');
  const agree = r.analytic.agreement;
  const twoSided = r.figure.sided === 'two';
  const estimate = linearisedEstimate(r.analytic);
  const note = stageDefinition(design.topology).figure.note;
  const lines = [
    headerLine(design),
    `Monte Carlo on the exact model: ${r.evaluated} samples${r.partial ? ' (PARTIAL: interrupted, finished chunks only)' : ''}, seed ${r.seed}, ${r.workers} worker(s), ${r.seconds.toFixed(2)} s, ${sci(r.samplesPerSecond, 3)} samples/s`,
    ...(r.conditions === undefined ? [] : [`the ${f.label} statistics, quantiles, histogram and budget below are at the design's own temperature and bias; the ${r.conditions.length} operating conditions follow them`]),
    '',
    renderPairs([
      [`${f.label} mean`, `${mv(r.offset.mean)}   ${c} ${range(r.offset.meanInterval, mv)}`],
      [`${f.label} sigma`, `${mv(r.offset.sigma)}   ${c} ${range(r.offset.sigmaInterval, mv)} (${r.offset.sigmaIntervalMethod === 'bonett' ? `Bonett, valid for a non-Gaussian ${f.label}` : 'chi-square'})`],
      [`${f.label} kurtosis`, `${r.offset.kurtosis.toFixed(3)}   (3 for a Gaussian ${f.label}; above 3, heavier tails)`],
      ['linearised sigma', `${mv(r.analytic.sigma)}   Monte Carlo differs by ${pct(agree.relativeDifference, 2)} (${agree.standardErrors.toFixed(1)} standard errors)${agree.consistent ? '' : `  <- more than sampling error allows: the ${f.label} is not linear in the mismatch here`}`],
      ...('gaussian' in r.analytic ? [] : [['linearised mean', mv(r.analytic.mean)] as [string, string]]),
      ['min / max', `${mv(r.offset.min)} / ${mv(r.offset.max)}`],
    ]),
    '',
    `quantiles (${r.offset.quantileMethod === 'exact' ? 'exact, from every sample' : 'from the histogram, within one bin width'})`,
    `${'p'.padEnd(8)}${qHead}`,
    `${f.symbol.padEnd(8)}${qRow(q.signed)}`,
    ...(twoSided ? [`${f.magnitude.padEnd(8)}${qRow(q.absolute)}`] : []),
    ...(note === undefined ? [] : [`note: ${note}`]),
    '',
    twoSided
      ? textHistogram(r.histogram, Math.max(4 * r.offset.sigma, 1.1 * r.yield.spec), r.yield.spec, 25, 50, histogramRowLabel(f))
      : textHistogram(r.histogram, Math.max(4 * r.offset.sigma, 1.1 * Math.abs(r.yield.spec - r.offset.mean)), r.yield.spec, 25, 50, histogramRowLabel(f), true, r.offset.mean),
    '',
    renderBudget(r.analytic, design),
    '',
    ...(r.conditions === undefined ? [] : [renderRunConditions(r, design, yieldDigits), '']),
    renderPairs(r.conditions === undefined ? [
      [`spec ${f.magnitude} <=`, mv(r.yield.spec)],
      [
        'failures',
        `${r.yield.failures} of ${r.evaluated}${twoSided ? ` (${r.yield.failuresHigh} above +spec, ${r.yield.failuresLow} below -spec)` : ' (above the spec)'}${r.yield.failures === 0 ? `; failure probability at most ${sci(r.yield.failure.interval[1], 4)} (upper end of the ${c} interval)` : ''}`,
      ],
      ['instance yield', `${yieldWithInterval(r.yield.estimate, r.yield.interval, c, r.yield.failures, r.evaluated)} (${r.yield.method})`],
      ...('gaussian' in r.analytic
        ? [['Gaussian estimate', `${yieldFromFailure(r.analytic.gaussian.failure)}   from the linearised sigma`] as [string, string]]
        : [
            [
              `${estimate.name} estimate`,
              `${yieldFromFailure(estimate.failure)}   from the per-cell sigma${r.analytic.yieldAgreement === undefined ? '' : `; Monte Carlo differs by ${sci(r.analytic.yieldAgreement.difference, 3)} (${r.analytic.yieldAgreement.standardErrors.toFixed(1)} standard errors)${r.analytic.yieldAgreement.consistent ? '' : '  <- more than sampling error allows'}`}`,
            ] as [string, string],
          ]),
      [`chip yield (${r.chip.instances} instance${r.chip.instances === 1 ? '' : 's'})`, yieldWithInterval(r.chip.estimate, r.chip.interval, c, r.yield.failures, r.evaluated)],
    ] : [
      [`spec ${f.magnitude} <=`, mv(r.yield.spec)],
      [
        'failures',
        `${r.yield.failures} of ${r.yield.evaluated ?? r.evaluated} fail at one condition at least${twoSided ? ` (${r.yield.failuresHigh} above +spec somewhere, ${r.yield.failuresLow} below -spec somewhere)` : ''}${r.yield.failures === 0 ? `; failure probability at most ${sci(r.yield.failure.interval[1], 4)} (upper end of the ${c} interval)` : ''}`,
      ],
      ['yield, all conditions', `${yieldWithInterval(r.yield.estimate, r.yield.interval, c, r.yield.failures, r.yield.evaluated ?? r.evaluated)} (${r.yield.method}; an instance passes only if it passes at every condition)`],
      ['worst condition', `${r.yield.worst ?? '-'} (the lowest yield of its own)`],
      [`chip yield (${r.chip.instances} instance${r.chip.instances === 1 ? '' : 's'})`, `${yieldWithInterval(r.chip.estimate, r.chip.interval, c, r.yield.failures, r.yield.evaluated ?? r.evaluated)} (from the all-conditions yield)`],
    ]),
  ];
  // The spec and the Bechhofer figures are in the yield lines above; the sigma and the leads are added.
  if (!('gaussian' in r.analytic)) lines.push('', renderPairs(selectionPairs(r.analytic, mv).filter(([k]) => k.startsWith('per-cell') || k.startsWith('lead needed'))));
  const resp = r.response;
  if (resp !== undefined) {
    const qs = resp.quantiles.map((x) => `${x.p * 100}% ${pct(x.value, 4)}`).join(', ');
    lines.push(
      '',
      renderPairs([
        [`${resp.label} at ${resp.input} ${mv(resp.at)}`, `nominal ${pct(resp.nominal, 4)}; over ${resp.evaluated} samples mean ${pct(resp.mean, 4)}, sigma ${pct(resp.sigma, 3)}`],
        ['its quantiles', qs],
      ]),
    );
  }
  if (r.yield.limitedBySamples) {
    lines.push(
      '',
      `note: ${seenText(r.yield.failures)}: the yield estimate is limited by the sample count. For high-sigma yields use \`twinfet tail\` or \`twinfet run --method importance\`.`,
    );
  }
  if (r.importance !== undefined) lines.push('', 'importance sampling (high-sigma failure probability)', renderTail(r.importance, design));
  for (const w of r.warnings) lines.push(`warning: ${w}`);
  return lines.join('\n');
}

/** Registers `twinfet run`. */
export function registerRun(program: Command, io: Io, setExit: (code: number) => void): void {
  withCommonOptions(
    program
      .command('run')
      .description("Monte Carlo of the stage's figure (offset, current error): distribution, sigma, quantiles, budget, yield with intervals")
      .argument('<design>', 'design file (YAML or JSON)')
      .option('--samples <N>', 'samples to draw, e.g. 100000, 1e6, 1_000_000 (default 100000)')
      .option('--spec <V>', "limit overriding the design's spec, e.g. 20mV (an offset) or 1% (a current error)")
      .option('--interval <M>', 'yield interval: clopper-pearson (default) or wilson')
      .option('--method <M>', 'plain (default), or importance to add the high-sigma estimate')
      .option('--drift <A,B>', 'the two conditions to take the drift of the figure between, e.g. cold,hot (default: the coldest and hottest that differ only in temperature)')
      .option('--samples-out <FILE.csv>', "write each sample's figure and mismatch draws")
      .option('--plot <FILE.svg>', "histogram with the fitted Gaussian and the +-spec lines (a selector: the winner's share against the lead, with its mismatch envelope)"),
  ).action(async (file: string, flags: RunFlags) => {
    const o = parseRunFlags(flags);
    // A long run starts its worker threads now, while the design is read and compiled.
    const samples = o.samples ?? DEFAULT_SAMPLES;
    const chunks = chunkCount(samples);
    const executor = o.workers > 1 && samples >= EAGER_POOL_SAMPLES ? createExecutor(Math.min(o.workers, chunks), { chunks, startNow: true }) : undefined;
    try {
      const design = await loadDesign(file);
      const spec = readSpec(flags, design);
      warnUnitSlips(io, design, spec);
      const done = await withInterrupt(io, 'run', (signal, onProgress) =>
        simulateWithSamples(design, {
          samples: o.samples,
          workers: o.workers,
          confidence: o.confidence,
          interval: o.interval,
          signal,
          partialOnAbort: true,
          onProgress,
          ...(executor === undefined ? {} : { executor }),
          keepDraws: flags.samplesOut !== undefined,
          ...(o.seed === undefined ? {} : { seed: o.seed }),
          ...(spec === undefined ? {} : { spec }),
          ...(o.method === 'importance' ? { importance: true } : {}),
          ...(o.drift === undefined ? {} : { drift: o.drift }),
        }).catch((e: unknown) => {
          // The library names its own option; on the command line it is --drift.
          if (isInputError(e) && e.field === 'drift') throw new InputError('--drift', e.message.slice(e.field.length + 2));
          throw e;
        }),
      );
      if (!('value' in done)) {
        // Interrupted before a single chunk finished: there are no statistics to print.
        io.err('twinfet: run interrupted before any chunk finished; nothing was printed');
        setExit(130);
        return;
      }
      const outcome = done.value;
      const report = outcome.report;
      assertFinite(report);
      if (flags.samplesOut !== undefined) await writeSamplesCsv(flags.samplesOut, outcome);
      if (flags.plot !== undefined) {
        const svg = compileStage(design).response === undefined
          ? await runPlot(report, `${design.name}: ${report.figure.label} distribution`)
          : await responsePlot(design, report, `${design.name}: ${report.response?.label ?? 'response'} against ${report.response?.input ?? 'input'}`);
        await writeOutputFile(flags.plot, '--plot', svg);
      }
      if (flags.json === true) printJson(io, figureJson(report));
      else {
        io.out(renderRun(report, design));
        if (flags.samplesOut !== undefined) io.out(`wrote ${flags.samplesOut}`);
        if (flags.plot !== undefined) io.out(`wrote ${flags.plot}`);
      }
      setExit(report.partial ? 130 : 0);
    } finally {
      await executor?.close();
    }
  });
}

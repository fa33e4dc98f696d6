import { formatQuantity, InputError, parseQuantity, stageDefinition, validateDesign, type Design } from '@twinfet/core';
import { DEFAULT_SEED, sweepDesigns, SWEEP_SAMPLES, type SweepPointResult } from '@twinfet/montecarlo';
import type { Command } from 'commander';
import { readCommon, readSpec, withCommonOptions, type CommonFlags } from '../commonOptions.js';
import { designSummary, figureSummary, figureText, parseFigureOption, plotFigure, sci } from '../describe.js';
import { loadDesign } from '../designFile.js';
import { warnUnitSlips } from '../unitWarnings.js';
import { writeOutputFile } from '../files.js';
import { parseCount, parseFraction } from '../options.js';
import { assertFinite, printJson, type Io } from '../output.js';
import type { SweepPoint } from '../plot.js';
import { withInterrupt } from '../interrupt.js';
import { renderTable } from '../table.js';
import { plotAxis, SWEEP_FIELDS, sweepField, sweepValues, withField, type SweepField } from '../sweepField.js';
import { yieldBound, yieldDigits } from './inspect.js';

interface SweepFlags extends CommonFlags {
  vary?: string;
  from?: string;
  to?: string;
  steps?: string;
  log?: boolean;
  samples?: string;
  method?: string;
  targetSigma?: string;
  targetYield?: string;
  csv?: string;
  plot?: string;
}

/** The sweep report printed as JSON (SI units; null where a figure is not available). */
export interface SweepReport {
  readonly design: ReturnType<typeof designSummary>;
  /** What the sigmas, targets and specs are of (`offset` in volts, `currentError` as a fraction). */
  readonly figure: ReturnType<typeof figureSummary>;
  readonly field: string;
  /** SI unit of the swept values ('' for plain numbers). */
  readonly unit: string;
  readonly log: boolean;
  readonly method: 'plain' | 'importance';
  readonly samples: number;
  readonly seed: string;
  readonly confidence: number;
  readonly targets: { readonly sigma: number | null; readonly yield: number | null };
  readonly points: readonly (SweepPointResult & { readonly value: number; readonly meetsTarget: { readonly sigma: Verdict | null; readonly yield: Verdict | null } })[];
  readonly notes: readonly string[];
  readonly warnings: readonly string[];
}

/** Whether a point meets a target, judged on its interval. */
export type Verdict = 'met' | 'missed' | 'unclear';

const verdict = (lo: number, hi: number, limit: number): Verdict => (hi <= limit ? 'met' : lo > limit ? 'missed' : 'unclear');

function parseEnd(text: string | undefined, option: string, f: SweepField): number {
  if (text === undefined) throw new InputError(option, `missing; give the ${option === '--from' ? 'first' : 'last'} value of ${f.path}, e.g. ${option} ${example(f)}`);
  return parseQuantity(text, f.dimension, option);
}

function example(f: SweepField): string {
  switch (f.dimension) {
    case 'length': return '2um';
    case 'area': return '4um^2';
    case 'resistance': return '20kohm';
    case 'current': return '10uA';
    case 'temperature': return '"27 C"';
    case 'voltage': return '10mV';
    case 'kp': return '300uA/V^2';
    case 'avt': return '5mV*um';
    case 'abeta': return '1%*um';
    case 'cox': return '8.6fF/um^2';
    case 'dimensionless': return '1.3';
  }
}

/** The design at one swept value, validated; errors name the option that produced the value. */
function pointDesign(design: Design, f: SweepField, value: number, option: string): Design {
  const d = withField(design, f.path, value);
  try {
    return validateDesign(d);
  } catch (e) {
    if (e instanceof InputError) throw new InputError(option, `${f.path} = ${shown(f, value)} is not a valid design (${e.message})`);
    throw e;
  }
}

function shown(f: SweepField, v: number): string {
  if (f.tableUnit === '') return String(Number(v.toPrecision(6)));
  // Areas read best in um^2 whatever their size (a prefix does not square cleanly).
  if (f.dimension === 'area') return `${Number((v * 1e12).toPrecision(4))} um^2`;
  return formatQuantity(v, f.tableUnit, 4);
}

const conf = (c: number): string => `${Math.round(c * 1000) / 10}%`;

/** Text table of a sweep. */
export function renderSweep(r: SweepReport, f: SweepField): string {
  const c = conf(r.confidence);
  const mv = figureText(r.figure).format;
  const hasTail = r.method === 'importance';
  const counts = new Set(r.points.map((p) => p.instances));
  const chipNotes = [...(counts.size === 1 ? [String(r.points[0]!.instances)] : []), ...(hasTail ? ['IS'] : [])];
  const chipHead = chipNotes.length === 0 ? 'chip yield' : `chip yield (${chipNotes.join(', ')})`;
  // With importance sampling every yield of a row comes from its importance-sampling failure.
  const yieldHead = hasTail ? 'yield (IS)' : 'yield';
  const header = [f.path, 'analytic sigma', 'MC sigma', `${c} interval`, yieldHead, `${c} interval`, chipHead];
  if (hasTail) header.push('IS failure', `${c} interval`, 'sigma level');
  const withConditions = r.points.some((p) => p.limitingCondition !== null);
  if (withConditions) header.push('limited by (sigma / yield)');
  if (r.targets.sigma !== null) header.push(`sigma <= ${mv(r.targets.sigma)}`);
  if (r.targets.yield !== null) header.push(`yield >= ${r.targets.yield}`);
  const wholeNumbers = SWEEP_FIELDS.find((x) => x.path === r.field)?.integer === true;
  const rows = r.points.map((p) => {
    const m = p.monteCarlo;
    const y = p.yield;
    // Digits enough for three figures of the interval's larger failure, per row.
    const digits = yieldDigits(y.interval[0]);
    const estimate = y.method === 'monte-carlo' && m.failures === 0 ? '1 (no failures)' : yieldBound(y.estimate, digits);
    const row = [
      shown(f, p.value),
      mv(p.analyticSigma),
      mv(m.sigma),
      `[${mv(m.sigmaInterval[0])}, ${mv(m.sigmaInterval[1])}]`,
      estimate,
      `[${yieldBound(y.interval[0], digits)}, ${yieldBound(y.interval[1], digits)}]`,
      yieldBound(y.chipYield, yieldDigits(y.chipYieldInterval[0])),
    ];
    if (hasTail) {
      const t = p.importance!;
      // A point whose spec lies in the bulk was estimated by plain Monte Carlo (marked MC).
      row.push(`${sci(t.failure, 4)}${t.method === 'monte-carlo' ? ' (MC)' : ''}`, `[${sci(t.interval[0], 3)}, ${sci(t.interval[1], 3)}]`, t.sigmaLevel === null ? 'n/a' : t.sigmaLevel.toFixed(3));
    }
    if (withConditions) row.push(p.limitingCondition === null ? '-' : `${p.limitingCondition.sigma} / ${p.limitingCondition.yield}`);
    if (p.meetsTarget.sigma !== null) row.push(p.meetsTarget.sigma);
    if (p.meetsTarget.yield !== null) row.push(p.meetsTarget.yield);
    return row;
  });
  const lines = [
    `${r.design.name}  (${r.design.topology} stage) sweeping ${f.path}: ${r.points.length} points${r.log ? ' (log spacing)' : ''}, ${r.samples} Monte Carlo samples per point, seed ${r.seed} at every point`,
    ...(withConditions ? ['with operating conditions: each sigma is the largest over the conditions and each yield the all-conditions yield (an instance passes only if it passes at every condition)'] : []),
    '',
    renderTable(header, rows, header.map((_, i) => (i === 0 ? 'left' : 'right'))),
  ];
  if (hasTail) lines.push(`note: yields and chip yields are 1 - p and (1 - p)^instances of the importance-sampling failure p (IS failure); MC sigma from ${r.samples} Monte Carlo samples`);
  if (r.points.some((p) => p.importance?.method === 'monte-carlo')) {
    lines.push('note: (MC): the spec lies inside the bulk of the distribution there, so the failure is a plain Monte Carlo estimate with a Clopper-Pearson interval, and the row\'s yields are its Monte Carlo ones');
  }
  for (const n of r.notes) lines.push(`note: ${n}`);
  for (const w of r.warnings) lines.push(`warning: ${w}`);
  return lines.join('\n');
}

/** A real-valued CSV cell: shortest round-trip digits, always in exponent form, so a column has one format. */
const real = (x: number | null): string => (x === null ? '' : x.toExponential());
/** A count cell (whole numbers). */
const count = (x: number): string => String(x);

/** CSV of a sweep, SI units, one row per point; empty cells where a figure is not available. */
export function sweepCsv(r: SweepReport): string {
  const u = r.unit === '' ? r.field : `${r.field}_${r.unit}`;
  const col = figureText(r.figure).column;
  const header = [u, `analytic_sigma_${col}`, `mc_sigma_${col}`, `mc_sigma_lo_${col}`, `mc_sigma_hi_${col}`, 'samples', 'failures', 'yield_method', 'yield', 'yield_lo', 'yield_hi', 'chip_yield', 'chip_yield_lo', 'chip_yield_hi', 'is_failure', 'is_failure_lo', 'is_failure_hi', 'is_sigma_level'];
  const wholeNumbers = SWEEP_FIELDS.find((x) => x.path === r.field)?.integer === true;
  const rows = r.points.map((p) => {
    const m = p.monteCarlo;
    const y = p.yield;
    const t = p.importance;
    return [
      wholeNumbers ? count(p.value) : real(p.value),
      ...[p.analyticSigma, m.sigma, m.sigmaInterval[0], m.sigmaInterval[1]].map(real),
      count(m.samples),
      count(m.failures),
      y.method,
      ...[y.estimate, y.interval[0], y.interval[1], y.chipYield, y.chipYieldInterval[0], y.chipYieldInterval[1]].map(real),
      ...[t?.failure ?? null, t?.interval[0] ?? null, t?.interval[1] ?? null, t?.sigmaLevel ?? null].map(real),
    ].join(',');
  });
  return `${[header.join(','), ...rows].join('\n')}\n`;
}

/** A sweep as asked on the command line: options read and checked, the design and the point designs. */
interface SweepRequest {
  readonly common: ReturnType<typeof readCommon>;
  readonly design: Design;
  readonly f: SweepField;
  readonly values: number[];
  readonly designs: Design[];
  readonly notes: string[];
  readonly samples: number;
  readonly method: 'plain' | 'importance';
  readonly spec: number | undefined;
  readonly log: boolean;
  readonly targetSigma: number | null;
  readonly targetYield: number | null;
}

/**
 * Reads and checks the sweep's options and design, and builds the design at every point.
 * @throws InputError naming the option or design field at fault
 */
async function readSweepRequest(file: string, flags: SweepFlags, io: Io): Promise<SweepRequest> {
  const common = readCommon(flags);
  if (flags.vary === undefined) throw new InputError('--vary', 'missing; give the field to step, e.g. --vary input.w');
  const steps = flags.steps === undefined ? 5 : parseCount(flags.steps, '--steps', 2, 200, '5 or 11');
  const samples = flags.samples === undefined ? SWEEP_SAMPLES : parseCount(flags.samples, '--samples', 100, 1e9);
  const method = flags.method ?? 'plain';
  if (method !== 'plain' && method !== 'importance') throw new InputError('--method', `expected plain or importance, got "${method}"`);
  const targetYield = flags.targetYield === undefined ? null : parseFraction(flags.targetYield, '--target-yield', '0.999');
  if (flags.plot !== undefined && !flags.plot.toLowerCase().endsWith('.svg')) throw new InputError('--plot', `expected a file name ending in .svg, got "${flags.plot}"`);
  if (flags.csv !== undefined && !flags.csv.toLowerCase().endsWith('.csv')) throw new InputError('--csv', `expected a file name ending in .csv, got "${flags.csv}"`);
  const design = await loadDesign(file);
  const targetSigma = flags.targetSigma === undefined ? null : parseFigureOption(flags.targetSigma, '--target-sigma', design, 'sigma');
  const spec = readSpec(flags, design);
  warnUnitSlips(io, design, spec);
  const f = sweepField(flags.vary, design);
  const specPath = `spec.${stageDefinition(design.topology).figure.specKey}`;
  if (f.path === specPath && spec !== undefined) throw new InputError('--spec', `cannot be combined with --vary ${specPath}; drop one`);
  const from = parseEnd(flags.from, '--from', f);
  const to = parseEnd(flags.to, '--to', f);
  const log = flags.log === true;
  if (log && !(from > 0 && to > 0)) throw new InputError('--log', `needs --from and --to above 0, got ${shown(f, from)} and ${shown(f, to)}`);
  if (from === to) throw new InputError('--to', `equals --from (${shown(f, from)}); give a different last value`);
  const notes: string[] = [];
  let values = sweepValues(from, to, steps, log);
  if (f.integer) {
    const rounded = values.map((v) => Math.round(v));
    if (rounded.some((v, i) => v !== values[i])) notes.push(`${f.path} takes whole numbers: the values were rounded to ${rounded.join(', ')}`);
    values = rounded;
  }
  pointDesign(design, f, values[0]!, '--from');
  pointDesign(design, f, values[values.length - 1]!, '--to');
  const designs = values.map((v) => pointDesign(design, f, v, '--vary'));
  return { common, design, f, values, designs, notes, samples, method, spec, log, targetSigma, targetYield };
}

/** The sweep's report from its points: warnings given once where they hold everywhere, notes, targets judged per point. */
function sweepReport(req: SweepRequest, points: SweepPointResult[]): SweepReport {
  const { common, design, f, values, notes, samples, method, log, targetSigma, targetYield } = req;
  // A warning that holds at every point (a caution of the model itself) is given once, unprefixed.
  const everywhere = (w: string): boolean => points.length > 1 && points.every((p) => p.warnings.includes(w));
  const warnings = [...new Set(points.flatMap((p) => p.warnings.map((w) => (everywhere(w) ? w : `at ${f.path} = ${shown(f, values[p.index]!)}: ${w}`))))];
  const ownTemperature = (design.conditions ?? []).filter((c) => c.temperature !== undefined).map((c) => c.name);
  if (f.path === 'temperature' && ownTemperature.length > 0) {
    notes.push(`the conditions ${ownTemperature.join(', ')} set their own temperature, which the sweep does not change; the others follow it`);
  }
  if (points.some((p) => p.monteCarlo.limitedBySamples) && method === 'plain') {
    notes.push('some points saw fewer than 10 failures: their yields are limited by the sample count; add --method importance for high-sigma figures');
  }
  return {
    design: designSummary(design),
    figure: figureSummary(design),
    field: f.path,
    unit: f.siUnit,
    log,
    method,
    samples,
    seed: common.seed ?? DEFAULT_SEED,
    confidence: common.confidence,
    targets: { sigma: targetSigma, yield: targetYield },
    points: points.map((p) => ({
      ...p,
      value: values[p.index]!,
      meetsTarget: {
        sigma: targetSigma === null ? null : verdict(p.monteCarlo.sigmaInterval[0], p.monteCarlo.sigmaInterval[1], targetSigma),
        yield:
          targetYield === null
            ? null
            : p.importance !== null
              ? verdict(p.importance.interval[0], p.importance.interval[1], 1 - targetYield)
              : verdict(1 - p.yield.interval[1], 1 - p.yield.interval[0], 1 - targetYield),
      },
    })),
    notes,
    warnings,
  };
}

/** The sweep's SVG plot: sigma and failure probability against the field, with interval bars. */
async function sweepPlotSvg(req: SweepRequest, report: SweepReport): Promise<string> {
  const { design, f, values, log, targetSigma, targetYield } = req;
  const axis = plotAxis(f, values);
  const plotPoints: SweepPoint[] = report.points.map((p) => ({
    x: p.value,
    analyticSigma: p.analyticSigma,
    mcSigma: p.monteCarlo.sigma,
    mcSigmaLo: p.monteCarlo.sigmaInterval[0],
    mcSigmaHi: p.monteCarlo.sigmaInterval[1],
    yield: p.monteCarlo.yield,
    yieldLo: p.monteCarlo.yieldInterval[0],
    yieldHi: p.monteCarlo.yieldInterval[1],
    ...(p.importance === null ? {} : { tailFailure: p.importance.failure, tailLo: p.importance.interval[0], tailHi: p.importance.interval[1] }),
  }));
  // Loaded on demand, so a sweep without --plot does not load the plotting code.
  const { sweepSvg } = await import('../plot.js');
  return sweepSvg({
    title: `${design.name}: ${report.figure.label} against ${f.path}`,
    field: f.path,
    fieldUnit: axis.unit,
    xScale: axis.scale,
    log,
    points: plotPoints,
    ...(targetSigma === null ? {} : { sigmaTarget: targetSigma }),
    ...(targetYield === null ? {} : { yieldTarget: targetYield }),
    figure: plotFigure(report.figure),
  });
}

/** Registers `twinfet sweep`. */
export function registerSweep(program: Command, io: Io, setExit: (code: number) => void): void {
  withCommonOptions(
    program
      .command('sweep')
      .description('step one numeric design field and report analytic and Monte Carlo sigma and yield at each value')
      .argument('<design>', 'design file (YAML or JSON)')
      .option('--vary <FIELD>', 'the field to step: input.w, input.l, input.area (W L at fixed W/L), load.w, load.l, load.area, sources.current, tail, temperature, spec.offset (spec.error), spec.instances, process.n.avt, ...')
      .option('--from <A>', 'first value, with the field\'s unit, e.g. 1um, 5uA, "27 C"')
      .option('--to <B>', 'last value, e.g. 20um')
      .option('--steps <N>', 'number of values, ends included (default 5)')
      .option('--log', 'space the values evenly in log (both ends above 0), and draw a log axis')
      .option('--samples <N>', `Monte Carlo samples per point (default ${SWEEP_SAMPLES})`)
      .option('--method <M>', 'plain (default), or importance to add the high-sigma failure probability')
      .option('--spec <V>', "limit overriding the design's spec, e.g. 20mV (an offset) or 1% (a current error)")
      .option('--target-sigma <V>', 'a sigma target drawn on the plot and judged per point, e.g. 2mV (or 0.2%)')
      .option('--target-yield <Y>', 'a yield target drawn on the plot (as 1 - yield) and judged per point, e.g. 0.999')
      .option('--csv <FILE>', 'write one row per point (SI units)')
      .option('--plot <FILE.svg>', 'sigma and failure probability against the field, with interval bars'),
  ).action(async (file: string, flags: SweepFlags) => {
    const req = await readSweepRequest(file, flags, io);
    const { common, samples, method, spec } = req;
    const done = await withInterrupt(io, 'sweep', (signal, onProgress) =>
      sweepDesigns(req.designs, {
        samples,
        workers: common.workers,
        confidence: common.confidence,
        importance: method === 'importance',
        signal,
        onPoint: (d, t) => onProgress(d * samples, t * samples),
        ...(common.seed === undefined ? {} : { seed: common.seed }),
        ...(spec === undefined ? {} : { spec }),
      }),
    );
    if (!('value' in done)) {
      io.err('twinfet: sweep interrupted; nothing was printed or written');
      setExit(130);
      return;
    }
    const points: SweepPointResult[] = done.value;
    const report = sweepReport(req, points);
    assertFinite(report);
    if (flags.csv !== undefined) await writeOutputFile(flags.csv, '--csv', sweepCsv(report));
    if (flags.plot !== undefined) await writeOutputFile(flags.plot, '--plot', await sweepPlotSvg(req, report));
    if (flags.json === true) printJson(io, report);
    else {
      io.out(renderSweep(report, req.f));
      if (flags.csv !== undefined) io.out(`wrote ${flags.csv}`);
      if (flags.plot !== undefined) io.out(`wrote ${flags.plot}`);
    }
    setExit(0);
  });
}

import { formatQuantity, InputError, MISMATCH_PARAMETERS, stageDefinition, type Design, type MismatchParameter } from '@twinfet/core';
import { estimateHighSigma, type HighSigmaReport } from '@twinfet/montecarlo';
import type { Command } from 'commander';
import { readCommon, readSpec, withCommonOptions, type CommonFlags } from '../commonOptions.js';
import { designSummary, figureSummary, figureText, headerLine, sci } from '../describe.js';
import { loadDesign } from '../designFile.js';
import { warnUnitSlips } from '../unitWarnings.js';
import { parseCount, parseFraction } from '../options.js';
import { assertFinite, printJson, type Io } from '../output.js';
import { withInterrupt } from '../interrupt.js';
import { renderPairs, renderTable } from '../table.js';

interface TailFlags extends CommonFlags {
  relError?: string;
  samples?: string;
}

/** A sigma level: 3 decimals, or 3 significant figures below 0.1 (a spec inside the bulk). */
const sig = (x: number | null): string => (x === null ? 'unbounded' : x > 0 && x < 0.1 ? x.toPrecision(3) : x.toFixed(3));

/** A probability, or near 1 as 1 - q (4 significant figures would round 0.99998 to 1). */
const prob = (p: number, complement = p > 0.999): string => (p === 1 ? '1' : complement ? `1 - ${sci(1 - p, 4)}` : sci(p, 4));

/** An estimate and its interval in one form: all as 1 - q when any of them is above 0.999. */
function probWithInterval(p: number, iv: readonly [number, number], c: string): string {
  const complement = [p, iv[0], iv[1]].some((v) => v > 0.999);
  return `${prob(p, complement)}   ${c} [${prob(iv[0], complement)}, ${prob(iv[1], complement)}]`;
}

/** A chip yield (1 - p)^M; below the doubles' range as a power of ten from M log10(1 - p). */
function chipYieldText(chipYield: number, failure: number, instances: number): string {
  if (chipYield >= 1e-300) return sci(chipYield, 4);
  return failure >= 1 ? '0 (every instance fails)' : `10^${((instances * Math.log1p(-failure)) / Math.LN10).toFixed(0)}`;
}

/** The design-point table (with a condition column when the failure is over conditions). */
function pointsTable(rows: string[][], union: boolean): string {
  const header = [...(union ? ['condition'] : []), 'side', 'distance', 'FORM p', 'found by', 'dominant mismatch'];
  return renderTable(header, rows, [...(union ? ['left' as const] : []), 'left', 'right', 'right', 'left', 'left']);
}

/** Each condition's own failure probability from the union estimate's samples. */
function conditionRows(r: HighSigmaReport): string {
  const c = `${Math.round(r.confidence * 1000) / 10}%`;
  const rows = (r.conditions ?? []).map((x) => [x.name, sci(x.failureProbability, 4), `[${sci(x.interval[0], 4)}, ${sci(x.interval[1], 4)}]`, sci(x.form, 4)]);
  return renderTable(['condition', 'failure', `${c} interval`, 'FORM p'], rows);
}

/** Text form of a high-sigma estimate of the design's figure (also used inside `run --method importance`). */
export function renderTail(r: HighSigmaReport, design: Pick<Design, 'topology'>): string {
  const f = figureText(stageDefinition(design.topology).figure);
  const c = `${Math.round(r.confidence * 1000) / 10}%`;
  const union = r.conditions !== undefined;
  const pts = r.designPoints.map((p) => {
    const top = [...p.coordinates].sort((a, b) => Math.abs(b.u) - Math.abs(a.u)).slice(0, 4);
    return [
      ...(union ? [p.condition ?? '-'] : []),
      p.side,
      p.distance.toFixed(4),
      sci(p.form, 4),
      p.method,
      top.map((t) => `${t.device} ${t.parameter === 'vt' ? `dV_T ${formatQuantity(t.deviation, 'V', 3)}` : `${MISMATCH_PARAMETERS[t.parameter as MismatchParameter].label} ${(t.deviation * 100).toPrecision(3)}%`} (${t.u.toFixed(2)} sigma)`).join(', '),
    ];
  });
  if (r.belowDoubleRange) {
    return [
      renderPairs([
        [`spec ${f.magnitude} <=`, f.format(r.spec)],
        ['failure probability', `below the smallest double (about 1e-308): no sample can weigh it, so none was drawn`],
        ['equivalent sigma level', `${sig(r.sigmaLevel)} (two-sided, from the failure points' distances, FORM)`],
      ]),
      '',
      'most probable failure points (standard-normal space; the largest coordinates)',
      pointsTable(pts, union),
    ].join('\n');
  }
  const plain = r.method === 'monte-carlo';
  const instances = `${r.chip.instances} instance${r.chip.instances === 1 ? '' : 's'}`;
  // When nearly every chip fails, 1 - 1e-80 would print as 1: show the chip yield instead.
  const chip: [string, string] =
    r.chip.failure > 0.5
      ? [
          `chip yield (${instances})`,
          `${chipYieldText(r.chip.yield, r.failureProbability, r.chip.instances)}   ${c} [${chipYieldText(r.chip.yieldInterval[0], r.interval[1], r.chip.instances)}, ${chipYieldText(r.chip.yieldInterval[1], r.interval[0], r.chip.instances)}]`,
        ]
      : [`chip failure (${instances})`, `${sci(r.chip.failure, 4)}   ${c} [${sci(r.chip.interval[0], 4)}, ${sci(r.chip.interval[1], 4)}]`];
  const halfWidth = r.relativeHalfWidth === null ? 'n/a' : `${Number((r.relativeHalfWidth * 100).toPrecision(3))}%`;
  // Mirror-image regions (a selector's competitors) are named as such; a one-sided figure has one side.
  const somewhere = union ? ' somewhere' : '';
  const regions: [string, string][] =
    r.mirrorRegions !== undefined
      ? [['failure regions', `${r.mirrorRegions} mirror images of one another (${r.designPoints[0]?.side ?? ''} and the like), one mixture centre each; the first one's point is shown${union ? ' for each condition' : ''}`]]
      : f.magnitude === f.symbol
        ? []
        : [['by side', `+spec${somewhere} ${sci(r.high, 4)}, -spec${somewhere} ${sci(r.low, 4)}`]];
  return [
    renderPairs([
      ...(plain ? [['method', `plain Monte Carlo with a Clopper-Pearson interval: ${r.methodReason ?? ''}. For the whole distribution use \`twinfet run\``] as [string, string]] : []),
      [`spec ${f.magnitude} <=`, f.format(r.spec)],
      ['failure probability', `${probWithInterval(r.failureProbability, r.interval, c)}${plain ? ' (Clopper-Pearson)' : ''}`],
      ['equivalent sigma level', `${sig(r.sigmaLevel)}   ${c} [${sig(r.sigmaLevelInterval[0])}, ${sig(r.sigmaLevelInterval[1])}] (two-sided)`],
      ...(union
        ? ([['over', `all ${r.conditions!.length} conditions: a sample fails when it fails at one condition at least (${plain ? 'the same draws at every condition' : "mixture over every condition's failure points"})`]] as [string, string][])
        : []),
      ...regions,
      [
        union ? 'FORM estimate (sum over conditions)' : r.mirrorRegions === undefined ? 'FORM estimate' : 'FORM estimate (sum over regions)',
        `${prob(r.form.failureProbability)} (${union ? "Boole's bound on the union of the linearised regions; " : ''}${sig(r.form.sigmaLevel)} sigma)`,
      ],
      chip,
      ['samples', `${r.samples} (${r.hits} failing; stop rule ${r.stopRule}; relative half-width ${halfWidth})`],
      ...(plain
        ? []
        : [['figure of merit', `relative variance per sample ${r.relativeVariancePerSample === null ? 'n/a' : r.relativeVariancePerSample.toFixed(2)}; plain Monte Carlo would need ${r.equivalentPlainSamples === null ? 'n/a' : sci(r.equivalentPlainSamples, 3)} samples for the same interval`] as [string, string]]),
      ['time', `${r.seconds.toFixed(3)} s, seed ${r.seed}`],
    ]),
    '',
    ...(union ? [`each condition on its own (the same ${plain ? '' : 'weighted '}samples)`, conditionRows(r), ''] : []),
    'most probable failure points (standard-normal space; the largest coordinates)',
    pointsTable(pts, union),
    ...(r.nonConverged > 0 ? [`warning: ${r.nonConverged} sample(s) whose balance solve did not converge were left out`] : []),
  ].join('\n');
}

/**
 * The report with each design point's figure value under the figure's own name (`offset` for the
 * differential stages, so their output is unchanged; `currentError` for a current mirror).
 */
function figureNamed(r: HighSigmaReport, design: Pick<Design, 'topology'>): Record<string, unknown> {
  const name = stageDefinition(design.topology).figure.name;
  if (name === 'offset') return { ...r };
  return {
    ...r,
    designPoints: r.designPoints.map((p) => {
      const { offset, ...rest } = p;
      return { ...rest, [name]: offset };
    }),
  };
}

/** Registers `twinfet tail`. */
export function registerTail(program: Command, io: Io, setExit: (code: number) => void): void {
  withCommonOptions(
    program
      .command('tail')
      .description('high-sigma failure probability P(|Vos| > spec) (or of the current error, or P(L > separation) for a selector) by importance sampling about the most probable failure points')
      .argument('<design>', 'design file (YAML or JSON)')
      .option('--spec <V>', "limit overriding the design's spec, e.g. 20mV (an offset) or 1% (a current error)")
      .option('--rel-error <E>', 'stop when the interval half-width is this fraction of the estimate (default 0.05)')
      .option('--samples <N>', 'a fixed sample count instead of the relative-error rule'),
  ).action(async (file: string, flags: TailFlags) => {
    const common = readCommon(flags);
    if (flags.relError !== undefined && flags.samples !== undefined) {
      throw new InputError('--rel-error', 'give either --rel-error or --samples, not both');
    }
    const relError = flags.relError === undefined ? undefined : parseFraction(flags.relError, '--rel-error', '0.05');
    const samples = flags.samples === undefined ? undefined : parseCount(flags.samples, '--samples', 100, 1e10);
    const design = await loadDesign(file);
    const spec = readSpec(flags, design);
    warnUnitSlips(io, design, spec);
    const done = await withInterrupt(io, 'tail', (signal, onProgress) =>
      estimateHighSigma(design, {
        workers: common.workers,
        confidence: common.confidence,
        signal,
        onProgress,
        ...(common.seed === undefined ? {} : { seed: common.seed }),
        ...(spec === undefined ? {} : { spec }),
        ...(relError === undefined ? {} : { relError }),
        ...(samples === undefined ? {} : { samples }),
      }),
    );
    if (!('value' in done)) {
      // An interrupted estimate has no honest interval to give (the stop rule never ran).
      io.err('twinfet: tail interrupted before the estimate reached its stop rule; nothing was printed');
      setExit(130);
      return;
    }
    const report = done.value;
    assertFinite(report);
    if (flags.json === true) printJson(io, { design: designSummary(design), figure: figureSummary(design), ...figureNamed(report, design) });
    else {
      io.out(`${headerLine(design)}\n${report.method === 'monte-carlo' ? 'plain Monte Carlo' : 'importance sampling'} on the exact model\n\n${renderTail(report, design)}`);
    }
    setExit(0);
  });
}

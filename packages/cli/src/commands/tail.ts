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

const sig = (x: number | null): string => (x === null ? 'unbounded' : x.toFixed(3));

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
  return [
    renderPairs([
      [`spec ${f.magnitude} <=`, f.format(r.spec)],
      ['failure probability', `${sci(r.failureProbability, 4)}   ${c} [${sci(r.interval[0], 4)}, ${sci(r.interval[1], 4)}]`],
      ['equivalent sigma level', `${sig(r.sigmaLevel)}   ${c} [${sig(r.sigmaLevelInterval[0])}, ${sig(r.sigmaLevelInterval[1])}] (two-sided)`],
      ...(union
        ? ([
            ['over', `all ${r.conditions!.length} conditions: a sample fails when it fails at one condition at least (mixture over every condition's failure points)`],
            ['by side', `+spec somewhere ${sci(r.high, 4)}, -spec somewhere ${sci(r.low, 4)}`],
            ['FORM estimate', `${sci(r.form.failureProbability, 4)} (sum over the failure points: Boole's bound on the union of the linearised regions; ${r.form.sigmaLevel.toFixed(3)} sigma)`],
          ] as [string, string][])
        : ([
            ['by side', `+spec ${sci(r.high, 4)}, -spec ${sci(r.low, 4)}`],
            ['FORM estimate', `${sci(r.form.failureProbability, 4)} (${r.form.sigmaLevel.toFixed(3)} sigma)`],
          ] as [string, string][])),
      [`chip failure (${r.chip.instances} instance${r.chip.instances === 1 ? '' : 's'})`, `${sci(r.chip.failure, 4)}   ${c} [${sci(r.chip.interval[0], 4)}, ${sci(r.chip.interval[1], 4)}]`],
      ['samples', `${r.samples} (${r.hits} failing; stop rule ${r.stopRule}; relative half-width ${r.relativeHalfWidth === null ? 'n/a' : (r.relativeHalfWidth * 100).toFixed(2) + '%'})`],
      ['figure of merit', `relative variance per sample ${r.relativeVariancePerSample === null ? 'n/a' : r.relativeVariancePerSample.toFixed(2)}; plain Monte Carlo would need ${r.equivalentPlainSamples === null ? 'n/a' : sci(r.equivalentPlainSamples, 3)} samples for the same interval`],
      ['time', `${r.seconds.toFixed(3)} s, seed ${r.seed}`],
    ]),
    '',
    ...(union ? ['each condition on its own (the same weighted samples)', conditionRows(r), ''] : []),
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
      .description('high-sigma failure probability P(|Vos| > spec) (or of the current error) by importance sampling about the most probable failure points')
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
      io.out(`${headerLine(design, { withTemperature: false })}\nimportance sampling on the exact model\n\n${renderTail(report, design)}`);
    }
    setExit(0);
  });
}

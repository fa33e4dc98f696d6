import { compileConditions, compileStage, conditionSummary, defaultDriftPair, formatQuantity, namedDriftPair, stageDefinition, type Design, type Stage } from '@twinfet/core';
import { linearisedDriftSigma, linearisedEstimate, linearisedSummary, chipFailure, type LinearisedSummary, type SelectionSummary } from '@twinfet/montecarlo';
import { renderPairs, renderTable } from '../table.js';
import { designSummary, figureSummary, figureText, headerLine, pct, sci, shareLabel } from '../describe.js';
import type { Command } from 'commander';
import { loadDesign } from '../designFile.js';
import { warnUnitSlips } from '../unitWarnings.js';
import { assertFinite, printJson, type Io } from '../output.js';
import { celsius, driftText, fieldCell, fieldColumns, shiftText } from '../conditionsText.js';
import { parseDrift } from './run.js';

/** The inspect report: operating point and the linearised picture of the stage's figure. */
export interface InspectReport {
  readonly design: ReturnType<typeof designSummary>;
  /** What the sigmas and the spec are of (`offset` in volts, `currentError` as a fraction). */
  readonly figure: ReturnType<typeof figureSummary>;
  readonly operatingPoint: Stage['operatingPoint'];
  /** Resistor rows, for stages that have resistors. */
  readonly resistors?: NonNullable<Stage['resistors']>;
  readonly analytic: LinearisedSummary;
  /** With conditions: the linearised sigma and the law's (Gaussian, Bechhofer) yield at each (the design's own values inherited). */
  readonly conditions?: readonly (Readonly<Record<string, unknown>> & {
    readonly name: string;
    readonly temperature: number;
    readonly linearised: { readonly sigma: number; readonly law: string; readonly yield: number; readonly failure: number };
  })[];
  /** With conditions: the linearised sigma of the drift between two of them (null when none is taken). */
  readonly drift?: null | { readonly from: string; readonly to: string; readonly fromTemperature: number; readonly toTemperature: number; readonly linearisedSigma: number };
  readonly warnings: readonly string[];
}

/**
 * Builds the inspect report of a design; `drift` names the two conditions of the drift
 * (default: the coldest and hottest that differ only in temperature).
 */
export function inspectDesign(design: Design, drift?: readonly [string, string]): InspectReport {
  const stage = compileStage(design);
  const at = compileConditions(design);
  const pair = drift !== undefined ? namedDriftPair(stage.design, drift, '--drift') : at.length > 0 ? defaultDriftPair(stage.design) : null;
  const conditions = at.map((c) => {
    const summary = linearisedSummary(c.stage);
    const lin = linearisedEstimate(summary);
    return {
      ...conditionSummary(stage.design, c.condition),
      name: c.condition.name,
      temperature: c.design.temperature,
      linearised: { sigma: summary.sigma, law: lin.name, yield: 1 - lin.failure, failure: lin.failure },
    };
  });
  return {
    design: designSummary(design),
    figure: figureSummary(design),
    operatingPoint: stage.operatingPoint,
    ...(stage.resistors === undefined ? {} : { resistors: stage.resistors }),
    analytic: linearisedSummary(stage),
    ...(at.length === 0
      ? {}
      : {
          conditions,
          drift:
            pair === null
              ? null
              : {
                  from: at[pair.from]!.condition.name,
                  to: at[pair.to]!.condition.name,
                  fromTemperature: at[pair.from]!.design.temperature,
                  toTemperature: at[pair.to]!.design.temperature,
                  linearisedSigma: linearisedDriftSigma(at[pair.from]!.stage, at[pair.to]!.stage),
                },
        }),
    warnings: [...stage.warnings, ...at.flatMap((c) => c.stage.warnings.filter((w) => !stage.warnings.includes(w)).map((w) => `at condition ${c.condition.name}: ${w}`))],
  };
}

/** The operating-point table (shared by the commands that print it). */
export function renderOperatingPoint(ops: Stage['operatingPoint']): string {
  const hasCap = ops.some((o) => o.gateCapacitance !== undefined);
  const header = ['device', 'role', 'W', 'L', 'I_D', 'IC', 'region', 'gm/I_D', 'V_GS-V_T0', 'W*L', 'sigma dV_T', 'sigma dbeta/beta'];
  if (hasCap) header.push('C_gate');
  const rows = ops.map((o) => {
    const r = [
      `${o.device} (${o.polarity})`,
      o.role,
      formatQuantity(o.w, 'm', 3),
      formatQuantity(o.l, 'm', 3),
      formatQuantity(o.current, 'A', 4),
      sci(o.ic, 3),
      o.region,
      `${o.gmOverId.toPrecision(4)} /V`,
      formatQuantity(o.overdrive, 'V', 3),
      `${(o.gateArea * 1e12).toPrecision(4)} um^2`,
      formatQuantity(o.sigmaVt, 'V', 4),
      pct(o.sigmaBeta, 3),
    ];
    if (hasCap) r.push(o.gateCapacitance === undefined ? '-' : formatQuantity(o.gateCapacitance, 'F', 3));
    return r;
  });
  return renderTable(header, rows, header.map((_, c) => (c <= 1 || c === 6 ? 'left' : 'right')));
}

/** The resistor table (stages with load resistors). */
export function renderResistors(rows: NonNullable<Stage['resistors']>): string {
  const header = ['resistor', 'role', 'W', 'L', 'W*L', 'R', 'current', 'sigma dR/R', 'gain gm*R'];
  const body = rows.map((r) => [
    r.device,
    r.role,
    formatQuantity(r.w, 'm', 3),
    formatQuantity(r.l, 'm', 3),
    `${(r.area * 1e12).toPrecision(4)} um^2`,
    r.resistance === undefined ? '-' : formatQuantity(r.resistance, 'ohm', 4),
    formatQuantity(r.current, 'A', 4),
    pct(r.sigmaR, 3),
    r.voltageGain === undefined ? '-' : `${r.voltageGain.toPrecision(4)} V/V`,
  ]);
  return renderTable(header, body, header.map((_, c) => (c <= 1 ? 'left' : 'right')));
}

/**
 * The variance-budget table, in the unit of the stage's figure (of the figure's sigma^2, or of
 * the per-cell sigma_c^2 of a selector's Bechhofer form).
 */
export function renderBudget(a: LinearisedSummary, design: Pick<Design, 'topology'>): string {
  const def = stageDefinition(design.topology);
  const f = figureText(def.figure);
  const whose = 'gaussian' in a ? undefined : 'each cell';
  const rows = a.grouped.map((g) => [shareLabel(g.role, g.parameter, def, whose), pct(g.share, 3), f.format(Math.sqrt(g.variance))]);
  return renderTable(['contribution', `share of ${whose === undefined ? 'sigma' : 'sigma_c'}^2`, 'sigma part'], rows);
}

/** The linearised lines of a selector (Bechhofer's form) for inspect and run. */
export function selectionPairs(a: SelectionSummary, format: (x: number) => string): [string, string][] {
  const y = a.yield;
  const needed = a.leadFor.map((l) => `${l.probability}: ${format(l.lead)}`).join(', ');
  return [
    ['per-cell sigma sigma_c', `${format(a.cellSigma)}  (cell i's input offset dV_T,i - (I_D/gm) dbeta_i/beta at the tie, I_B/N each)`],
    [`spec L <=`, `${format(y.spec)}  (tau = spec / sigma_c = ${y.tau.toFixed(4)}, ${y.populations} cells)`],
    ['Bechhofer correct selection', `${yieldFromFailure(y.failure)}  (wrong selection ${sci(y.failure, 4)})`],
    [`Bechhofer chip yield (${y.chipInstances} selector${y.chipInstances === 1 ? '' : 's'})`, yieldFromFailure(chipFailure(y.failure, y.chipInstances))],
    ['lead needed for P(correct)', needed],
    [`lead needed for chip yield ${a.chipLeadFor.chipYield}`, `${format(a.chipLeadFor.lead)} over ${a.chipLeadFor.instances} selector${a.chipLeadFor.instances === 1 ? '' : 's'}`],
  ];
}

/** Text form of the inspect report. */
export function renderInspect(r: InspectReport): string {
  const a = r.analytic;
  const f = figureText(r.figure);
  let linearised: [string, string][];
  if ('gaussian' in a) {
    const g = a.gaussian;
    linearised = [
      [`${f.label} sigma (linearised)`, f.format(a.sigma)],
      [`spec ${f.magnitude} <=`, `${f.format(g.spec)}  (${g.sigmaLevel.toFixed(3)} sigma)`],
      ['Gaussian instance yield', `${yieldFromFailure(g.failure)}  (failure ${sci(g.failure, 4)})`],
      [`Gaussian chip yield (${g.chipInstances} instance${g.chipInstances === 1 ? '' : 's'})`, yieldFromFailure(chipFailure(g.failure, g.chipInstances))],
    ];
  } else {
    linearised = [[`${f.label} (linearised)`, `mean ${f.format(a.mean)}, sigma ${f.format(a.sigma)}`], ...selectionPairs(a, f.format)];
  }
  const parts = [
    headerLine(r.design, { stageWord: false }),
    '',
    renderOperatingPoint(r.operatingPoint),
    ...(r.resistors === undefined ? [] : ['', renderResistors(r.resistors)]),
    '',
    renderPairs(linearised),
    '',
    renderBudget(a, r.design),
  ];
  if (r.conditions !== undefined) parts.push('', renderInspectConditions(r));
  for (const w of r.warnings) parts.push(`warning: ${w}`);
  return parts.join('\n');
}

/** Decimal places that show a yield's failure part to 3 significant figures (4 to 15). */
export function yieldDigits(y: number): number {
  const f = 1 - y;
  return f <= 0 ? 15 : Math.min(15, Math.max(4, Math.ceil(-Math.log10(f)) + 2));
}

/**
 * A computed yield printed with enough nines to see the tail (`digits` to align several); a
 * yield below 0.1 to 4 significant figures (scientific below 1e-3), since fixed decimals would print 8e-8 as 0.0000.
 */
export function yieldText(y: number, digits = yieldDigits(y)): string {
  if (1 - y <= 0) return '1 (failure below double precision)';
  if (y < 0.1) return sci(y, 4);
  return y.toFixed(digits);
}

/** An estimated yield or an interval end: exactly 1 prints as 1 (no failures seen, or the end of an interval). */
export function yieldBound(y: number, digits: number): string {
  return y === 1 ? '1' : yieldText(y, digits);
}

/** A yield given by its failure probability: `1 - 5.16e-33` once the nines stop being readable. */
export function yieldFromFailure(failure: number): string {
  return failure < 1e-9 ? `1 - ${failure.toExponential(3)}` : yieldText(1 - failure);
}

/** The conditions' part of the inspect report: linearised sigma and the law's yield at each, and the linearised drift. */
export function renderInspectConditions(r: InspectReport): string {
  const rows = r.conditions ?? [];
  const fig = stageDefinition(r.design.topology).figure;
  const format = figureText(fig).format;
  const cols = fieldColumns(r.design, rows);
  const hasShift = rows.some((x) => x['shift'] !== undefined);
  const worst = Math.max(...rows.map((x) => x.linearised.failure));
  const digits = yieldDigits(1 - worst);
  // Readable nines down to 1e-9 of failure, as elsewhere; beyond, or where the table's decimals
  // would round a failure away, `1 - p`.
  const gaussian = (p: number): string => {
    if (worst < 1e-9) return yieldFromFailure(p);
    const text = yieldText(1 - p, digits);
    return p > 0 && Number(text) === 1 ? `1 - ${p.toExponential(3)}` : text;
  };
  const header = ['condition', 'temperature', ...cols.map((x) => x.path), ...(hasShift ? ['shift'] : []), 'linearised sigma', `${rows[0]?.linearised.law ?? 'Gaussian'} yield`];
  const body = rows.map((x) => [
    x.name,
    celsius(x.temperature),
    ...cols.map((col) => fieldCell(col.f, col.get(x))),
    ...(hasShift ? [shiftText(x['shift'])] : []),
    format(x.linearised.sigma),
    gaussian(x.linearised.failure),
  ]);
  const left = new Set([0, ...(hasShift ? [2 + cols.length] : [])]);
  const d = r.drift;
  return [
    `operating conditions (linearised, the same mismatch at each; \`twinfet run\` gives the all-conditions yield)`,
    renderTable(header, body, header.map((_, i) => (left.has(i) ? 'left' : 'right'))),
    d === undefined || d === null
      ? 'drift: none (no two conditions differ only in temperature; choose two with --drift A,B)'
      : `drift ${d.from} -> ${d.to} (${celsius(d.fromTemperature)} to ${celsius(d.toTemperature)}): linearised sigma ${driftText(fig, d.linearisedSigma)}`,
  ].join('\n');
}

/** Registers `twinfet inspect`. */
export function registerInspect(program: Command, io: Io, setExit: (code: number) => void): void {
  program
    .command('inspect')
    .description('operating point, linearised offset sigma, variance budget and Gaussian yield of a design')
    .argument('<design>', 'design file (YAML or JSON)')
    .option('--json', 'print one JSON object instead of tables')
    .option('--drift <A,B>', 'the two conditions of the linearised drift, e.g. cold,hot (default: the coldest and hottest that differ only in temperature)')
    .action(async (file: string, opts: { json?: boolean; drift?: string }) => {
      const drift = parseDrift(opts.drift);
      const design = await loadDesign(file);
      warnUnitSlips(io, design);
      const report = inspectDesign(design, drift);
      assertFinite(report);
      if (opts.json === true) printJson(io, report);
      else io.out(renderInspect(report));
      setExit(0);
    });
}

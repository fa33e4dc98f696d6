/**
 * The operating conditions in the text reports: one compact table (a row per condition), the
 * all-conditions yield and the drift, written from the figure's description (volts, or % for a
 * dimensionless figure) and the stage's own fields, never from the stage type.
 */
import { conditionFields, formatQuantity, stageDefinition, ZERO_CELSIUS_K, type Design, type FieldDefinition } from '@twinfet/core';
import type { ConditionResult, DriftReport, RunReport } from '@twinfet/montecarlo';
import { figureText, type FigureText } from './describe.js';
import { renderTable } from './table.js';

/** A temperature in kelvin as Celsius text (`-40 C`). */
export function celsius(kelvin: number): string {
  return `${Number((kelvin - ZERO_CELSIUS_K).toFixed(2))} C`;
}

/** A drift value in the figure's unit per kelvin (`1.868 uV/K`), a dimensionless figure's in ppm/K (`4.465 ppm/K`). */
export function driftText(fig: { readonly unit: string }, x: number): string {
  return fig.unit === '' ? `${Number((1e6 * x).toPrecision(4))} ppm/K` : formatQuantity(x, `${fig.unit}/K`, 4);
}

/** A condition's shifts as text (`n kp -10%, p vt0 +20 mV`), '-' when it has none. */
export function shiftText(shift: unknown): string {
  if (typeof shift !== 'object' || shift === null) return '-';
  const parts: string[] = [];
  for (const pol of ['n', 'p'] as const) {
    const s = (shift as Record<string, { kp?: number; vt0?: number } | undefined>)[pol];
    if (s === undefined) continue;
    if (s.kp !== undefined) parts.push(`${pol} kp ${s.kp >= 0 ? '+' : ''}${Number((s.kp * 100).toPrecision(4))}%`);
    if (s.vt0 !== undefined) parts.push(`${pol} vt0 ${s.vt0 >= 0 ? '+' : ''}${formatQuantity(s.vt0, 'V', 3)}`);
  }
  return parts.length === 0 ? '-' : parts.join(', ');
}

/** The condition-settable fields shown as columns: path, definition and how to read the value from a condition entry. */
export function fieldColumns(design: Pick<Design, 'topology'>, rows: readonly Readonly<Record<string, unknown>>[]): { path: string; f: FieldDefinition; get: (r: Readonly<Record<string, unknown>>) => number | undefined }[] {
  const cf = conditionFields(stageDefinition(design.topology));
  const cols = [
    ...cf.top.map((f) => ({ path: f.key, f, get: (r: Readonly<Record<string, unknown>>) => r[f.key] as number | undefined })),
    ...cf.blocks.flatMap(({ block, fields }) =>
      fields.map((f) => ({ path: `${block.key}.${f.key}`, f, get: (r: Readonly<Record<string, unknown>>) => (r[block.key] as Record<string, number> | undefined)?.[f.key] })),
    ),
  ];
  return cols.filter((c) => rows.some((r) => c.get(r) !== undefined));
}

/** A field's value as a table cell, '-' when absent. */
export const fieldCell = (f: FieldDefinition, v: number | undefined): string => (v === undefined ? '-' : f.unit === '' ? String(v) : formatQuantity(v, f.unit, 4));

/** Yield text with `digits` decimals; exactly 1 (no failure seen) as 1. */
const yieldCell = (y: number, digits: number): string => (y === 1 ? '1' : y.toFixed(digits));

/**
 * The per-condition table of a run; `digitsFor(y)` is the report's rule for the decimals that
 * show a yield's failure part (one number of decimals for the whole table).
 */
export function renderConditionTable(r: RunReport, design: Pick<Design, 'topology'>, digitsFor: (y: number) => number): string {
  const rows = r.conditions ?? [];
  const f = figureText(r.figure);
  const c = `${Math.round(r.yield.confidence * 1000) / 10}%`;
  const cols = fieldColumns(design, rows);
  // One number of decimals for the whole table: three figures of the largest failure shown.
  const digits = digitsFor(Math.min(...rows.map((x) => x.yield.interval[0])));
  const hasShift = rows.some((x) => x['shift'] !== undefined);
  const header = [
    'condition',
    'temperature',
    ...cols.map((x) => x.path),
    ...(hasShift ? ['shift'] : []),
    'mean',
    'sigma',
    `${c} interval`,
    'linearised',
    'yield',
    `${c} interval`,
    'fails here',
    'only here',
  ];
  const body = rows.map((x: ConditionResult) => [
    x.name,
    celsius(x.temperature),
    ...cols.map((col) => fieldCell(col.f, col.get(x))),
    ...(hasShift ? [shiftText(x['shift'])] : []),
    f.format(x.offset.mean),
    f.format(x.offset.sigma),
    `[${f.format(x.offset.sigmaInterval[0])}, ${f.format(x.offset.sigmaInterval[1])}]`,
    f.format(x.linearised.sigma),
    yieldCell(x.yield.estimate, digits),
    `[${yieldCell(x.yield.interval[0], digits)}, ${yieldCell(x.yield.interval[1], digits)}]`,
    String(x.failing),
    String(x.onlyFailing),
  ]);
  const left = new Set([0, ...(hasShift ? [2 + cols.length] : [])]);
  return renderTable(header, body, header.map((_, i) => (left.has(i) ? 'left' : 'right')));
}

/** The drift lines of a run. */
export function renderDrift(d: DriftReport, fig: RunReport['figure'], confidence: number): string {
  const c = `${Math.round(confidence * 1000) / 10}%`;
  const t: FigureText = figureText(fig);
  const q = d.quantiles.map((x) => `${x.p * 100}% ${x.value === null ? 'beyond' : driftText(fig, x.value)}`).join(', ');
  return [
    `drift ${d.from} -> ${d.to} (${celsius(d.fromTemperature)} to ${celsius(d.toTemperature)}), per sample (${t.symbol}(${d.to}) - ${t.symbol}(${d.from})) / (T_${d.to} - T_${d.from}):`,
    `  mean ${driftText(fig, d.mean)}, sigma ${driftText(fig, d.sigma)}   ${c} [${driftText(fig, d.sigmaInterval[0])}, ${driftText(fig, d.sigmaInterval[1])}], linearised ${driftText(fig, d.linearisedSigma)}`,
    `  quantiles (${d.quantileMethod === 'exact' ? 'exact' : 'from the histogram'}): ${q}`,
    `  correlation between the ${t.label} at ${d.from} and the drift: ${d.correlation === null ? 'n/a (one of them does not vary)' : d.correlation.toFixed(4)}`,
  ].join('\n');
}

/** The conditions' part of the run report: the table, the all-conditions yield, the drift. */
export function renderRunConditions(r: RunReport, design: Pick<Design, 'topology'>, digitsFor: (y: number) => number): string {
  const rows = r.conditions ?? [];
  const lines = [
    `operating conditions: every sample at each of ${rows.length} condition${rows.length === 1 ? '' : 's'} from the same mismatch draws ("fails here": of the instances failing somewhere, those failing at this condition; "only here": failing at it alone)`,
    renderConditionTable(r, design, digitsFor),
  ];
  if (r.drift !== undefined && r.drift !== null) lines.push('', renderDrift(r.drift, r.figure, r.yield.confidence));
  else lines.push('', 'drift: none taken (no two conditions differ only in temperature; choose two with --drift A,B)');
  return lines.join('\n');
}


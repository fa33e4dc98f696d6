import { formatQuantity, stageDefinition, ZERO_CELSIUS_K, type Design } from '@twinfet/core';

/** The design as the reports echo it (SI units): common keys, the stage's fields and blocks, the spec. */
export function designSummary(d: Design) {
  const def = stageDefinition(d.topology);
  const own: Record<string, unknown> = {};
  for (const f of def.fields) if (d[f.key] !== undefined) own[f.key] = d[f.key];
  for (const b of def.blocks) own[b.key] = b.key === 'input' ? d.input : d[b.key];
  return {
    name: d.name,
    topology: d.topology,
    temperature: d.temperature,
    temperatureC: d.temperature - ZERO_CELSIUS_K,
    ...own,
    spec: d.spec,
  };
}

/** The first line of every text report: name, stage type, its bias fields and the temperature. */
export function headerLine(
  d: Pick<Design, 'name' | 'topology' | 'temperature'> & Readonly<Record<string, unknown>>,
  { withTemperature = true, stageWord = true }: { withTemperature?: boolean; stageWord?: boolean } = {},
): string {
  const def = stageDefinition(d.topology);
  const parts = [stageWord ? `${d.topology} stage` : d.topology];
  for (const f of def.fields) {
    const v = d[f.key];
    if (typeof v === 'number') parts.push(f.integer === true ? `${v} ${f.key}` : `${formatQuantity(v, f.unit)} ${f.key}`);
  }
  if (withTemperature) parts.push(`${(d.temperature - ZERO_CELSIUS_K).toFixed(1)} C`);
  return `${d.name}  (${parts.join(', ')})`;
}

/** The words and number format of a stage's figure (`offset` in volts, a dimensionless figure in %). */
export interface FigureText {
  readonly label: string;
  readonly symbol: string;
  /** `|Vos|` for a two-sided figure, the symbol itself for a one-sided one. */
  readonly magnitude: string;
  readonly format: (x: number) => string;
}

/** How reports write values of the figure `f`. */
export function figureText(f: { readonly label: string; readonly symbol: string; readonly unit: string; readonly sided: 'two' | 'one' }): FigureText {
  const format = f.unit === '' ? (x: number): string => `${(100 * x).toPrecision(4)} %` : (x: number): string => formatQuantity(x, f.unit, 4);
  return { label: f.label, symbol: f.symbol, magnitude: f.sided === 'two' ? `|${f.symbol}|` : f.symbol, format };
}

/**
 * A run report as JSON for the command line: the figure's statistics under the figure's own
 * name (`offset` for the differential stages, so their output is unchanged).
 */
export function figureJson<T extends { readonly offset: unknown; readonly figure: { readonly name: string } }>(r: T): Record<string, unknown> {
  if (r.figure.name === 'offset') return r;
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(r)) out[k === 'offset' ? r.figure.name : k] = v;
  return out;
}

/** A fraction as a percentage with `digits` significant figures. */
export function pct(x: number, digits: number): string {
  return `${(100 * x).toPrecision(digits)} %`;
}

/** Compact scientific text for small or large plain numbers. */
export function sci(x: number, digits: number): string {
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a >= 1e-3 && a < 1e4 ? String(Number(x.toPrecision(digits))) : x.toExponential(digits - 1);
}

/**
 * Human label of a budget group (`input pair dV_T`, `load pair dR/R`); `whose` replaces
 * `<role> pair` where the budget is of one representative element (`each cell dV_T`).
 */
export function shareLabel(role: string, parameter: string, whose = `${role} pair`): string {
  const label = parameter === 'vt' ? 'dV_T' : parameter === 'r' ? 'dR/R' : 'dbeta/beta';
  return `${whose} ${label}`;
}

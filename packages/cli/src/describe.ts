import { formatQuantity, InputError, isInputError, parseQuantity, stageDefinition, ZERO_CELSIUS_K, type Design, type StageDefinition } from '@twinfet/core';

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
  /** The unit plots and histogram rows show, and the factor from the figure's SI value to it (mV, or %). */
  readonly display: { readonly unit: string; readonly scale: number };
  /** Suffix of CSV column names: the SI unit, or `rel` for a dimensionless figure. */
  readonly column: string;
  /** A value as an option takes it, for messages (`2mV`, `0.2%`). */
  readonly example: string;
}

/** A figure's description as reports need it (a FigureDefinition or a run report's `figure`). */
export type FigureDescription = { readonly label: string; readonly symbol: string; readonly unit: string; readonly sided: 'two' | 'one' };

/** How reports write values of the figure `f`. */
export function figureText(f: FigureDescription): FigureText {
  const dimensionless = f.unit === '';
  const format = dimensionless ? (x: number): string => `${(100 * x).toPrecision(4)} %` : (x: number): string => formatQuantity(x, f.unit, 4);
  return {
    label: f.label,
    symbol: f.symbol,
    magnitude: f.sided === 'two' ? `|${f.symbol}|` : f.symbol,
    format,
    display: dimensionless ? { unit: '%', scale: 100 } : f.unit === 'V' ? { unit: 'mV', scale: 1e3 } : { unit: f.unit, scale: 1 },
    column: dimensionless ? 'rel' : f.unit,
    example: dimensionless ? '0.2%' : f.unit === 'V' ? '2mV' : `1${f.unit}`,
  };
}

/** The figure as the plots show it (an offset in mV, a dimensionless figure in %). */
export function plotFigure(f: FigureDescription): { label: string; symbol: string; unit: string; scale: number } {
  const t = figureText(f);
  return { label: t.label, symbol: t.symbol, unit: t.display.unit, scale: t.display.scale };
}

/** The figure of a design's stage type, as the JSON reports name it. */
export function figureSummary(d: Pick<Design, 'topology'>): FigureDescription & { readonly name: string } {
  const f = stageDefinition(d.topology).figure;
  return { name: f.name, label: f.label, symbol: f.symbol, unit: f.unit, sided: f.sided };
}

/**
 * A value of the design's figure given on the command line (`--spec`, `--sigma`,
 * `--target-sigma`): a voltage for an offset, a plain number or percentage for a dimensionless
 * figure.
 * @throws InputError on `option`, with an example in the figure's unit
 */
export function parseFigureOption(text: string, option: string, design: Pick<Design, 'topology'>, what: 'limit' | 'sigma', voltExample = what === 'limit' ? '20mV' : '2mV'): number {
  const fig = stageDefinition(design.topology).figure;
  const example = fig.unit === 'V' ? voltExample : fig.unit === '' ? (what === 'limit' ? '1%' : '0.2%') : figureText(fig).example;
  let v: number;
  try {
    v = parseQuantity(text, fig.dimension, option);
  } catch (e) {
    // An offset keeps the unit parser's own message; a dimensionless figure says it takes a percentage.
    if (!isInputError(e) || fig.unit !== '') throw e;
    throw new InputError(option, `expected a ${fig.label} ${what} such as ${example} (a percentage or a plain fraction), got "${text}"`);
  }
  if (!(v > 0)) throw new InputError(option, `expected a positive ${fig.label} ${what} such as ${example}, got "${text}"`);
  return v;
}

/**
 * A run report as JSON for the command line: the figure's statistics under the figure's own
 * name (`offset` for the differential stages, so their output is unchanged).
 */
export function figureJson<T extends { readonly offset: unknown; readonly figure: { readonly name: string } }>(r: T): Record<string, unknown> {
  if (r.figure.name === 'offset') return r;
  const name = r.figure.name;
  const rename = (o: object): Record<string, unknown> => Object.fromEntries(Object.entries(o).map(([k, v]) => [k === 'offset' ? name : k, v]));
  const out = rename(r);
  // Each condition's statistics are named after the figure too.
  if (Array.isArray(out['conditions'])) out['conditions'] = (out['conditions'] as object[]).map(rename);
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
 * Human label of a budget group (`input pair dV_T`, `load pair dR/R`; `output device dV_T` for a
 * block of one element); `whose` replaces `<role> pair` where the budget is of one representative
 * element (`each cell dV_T` for a selector).
 */
export function shareLabel(role: string, parameter: string, def?: StageDefinition, whose?: string): string {
  const label = parameter === 'vt' ? 'dV_T' : parameter === 'r' ? 'dR/R' : 'dbeta/beta';
  if (whose !== undefined) return `${whose} ${label}`;
  const single = def?.blocks.find((b) => b.key === role)?.elements.length === 1;
  return `${role} ${single ? 'device' : 'pair'} ${label}`;
}

/** How many failures a run saw, in words: "no failures seen", "only 1 failure seen", "only 7 failures seen". */
export function seenText(failures: number): string {
  if (failures === 0) return 'no failures seen';
  return `only ${failures} failure${failures === 1 ? '' : 's'} seen`;
}

/**
 * The numeric design fields a sweep can step: their paths as written in a design file, what
 * they measure, how they are shown, and how a design is rebuilt with one of them changed.
 */
import { closestWord, InputError, lacksText, STAGES, stageDefinition, type Design, type Dimension, type Polarity, type StageDefinition } from '@twinfet/core';

/** A sweepable field. */
export interface SweepField {
  /** Design-file path, e.g. `input.w` or `process.n.avt`. */
  readonly path: string;
  readonly dimension: Dimension;
  /** SI unit for CSV headers (`m`, `A`, `V*m`; '' for plain numbers). */
  readonly siUnit: string;
  /** Unit the text table prints in (a `formatQuantity` unit). */
  readonly tableUnit: string;
  /** Whole numbers only (spec.instances): swept values are rounded. */
  readonly integer: boolean;
}

const PARAMS: readonly [string, Dimension, string, string][] = [
  ['vt0', 'voltage', 'V', 'V'],
  ['slope', 'dimensionless', '', ''],
  ['kp', 'kp', 'A/V^2', 'A/V^2'],
  ['avt', 'avt', 'V*m', 'mV*um'],
  ['abeta', 'abeta', 'm', '%*um'],
  ['rho', 'dimensionless', '', ''],
  ['cox', 'cox', 'F/m^2', 'fF/um^2'],
  ['min_w', 'length', 'm', 'm'],
  ['min_l', 'length', 'm', 'm'],
];

/** The SI field name of a process key (`min_w` is `minW`). */
const PARAM_FIELD: Readonly<Record<string, string>> = { min_w: 'minW', min_l: 'minL' };

const field = (path: string, dimension: Dimension, siUnit: string, tableUnit: string, integer = false): SweepField => ({ path, dimension, siUnit, tableUnit, integer });

/** SI unit text of a dimension for CSV headers and tables. */
const SI_UNIT: Readonly<Record<Dimension, string>> = {
  voltage: 'V', current: 'A', length: 'm', area: 'm^2', temperature: 'K', kp: 'A/V^2', avt: 'V*m', abeta: 'm', cox: 'F/m^2', resistance: 'ohm', dimensionless: '',
};

/** The fields a sweep can step for one stage type, in the order the help text lists them. */
export function sweepFields(def: StageDefinition): SweepField[] {
  const out: SweepField[] = [];
  for (const b of def.blocks) {
    out.push(field(`${b.key}.w`, 'length', 'm', 'm'), field(`${b.key}.l`, 'length', 'm', 'm'), field(`${b.key}.area`, 'area', 'm^2', 'um^2'));
    for (const f of b.fields) out.push(field(`${b.key}.${f.key}`, f.dimension, f.unit, f.unit, f.integer === true));
  }
  for (const f of def.fields) out.push(field(f.key, f.dimension, SI_UNIT[f.dimension], f.dimension === 'temperature' ? 'C' : f.unit, f.integer === true));
  out.push(field('temperature', 'temperature', 'K', 'C'));
  const fig = def.figure;
  out.push(field(`spec.${fig.specKey}`, fig.dimension, SI_UNIT[fig.dimension], fig.unit), field('spec.instances', 'dimensionless', '', '', true));
  for (const pol of ['n', 'p'] as const) for (const [k, d, si, t] of PARAMS) out.push(field(`process.${pol}.${k}`, d, si, t));
  if (def.blocks.some((b) => b.kind === 'resistor')) out.push(field('process.resistor.ar', 'abeta', 'm', '%*um'));
  return out;
}

/** Every sweepable field of any stage type (each path once). */
export const SWEEP_FIELDS: readonly SweepField[] = [...new Map(STAGES.flatMap(sweepFields).map((f) => [f.path, f])).values()];

/**
 * The field at `path`, checked against the design (a block the stage type has, a process entry
 * the design has).
 * @throws InputError on `option` naming the accepted fields or the closest spelling
 */
export function sweepField(path: string, design: Design, option = '--vary'): SweepField {
  const def = stageDefinition(design.topology);
  const own = sweepFields(def);
  const f = own.find((x) => x.path === path);
  if (f === undefined) {
    const elsewhere = SWEEP_FIELDS.find((x) => x.path === path);
    if (elsewhere !== undefined) throw new InputError(option, `${path} needs ${lacksText(def, path.split('.')[0]!)}`);
    const guess = closestWord(path, own.map((x) => x.path));
    const hint = guess === undefined ? `expected a numeric design field such as input.w, ${def.fields[0]?.key ?? 'temperature'}, temperature, spec.${def.figure.specKey} or process.n.avt` : `did you mean "${guess}"?`;
    throw new InputError(option, `unknown field "${path}"; ${hint}`);
  }
  const pol = /^process\.([np])\./.exec(path)?.[1] as Polarity | undefined;
  if (pol !== undefined && design.process[pol] === undefined) {
    throw new InputError(option, `${path}: the design has no process.${pol}; sweep a parameter of the polarity it uses`);
  }
  return f;
}

/** The value of the field at `path` in SI units (undefined where the design leaves it out). */
export function fieldValue(design: Design, path: string): number | undefined {
  const [head, a, b] = path.split('.') as [string, string | undefined, string | undefined];
  if (head === 'spec') return design.spec[a!];
  if (head === 'process') {
    const entry = (design.process as Record<string, Record<string, number> | undefined>)[a!];
    return entry?.[PARAM_FIELD[b ?? 'ar'] ?? b ?? 'ar'];
  }
  if (a === undefined) return design[head] as number | undefined;
  const g = (head === 'input' ? design.input : design[head]) as Record<string, number> | undefined;
  if (g === undefined) return undefined;
  return a === 'area' ? g['w']! * g['l']! : g[a];
}

/** The design with the field at `path` set to `valueSi` (SI units); the rest is unchanged. */
export function withField(design: Design, path: string, valueSi: number): Design {
  const [head, a, b] = path.split('.') as [string, string | undefined, string | undefined];
  if (head === 'spec') return { ...design, spec: { ...design.spec, [a!]: valueSi } };
  if (head === 'process') {
    if (a === 'resistor') return { ...design, process: { ...design.process, resistor: { ar: valueSi } } };
    const pol = a as Polarity;
    const p = design.process[pol];
    if (p === undefined) throw new Error(`internal: process.${pol} missing`);
    return { ...design, process: { ...design.process, [pol]: { ...p, [PARAM_FIELD[b!] ?? b!]: valueSi } } };
  }
  if (a === undefined) return { ...design, [head]: valueSi };
  const g = (head === 'input' ? design.input : design[head]) as Record<string, number> | undefined;
  if (g === undefined) throw new Error(`internal: block ${head} missing`);
  if (a === 'area') {
    // W and L scaled alike, so W/L (and so the inversion level at fixed bias) stays put.
    const k = Math.sqrt(valueSi / (g['w']! * g['l']!));
    return { ...design, [head]: { ...g, w: g['w']! * k, l: g['l']! * k } };
  }
  return { ...design, [head]: { ...g, [a]: valueSi } };
}

/**
 * `steps` values from `from` to `to` (both included, exactly), evenly spaced, or evenly spaced
 * in log when `log` (both ends must then be positive: the caller checks); the points between
 * are rounded to 12 significant digits.
 */
export function sweepValues(from: number, to: number, steps: number, log: boolean): number[] {
  if (steps === 1) return [from];
  return Array.from({ length: steps }, (_, i) => {
    if (i === 0) return from;
    if (i === steps - 1) return to;
    const f = i / (steps - 1);
    // 12 significant digits: 2.5e-5 rather than 2.5000000000000005e-5, far below any step.
    return Number((log ? from * (to / from) ** f : from + (to - from) * f).toPrecision(12));
  });
}

/** Display unit and factor from SI for the plot's x axis, chosen from the swept values. */
export function plotAxis(f: SweepField, values: readonly number[]): { unit: string; scale: number } {
  const big = Math.max(...values.map(Math.abs));
  switch (f.dimension) {
    case 'length':
      return { unit: 'um', scale: 1e6 };
    case 'area':
      return { unit: 'um^2', scale: 1e12 };
    case 'resistance':
      return big < 1e3 ? { unit: 'ohm', scale: 1 } : big < 1e6 ? { unit: 'kohm', scale: 1e-3 } : { unit: 'Mohm', scale: 1e-6 };
    case 'current':
      return big < 1e-6 ? { unit: 'nA', scale: 1e9 } : big < 1e-3 ? { unit: 'uA', scale: 1e6 } : { unit: 'mA', scale: 1e3 };
    case 'voltage':
      return big < 1 ? { unit: 'mV', scale: 1e3 } : { unit: 'V', scale: 1 };
    case 'temperature':
      return { unit: 'K', scale: 1 };
    case 'kp':
      return { unit: 'uA/V^2', scale: 1e6 };
    case 'avt':
      return { unit: 'mV*um', scale: 1e9 };
    case 'abeta':
      return { unit: '%*um', scale: 1e8 };
    case 'cox':
      return { unit: 'fF/um^2', scale: 1e3 };
    case 'dimensionless':
      return { unit: '', scale: 1 };
  }
}

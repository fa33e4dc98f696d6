/**
 * The numeric design fields a sweep can step: their paths as written in a design file, what
 * they measure, how they are shown, and how a design is rebuilt with one of them changed.
 */
import { InputError, type Design, type DeviceGeometry, type Dimension, type Polarity, type ProcessParams } from '@twinfet/core';
import { closestWord } from './didYouMean.js';

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

const PARAMS: readonly [keyof ProcessParams, Dimension, string, string][] = [
  ['vt0', 'voltage', 'V', 'V'],
  ['slope', 'dimensionless', '', ''],
  ['kp', 'kp', 'A/V^2', 'A/V^2'],
  ['avt', 'avt', 'V*m', 'mV*um'],
  ['abeta', 'abeta', 'm', '%*um'],
  ['rho', 'dimensionless', '', ''],
  ['cox', 'cox', 'F/m^2', 'fF/um^2'],
  ['wmin', 'length', 'm', 'm'],
  ['lmin', 'length', 'm', 'm'],
];

const field = (path: string, dimension: Dimension, siUnit: string, tableUnit: string, integer = false): SweepField => ({ path, dimension, siUnit, tableUnit, integer });

/** Every sweepable field, in the order the help text lists them. */
export const SWEEP_FIELDS: readonly SweepField[] = [
  field('input.w', 'length', 'm', 'm'),
  field('input.l', 'length', 'm', 'm'),
  field('input.area', 'area', 'm^2', 'um^2'),
  field('load.w', 'length', 'm', 'm'),
  field('load.l', 'length', 'm', 'm'),
  field('load.area', 'area', 'm^2', 'um^2'),
  field('tail', 'current', 'A', 'A'),
  field('temperature', 'temperature', 'K', 'C'),
  field('spec.offset', 'voltage', 'V', 'V'),
  field('spec.instances', 'dimensionless', '', '', true),
  ...(['n', 'p'] as const).flatMap((pol) => PARAMS.map(([k, d, si, t]) => field(`process.${pol}.${k}`, d, si, t))),
];

/**
 * The field at `path`, checked against the design (a load field needs a mirror stage, a process
 * field needs that polarity's process).
 * @throws InputError on `option` naming the accepted fields or the closest spelling
 */
export function sweepField(path: string, design: Design, option = '--vary'): SweepField {
  const f = SWEEP_FIELDS.find((x) => x.path === path);
  if (f === undefined) {
    const guess = closestWord(path, SWEEP_FIELDS.map((x) => x.path));
    const hint = guess === undefined ? 'expected a numeric design field such as input.w, tail, temperature, spec.offset or process.n.avt' : `did you mean "${guess}"?`;
    throw new InputError(option, `unknown field "${path}"; ${hint}`);
  }
  if (path.startsWith('load.') && design.load === undefined) {
    throw new InputError(option, `${path} needs a mirror load, but this design is a simple stage (ideal loads)`);
  }
  const pol = /^process\.([np])\./.exec(path)?.[1] as Polarity | undefined;
  if (pol !== undefined && design.process[pol] === undefined) {
    throw new InputError(option, `${path}: the design has no process.${pol}; sweep a parameter of the polarity it uses`);
  }
  return f;
}

/**
 * A pair's geometry with gate area W L = `areaM2` per device at its own W/L (as `size --vary
 * input.area` scales it): W = sqrt(A W/L), L = sqrt(A L/W), each rounded to 12 significant digits.
 */
function withArea(g: DeviceGeometry, areaM2: number): DeviceGeometry {
  const ratio = g.w / g.l;
  return { ...g, w: Number(Math.sqrt(areaM2 * ratio).toPrecision(12)), l: Number(Math.sqrt(areaM2 / ratio).toPrecision(12)) };
}

/** The value of the field at `path` in `design` (SI units), or undefined when the design has none. */
export function fieldValue(design: Design, path: string): number | undefined {
  const [head, a, b] = path.split('.');
  if (head === 'process') return design.process[a as Polarity]?.[b as keyof ProcessParams];
  if (head === 'input' || head === 'load') {
    const g = head === 'input' ? design.input : design.load;
    if (g === undefined) return undefined;
    return a === 'area' ? g.w * g.l : (g[a as 'w' | 'l'] as number);
  }
  if (head === 'spec') return design.spec[a as 'offset' | 'instances'];
  return head === 'temperature' ? design.temperature : head === 'tail' ? design.tail : undefined;
}

/** The design with the field at `path` set to `valueSi` (SI units); the rest is unchanged. */
export function withField(design: Design, path: string, valueSi: number): Design {
  const [head, a, b] = path.split('.');
  switch (head) {
    case 'temperature':
      return { ...design, temperature: valueSi };
    case 'tail':
      return { ...design, tail: valueSi };
    case 'input':
      return { ...design, input: a === 'area' ? withArea(design.input, valueSi) : { ...design.input, [a!]: valueSi } };
    case 'load':
      if (design.load === undefined) throw new Error('internal: load field of a simple stage');
      return { ...design, load: a === 'area' ? withArea(design.load, valueSi) : { ...design.load, [a!]: valueSi } };
    case 'spec':
      return { ...design, spec: { ...design.spec, [a!]: valueSi } };
    case 'process': {
      const pol = a as Polarity;
      const p = design.process[pol];
      if (p === undefined) throw new Error(`internal: process.${pol} missing`);
      return { ...design, process: { ...design.process, [pol]: { ...p, [b!]: valueSi } } };
    }
    default:
      throw new Error(`internal: unknown sweep field ${path}`);
  }
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

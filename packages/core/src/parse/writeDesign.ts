/**
 * Writes a design (SI units) back as a design file with units, such that reading the file gives
 * the same doubles: each value is printed from its shortest round-trip decimal with the decimal
 * point moved for the unit's prefix, so no binary rounding happens on the way. The stage's
 * definition says which blocks and fields it has.
 */
import { Document } from 'yaml';
import type { Design, OperatingCondition, ProcessParams } from '../design.js';
import { conditionFields } from '../conditions.js';
import type { StageDefinition } from '../stages/definition.js';
import type { Dimension } from '../units.js';
import { ZERO_CELSIUS_K } from '../thermal.js';
import { stageDefinition } from '../stages/registry.js';

/**
 * The exact decimal text of `x / 10^pow10`: `x` in a unit 10^pow10 times the SI unit.
 * @example shiftedDecimal(1.235e-5, -6) // "12.35"
 */
export function shiftedDecimal(x: number, pow10: number): string {
  if (!Number.isFinite(x)) throw new RangeError(`shiftedDecimal: value must be finite, got ${x}`);
  if (x === 0) return '0';
  const sign = x < 0 ? '-' : '';
  const m = /^(\d+)(?:\.(\d+))?(?:e([+-]\d+))?$/.exec(String(Math.abs(x)));
  if (m === null) throw new Error(`internal: unexpected number text ${String(x)}`);
  const frac = m[2] ?? '';
  let digits = `${m[1]!}${frac}`.replace(/^0+/, '');
  let exp = Number(m[3] ?? '0') - frac.length - pow10; // value = digits * 10^exp
  const trailing = /0+$/.exec(digits);
  if (trailing !== null) {
    digits = digits.slice(0, digits.length - trailing[0].length);
    exp += trailing[0].length;
  }
  const n = digits.length;
  if (exp >= 0) return exp <= 6 ? `${sign}${digits}${'0'.repeat(exp)}` : `${sign}${digits[0]!}${n > 1 ? `.${digits.slice(1)}` : ''}e${exp + n - 1}`;
  if (-exp < n) return `${sign}${digits.slice(0, n + exp)}.${digits.slice(n + exp)}`;
  const zeros = -exp - n;
  return zeros <= 6 ? `${sign}0.${'0'.repeat(zeros)}${digits}` : `${sign}${digits[0]!}${n > 1 ? `.${digits.slice(1)}` : ''}e${exp + n - 1}`;
}

const withUnit = (x: number, pow10: number, unit: string): string => `${shiftedDecimal(x, pow10)} ${unit}`;

/** A value of `dimension` in the unit a designer writes it in (currents in a readable prefix). */
function quantity(x: number, dimension: Dimension): string | number {
  switch (dimension) {
    case 'current':
      if (x < 1e-9) return withUnit(x, -12, 'pA');
      if (x < 1e-6) return withUnit(x, -9, 'nA');
      if (x < 1e-3) return withUnit(x, -6, 'uA');
      return withUnit(x, -3, 'mA');
    case 'length':
      return withUnit(x, -6, 'um');
    case 'area':
      return withUnit(x, -12, 'um^2');
    case 'voltage':
      return withUnit(x, -3, 'mV');
    case 'temperature':
      return withUnit(x, 0, 'K');
    case 'resistance':
      return withUnit(x, 3, 'kohm');
    case 'kp':
      return withUnit(x, -6, 'uA/V^2');
    case 'avt':
      return withUnit(x, -9, 'mV*um');
    case 'abeta':
      return withUnit(x, -8, '%*um');
    case 'cox':
      return withUnit(x, -3, 'fF/um^2');
    case 'dimensionless':
      return x;
  }
}

function params(p: ProcessParams): Record<string, string | number> {
  return {
    vt0: withUnit(p.vt0, 0, 'V'),
    slope: p.slope,
    kp: quantity(p.kp, 'kp'),
    ...(p.kpExponent === undefined ? {} : { kp_exponent: p.kpExponent }),
    avt: quantity(p.avt, 'avt'),
    abeta: quantity(p.abeta, 'abeta'),
    rho: p.rho ?? 0,
    ...(p.cox === undefined ? {} : { cox: quantity(p.cox, 'cox') }),
    ...(p.minW === undefined ? {} : { min_w: quantity(p.minW, 'length') }),
    ...(p.minL === undefined ? {} : { min_l: quantity(p.minL, 'length') }),
  };
}

function condition(def: StageDefinition, c: OperatingCondition): Record<string, unknown> {
  const f = conditionFields(def);
  const out: Record<string, unknown> = { name: c.name };
  if (c.temperature !== undefined) out['temperature'] = withUnit(c.temperature, 0, 'K');
  for (const x of f.top) {
    const v = c[x.key];
    if (typeof v === 'number') out[x.key] = quantity(v, x.dimension);
  }
  for (const { block, fields } of f.blocks) {
    const g = c[block.key] as Record<string, unknown> | undefined;
    if (g === undefined) continue;
    const own: Record<string, string | number> = {};
    for (const x of fields) {
      const v = g[x.key];
      if (typeof v === 'number') own[x.key] = quantity(v, x.dimension);
    }
    out[block.key] = own;
  }
  if (c.shift !== undefined) {
    const shift: Record<string, Record<string, string>> = {};
    for (const pol of ['n', 'p'] as const) {
      const s = c.shift[pol];
      if (s === undefined) continue;
      shift[pol] = {
        ...(s.kp === undefined ? {} : { kp: withUnit(s.kp, -2, '%') }),
        ...(s.vt0 === undefined ? {} : { vt0: withUnit(s.vt0, -3, 'mV') }),
      };
    }
    out['shift'] = shift;
  }
  return out;
}

/**
 * Design-file text (YAML) for a design, with `header` lines as a leading comment.
 * Reading the text with `parseDesign` gives back the same design, number for number.
 */
export function writeDesign(design: Design, header: readonly string[] = []): string {
  const def = stageDefinition(design.topology);
  const fields: Record<string, string | number> = {};
  for (const f of def.fields) {
    const v = design[f.key];
    if (typeof v === 'number') fields[f.key] = f.integer === true ? v : quantity(v, f.dimension);
  }
  const blocks: Record<string, Record<string, string | number>> = {};
  for (const b of def.blocks) {
    const g = (b.key === 'input' ? design.input : design[b.key]) as Record<string, unknown>;
    const out: Record<string, string | number> = {};
    if (b.kind === 'mos') out['polarity'] = g['polarity'] as string;
    out['w'] = quantity(g['w'] as number, 'length');
    out['l'] = quantity(g['l'] as number, 'length');
    for (const f of b.fields) {
      const v = g[f.key];
      if (typeof v === 'number') out[f.key] = f.integer === true ? v : quantity(v, f.dimension);
    }
    blocks[b.key] = out;
  }
  const fig = def.figure;
  const limit = design.spec[fig.specKey];
  const data = {
    name: design.name,
    temperature: withUnit(design.temperature, 0, 'K'),
    topology: design.topology,
    ...fields,
    ...blocks,
    process: {
      ...(design.process.temperature === undefined ? {} : { temperature: withUnit(design.process.temperature, 0, 'K') }),
      ...(design.process.n === undefined ? {} : { n: params(design.process.n) }),
      ...(design.process.p === undefined ? {} : { p: params(design.process.p) }),
      ...(design.process.resistor === undefined ? {} : { resistor: { ar: quantity(design.process.resistor.ar, 'abeta') } }),
    },
    spec: { [fig.specKey]: limit === undefined ? undefined : fig.unit === '' ? withUnit(limit, -2, '%') : quantity(limit, fig.dimension), instances: design.spec.instances },
    ...(design.conditions === undefined ? {} : { conditions: design.conditions.map((c) => condition(def, c)) }),
  };
  const doc = new Document(data);
  const celsius = Number((design.temperature - ZERO_CELSIUS_K).toFixed(6));
  doc.commentBefore = [...header, `temperature ${celsius} C; quantities carry units, bare numbers are SI`].map((l) => ` ${l}`).join('\n');
  return doc.toString({ lineWidth: 0 });
}

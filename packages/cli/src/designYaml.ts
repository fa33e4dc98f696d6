/**
 * Writes a design (SI units) back as a design file with units, such that loading the file gives
 * the same doubles: each value is printed from its shortest round-trip decimal with the decimal
 * point moved for the unit's prefix, so no binary rounding happens on the way.
 */
import { ZERO_CELSIUS_K, type Design, type DeviceGeometry, type ProcessParams } from '@twinfet/core';
import { Document } from 'yaml';

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

/** A current in the prefix that keeps it readable (pA to mA), exactly. */
function current(a: number): string {
  if (a < 1e-9) return withUnit(a, -12, 'pA');
  if (a < 1e-6) return withUnit(a, -9, 'nA');
  if (a < 1e-3) return withUnit(a, -6, 'uA');
  return withUnit(a, -3, 'mA');
}

function device(g: DeviceGeometry): Record<string, string> {
  return { polarity: g.polarity, w: withUnit(g.w, -6, 'um'), l: withUnit(g.l, -6, 'um') };
}

function params(p: ProcessParams): Record<string, string | number> {
  return {
    vt0: withUnit(p.vt0, 0, 'V'),
    slope: p.slope,
    kp: withUnit(p.kp, -6, 'uA/V^2'),
    avt: withUnit(p.avt, -9, 'mV*um'),
    abeta: withUnit(p.abeta, -8, '%*um'),
    rho: p.rho,
    ...(p.cox === undefined ? {} : { cox: withUnit(p.cox, -3, 'fF/um^2') }),
    ...(p.wmin === undefined ? {} : { wmin: withUnit(p.wmin, -6, 'um') }),
    ...(p.lmin === undefined ? {} : { lmin: withUnit(p.lmin, -6, 'um') }),
  };
}

/**
 * Design-file text (YAML) for a design, with `header` lines as a leading comment.
 * Loading the text with `parseDesign` gives back the same design, number for number.
 */
export function designToYaml(design: Design, header: readonly string[]): string {
  const data = {
    name: design.name,
    temperature: withUnit(design.temperature, 0, 'K'),
    topology: design.topology,
    tail: current(design.tail),
    input: device(design.input),
    ...(design.load === undefined ? {} : { load: device(design.load) }),
    process: {
      ...(design.process.n === undefined ? {} : { n: params(design.process.n) }),
      ...(design.process.p === undefined ? {} : { p: params(design.process.p) }),
    },
    spec: { offset: withUnit(design.spec.offset, -3, 'mV'), instances: design.spec.instances },
  };
  const doc = new Document(data);
  const celsius = Number((design.temperature - ZERO_CELSIUS_K).toFixed(6));
  doc.commentBefore = [...header, `temperature ${celsius} C; quantities carry units, bare numbers are SI`].map((l) => ` ${l}`).join('\n');
  return doc.toString({ lineWidth: 0 });
}

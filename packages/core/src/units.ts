/**
 * Physical quantities as users write them: `"2 um"`, `"300 uA/V^2"`, `"5 mV*um"`, `"27 C"`.
 *
 * A unit expression is parsed into a power of ten and a vector of base-dimension exponents
 * (V, A, m, K, s); the vector must equal the one the field expects. Values come back in SI
 * base units (V, A, m, K, A/V^2, V*m, F/m^2). Scaling is done in decimal (the power of ten is
 * folded into the number's own exponent before one conversion to binary), so `"5 mV*um"` is
 * exactly the double nearest 5e-9.
 */
import { InputError } from './errors.js';

/** What a field measures; each has one SI base unit (see {@link parseQuantity}). */
export type Dimension =
  | 'voltage'
  | 'current'
  | 'length'
  /** m^2 (a gate or resistor-body area) */
  | 'area'
  | 'temperature'
  /** A/V^2 */
  | 'kp'
  /** V*m */
  | 'avt'
  /** m (a fraction times metres), written in %*um */
  | 'abeta'
  /** F/m^2 */
  | 'cox'
  /** ohm */
  | 'resistance'
  | 'dimensionless';

/** Exponents of V, A, m, K, s, in that order. */
type DimVector = readonly [number, number, number, number, number];

const NONE: DimVector = [0, 0, 0, 0, 0];

interface UnitDef {
  /** Power of ten of the unit relative to the SI base product (`%` is 10^-2). */
  readonly pow10: number;
  readonly dims: DimVector;
  /** Whether an SI prefix may be put in front (not for `%`). */
  readonly prefixable: boolean;
}

// Volt and ampere are taken as base dimensions (not kg), so every unit used here is an integer
// combination; farad = A*s/V, siemens = A/V, ohm = V/A.
const UNITS: ReadonlyMap<string, UnitDef> = new Map<string, UnitDef>([
  ['V', { pow10: 0, dims: [1, 0, 0, 0, 0], prefixable: true }],
  ['A', { pow10: 0, dims: [0, 1, 0, 0, 0], prefixable: true }],
  ['m', { pow10: 0, dims: [0, 0, 1, 0, 0], prefixable: true }],
  ['K', { pow10: 0, dims: [0, 0, 0, 1, 0], prefixable: true }],
  ['s', { pow10: 0, dims: [0, 0, 0, 0, 1], prefixable: true }],
  ['F', { pow10: 0, dims: [-1, 1, 0, 0, 1], prefixable: true }],
  ['S', { pow10: 0, dims: [-1, 1, 0, 0, 0], prefixable: true }],
  ['Ω', { pow10: 0, dims: [1, -1, 0, 0, 0], prefixable: true }],
  ['ohm', { pow10: 0, dims: [1, -1, 0, 0, 0], prefixable: true }],
  ['%', { pow10: -2, dims: NONE, prefixable: false }],
]);

const PREFIXES: ReadonlyMap<string, number> = new Map<string, number>([
  ['a', -18],
  ['f', -15],
  ['p', -12],
  ['n', -9],
  ['u', -6],
  ['µ', -6], // U+00B5 micro sign
  ['μ', -6], // U+03BC Greek small mu
  ['m', -3],
  ['k', 3],
  ['M', 6],
  ['G', 9],
  ['T', 12],
]);

/** Prefixes the formatter prints, by power of ten (ASCII `u` so reports stay plain text). */
const PRINT_PREFIX: ReadonlyMap<number, string> = new Map<number, string>([
  [-18, 'a'],
  [-15, 'f'],
  [-12, 'p'],
  [-9, 'n'],
  [-6, 'u'],
  [-3, 'm'],
  [0, ''],
  [3, 'k'],
  [6, 'M'],
  [9, 'G'],
  [12, 'T'],
]);

const EXPECTED: Readonly<Record<Dimension, { dims: DimVector; what: string }>> = {
  voltage: { dims: [1, 0, 0, 0, 0], what: 'a voltage such as "0.45 V"' },
  current: { dims: [0, 1, 0, 0, 0], what: 'a current such as "10 uA"' },
  length: { dims: [0, 0, 1, 0, 0], what: 'a length such as "2 um"' },
  area: { dims: [0, 0, 2, 0, 0], what: 'an area such as "4 um^2"' },
  temperature: { dims: [0, 0, 0, 1, 0], what: 'a temperature such as "300 K" or "27 C"' },
  kp: { dims: [-2, 1, 0, 0, 0], what: 'a transconductance parameter such as "300 uA/V^2"' },
  avt: { dims: [1, 0, 1, 0, 0], what: 'a threshold matching coefficient such as "5 mV*um"' },
  abeta: { dims: [0, 0, 1, 0, 0], what: 'a current-factor matching coefficient such as "1 %*um"' },
  cox: { dims: [-1, 1, -2, 0, 1], what: 'a capacitance per area such as "8.6 fF/um^2"' },
  resistance: { dims: [1, -1, 0, 0, 0], what: 'a resistance such as "20 kohm"' },
  dimensionless: { dims: NONE, what: 'a plain number such as "1.3"' },
};

const CELSIUS_OFFSET_K = 273.15;
const CELSIUS_SPELLINGS: ReadonlySet<string> = new Set(['C', '°C', '℃']);

/** A parsed unit expression: value_SI = number * 10^pow10, with dimension `dims`. */
interface ParsedUnit {
  readonly pow10: number;
  readonly dims: DimVector;
  /** The first factor carries no prefix, has power 1 and accepts one (for the formatter). */
  readonly leadPrefixable: boolean;
}

/** Why a unit expression failed to parse; becomes the parenthesised detail of a message. */
class UnitSyntaxError extends Error {}

/** A piece of the user's text, shortened so messages stay one readable line. */
function clip(text: string): string {
  return text.length > 24 ? `${text.slice(0, 21)}...` : text;
}

const NUMBER_RE = /^([+-]?(?:\d+(?:\.\d*)?|\.\d+))(?:[eE]([+-]?\d+))?/;
const ATOM_RE = /^[A-Za-zµμΩ%]+/;
const SUPERSCRIPT_POWERS: ReadonlyMap<string, number> = new Map([
  ['²', 2],
  ['³', 3],
]);

function addDims(a: DimVector, b: DimVector, times: number): DimVector {
  return [
    a[0] + times * b[0],
    a[1] + times * b[1],
    a[2] + times * b[2],
    a[3] + times * b[3],
    a[4] + times * b[4],
  ];
}

function sameDims(a: DimVector, b: DimVector): boolean {
  return a[0] === b[0] && a[1] === b[1] && a[2] === b[2] && a[3] === b[3] && a[4] === b[4];
}

/** A whole unit symbol, or a prefix followed by one; the exact symbol wins (`m` is metre). */
function resolveAtom(atom: string): { def: UnitDef; prefixPow10: number } {
  const exact = UNITS.get(atom);
  if (exact !== undefined) return { def: exact, prefixPow10: 0 };
  // Prefixes are one code point; `[...atom]` keeps µ whole.
  const chars = [...atom];
  const head = chars[0];
  const prefixPow10 = head === undefined ? undefined : PREFIXES.get(head);
  const rest = chars.slice(1).join('');
  const def = UNITS.get(rest);
  if (prefixPow10 !== undefined && def !== undefined) {
    if (!def.prefixable) throw new UnitSyntaxError(`"${clip(rest)}" takes no prefix`);
    return { def, prefixPow10 };
  }
  throw new UnitSyntaxError(`unknown unit "${clip(atom)}"`);
}

/**
 * Recursive-descent parse of `factor (('*'|'·') factor)* ['/' (factor | '(' product ')')]`,
 * factor = [prefix]unit['^' int | '²' | '³']. A product after a division is refused because
 * `a/b*c` reads two ways.
 */
function parseUnitExpression(text: string): ParsedUnit {
  let pos = 0;
  let pow10 = 0;
  let dims: DimVector = NONE;
  let leadPrefixable = false;
  let factorCount = 0;

  const skipSpace = (): void => {
    while (pos < text.length && /\s/.test(text.charAt(pos))) pos += 1;
  };

  const factor = (sign: 1 | -1): void => {
    skipSpace();
    const m = ATOM_RE.exec(text.slice(pos));
    if (m === null) {
      const at = text.slice(pos);
      throw new UnitSyntaxError(at === '' ? 'a unit is missing' : `unexpected "${clip(at)}"`);
    }
    const atom = m[0];
    pos += atom.length;
    const { def, prefixPow10 } = resolveAtom(atom);
    let power = 1;
    const sup = SUPERSCRIPT_POWERS.get(text.charAt(pos));
    if (sup !== undefined) {
      power = sup;
      pos += 1;
    } else if (text.charAt(pos) === '^') {
      const pm = /^\^\s*([+-]?\d{1,3})/.exec(text.slice(pos));
      if (pm === null || pm[1] === undefined) throw new UnitSyntaxError('"^" needs a whole-number power');
      power = Number(pm[1]);
      pos += pm[0].length;
    }
    if (factorCount === 0) leadPrefixable = def.prefixable && prefixPow10 === 0 && power === 1 && sign === 1;
    factorCount += 1;
    pow10 += sign * power * (def.pow10 + prefixPow10);
    dims = addDims(dims, def.dims, sign * power);
  };

  const product = (sign: 1 | -1): void => {
    factor(sign);
    for (;;) {
      skipSpace();
      const c = text.charAt(pos);
      if (c === '*' || c === '·' || c === '⋅') {
        pos += 1;
        factor(sign);
      } else {
        return;
      }
    }
  };

  product(1);
  skipSpace();
  if (text.charAt(pos) === '/') {
    pos += 1;
    skipSpace();
    if (text.charAt(pos) === '(') {
      pos += 1;
      product(-1);
      skipSpace();
      if (text.charAt(pos) !== ')') throw new UnitSyntaxError('")" is missing');
      pos += 1;
    } else {
      factor(-1);
    }
    skipSpace();
    const c = text.charAt(pos);
    if (c === '*' || c === '·' || c === '⋅' || c === '/') {
      throw new UnitSyntaxError('ambiguous after "/"; put the denominator in parentheses');
    }
  }
  skipSpace();
  if (pos < text.length) throw new UnitSyntaxError(`unexpected "${clip(text.slice(pos))}"`);
  return { pow10, dims, leadPrefixable };
}

/** How a rejected value is quoted in a message: strings in quotes, others by kind. */
function describeGot(value: unknown): string {
  if (typeof value === 'string') {
    const shown = value.length > 60 ? `${value.slice(0, 57)}...` : value;
    return JSON.stringify(shown);
  }
  if (typeof value === 'number' || typeof value === 'boolean' || typeof value === 'bigint') return String(value);
  if (value === null) return 'an empty value (null)';
  if (value === undefined) return 'nothing';
  if (Array.isArray(value)) return 'a list';
  return typeof value === 'object' ? 'an object' : `a ${typeof value}`;
}

/** Number text times 10^pow10, converted to binary once (correctly rounded). */
function scaleDecimal(mantissa: string, exponent: number, pow10: number): number {
  return Number(`${mantissa}e${exponent + pow10}`);
}

/**
 * Parses a physical quantity into SI base units.
 *
 * Accepts a finite number (already SI: V, A, m, K, A/V^2, V*m, m for abeta, F/m^2) or a
 * string `<number>[ ]<unit>` where the unit is built from V A m K s F S Ω % with prefixes
 * a f p n u µ m k M G T, products `*` or `·`, one division `/` and powers `^2`. A string with no
 * unit is SI, like a bare number. Temperatures may also be `"27 C"` / `"27 °C"` (Celsius).
 * `abeta` is usually written in `%*um`: 1 %*um = 1e-8 m.
 *
 * @param value the user's value (any type; only numbers and strings can succeed)
 * @param dimension what the field measures
 * @param field dotted field path used in the error, e.g. `input.w`
 * @returns the value in SI base units (finite; range checks are the caller's)
 * @throws InputError naming the field, what was expected (with an example) and what was got
 * @example parseQuantity('5 mV*um', 'avt', 'process.n.avt') // 5e-9 (V*m)
 */
export function parseQuantity(value: unknown, dimension: Dimension, field: string): number {
  const expected = EXPECTED[dimension];
  const fail = (detail?: string): InputError =>
    new InputError(
      field,
      `expected ${expected.what}, got ${describeGot(value)}${detail === undefined ? '' : ` (${detail})`}`,
    );

  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw fail();
    return value;
  }
  if (typeof value !== 'string') throw fail();

  const text = value.trim();
  const num = NUMBER_RE.exec(text);
  if (num === null || num[1] === undefined) throw fail(text === '' ? 'empty text' : 'no number at the start');
  const mantissa = num[1];
  const exponent = num[2] === undefined ? 0 : Number(num[2]);
  const unitText = text.slice(num[0].length).trim();

  if (unitText === '') {
    const si = scaleDecimal(mantissa, exponent, 0);
    if (!Number.isFinite(si)) throw fail('out of range');
    return si;
  }

  if (CELSIUS_SPELLINGS.has(unitText)) {
    if (dimension !== 'temperature') throw fail();
    const kelvin = scaleDecimal(mantissa, exponent, 0) + CELSIUS_OFFSET_K;
    if (!Number.isFinite(kelvin)) throw fail('out of range');
    return kelvin;
  }

  let unit: ParsedUnit;
  try {
    unit = parseUnitExpression(unitText);
  } catch (e) {
    if (e instanceof UnitSyntaxError) throw fail(e.message);
    throw e;
  }
  if (!sameDims(unit.dims, expected.dims)) throw fail();
  const si = scaleDecimal(mantissa, exponent, unit.pow10);
  if (!Number.isFinite(si)) throw fail('out of range');
  return si;
}

/** Shortest decimal text of `x` rounded to `digits` significant digits. */
function roundedText(x: number, digits: number): string {
  return String(Number(x.toPrecision(digits)));
}

/**
 * Prints an SI value in a display unit with an engineering prefix, for reports.
 *
 * `unit` is any unit expression {@link parseQuantity} understands; `valueSi` is converted into
 * it (`formatQuantity(1e-8, '%*um')` is `"1 %*um"`). When the unit's first factor has no prefix
 * of its own and power 1, a prefix from a to T is chosen so the number lies in [1, 1000).
 * Unit `C` prints kelvin as Celsius. An empty unit prints a plain number. Trailing zeros are
 * dropped, so the output parses back to the value within half a unit in the last digit.
 *
 * @param valueSi the value in SI base units (finite)
 * @param unit display unit, e.g. `V`, `A`, `m`, `A/V^2`, `mV*um`, `%*um`, `fF/um^2`, `K`, `C`
 * @param digits significant digits, 1..21 (default 4)
 * @throws RangeError for a non-finite value, bad digits or a unit that does not parse (a bug)
 * @example formatQuantity(1.23456e-3, 'V') // "1.235 mV"
 * @example formatQuantity(2e-6, 'm') // "2 um"
 */
export function formatQuantity(valueSi: number, unit: string, digits = 4): string {
  if (!Number.isFinite(valueSi)) throw new RangeError(`formatQuantity: value must be finite, got ${valueSi}`);
  if (!Number.isInteger(digits) || digits < 1 || digits > 21) {
    throw new RangeError(`formatQuantity: digits must be a whole number from 1 to 21, got ${digits}`);
  }
  const u = unit.trim();
  if (u === '') return roundedText(valueSi, digits);
  if (CELSIUS_SPELLINGS.has(u)) return `${roundedText(valueSi - CELSIUS_OFFSET_K, digits)} ${u}`;

  let parsed: ParsedUnit;
  try {
    parsed = parseUnitExpression(u);
  } catch (e) {
    if (e instanceof UnitSyntaxError) throw new RangeError(`formatQuantity: unit "${unit}": ${e.message}`);
    throw e;
  }
  // Value expressed in the display unit (division by an exact power of ten text).
  const inUnit = valueSi / Number(`1e${parsed.pow10}`);
  if (!parsed.leadPrefixable || inUnit === 0) return `${roundedText(inUnit, digits)} ${u}`;

  let exp3 = 3 * Math.floor(Math.log10(Math.abs(inUnit)) / 3);
  let mantissa = Number((inUnit / Number(`1e${exp3}`)).toPrecision(digits));
  if (Math.abs(mantissa) >= 1000) {
    // Rounding carried into the next prefix (999.96 -> 1000), or log10 rounded down.
    exp3 += 3;
    mantissa = Number((inUnit / Number(`1e${exp3}`)).toPrecision(digits));
  }
  const prefix = PRINT_PREFIX.get(exp3);
  if (prefix === undefined) return `${roundedText(inUnit, digits)} ${u}`;
  return `${String(mantissa)} ${prefix}${u}`;
}

/**
 * Design-file text (YAML or JSON) to a `Design` in SI units. This reader checks syntax, spelling
 * and units, field by field, with messages that quote what was written; every rule on the values
 * themselves is `validateDesign`'s, which it calls last, so a program that builds a design
 * directly meets exactly the same rules. Pure: no file access (the CLI reads files).
 */
import type { Design, DeviceGeometry, Polarity, ProcessParams, ResistorGeometry } from '../design.js';
import { InputError } from '../errors.js';
import type { BlockDefinition, FieldDefinition, StageDefinition } from '../stages/definition.js';
import { STAGES, stageDefinition, TOPOLOGIES } from '../stages/registry.js';
import { parseQuantity, type Dimension } from '../units.js';
import { designKeys, unknownDesignKey, unknownSpecKey, validateDesign } from '../validateDesign.js';
import { closestWord } from './didYouMean.js';
import { asMapping, describeValue, fieldPath, isMapping, own, refuseUnknownKeys, type Mapping } from './fieldReader.js';
import { readConditions } from './readConditions.js';
import { parseJsonText, parseYamlText } from './yamlText.js';

/** The text's syntax: YAML (which includes JSON) or strict JSON. */
export type DesignFormat = 'yaml' | 'json';

/** Options of `parseDesign`. */
export interface ParseOptions {
  /** Syntax (default: `json` when `source` ends in .json, else `yaml`). */
  readonly format?: DesignFormat;
  /** Name for messages (usually the file path) and the default `name` (its stem). */
  readonly source?: string;
}

const MOS_KEYS = ['polarity', 'w', 'l'] as const;
const RESISTOR_KEYS = ['w', 'l'] as const;
const PROCESS_KEYS = ['n', 'p'] as const;
const PARAM_KEYS = ['vt0', 'slope', 'kp', 'kp_exponent', 'avt', 'abeta', 'rho', 'cox', 'min_w', 'min_l'] as const;
const POLARITIES: readonly Polarity[] = ['n', 'p'];

/** Example values quoted in "missing" messages, per process parameter. */
const PARAM_EXAMPLES: Readonly<Record<(typeof PARAM_KEYS)[number], string>> = {
  vt0: 'vt0: 0.45 V',
  slope: 'slope: 1.3',
  kp: 'kp: 300 uA/V^2',
  kp_exponent: 'kp_exponent: -1.5',
  avt: 'avt: 5 mV*um',
  abeta: 'abeta: 1 %*um',
  rho: 'rho: 0',
  cox: 'cox: 8.6 fF/um^2',
  min_w: 'min_w: 0.22 um',
  min_l: 'min_l: 0.18 um',
};

function missing(path: string, fix: string): InputError {
  return new InputError(path, `missing; add ${fix}`);
}

/** A quantity that must be > 0 (sizes, currents, matching coefficients, limits). */
function positiveQuantity(raw: unknown, dimension: Dimension, path: string): number {
  const v = parseQuantity(raw, dimension, path);
  if (!(v > 0)) throw new InputError(path, `must be greater than 0, got ${describeValue(raw)}`);
  return v;
}

/** One of a few words, with a spelling suggestion when it is close to one. */
function choice<T extends string>(raw: unknown, options: readonly T[], path: string): T {
  const found = options.find((o) => o === raw);
  if (found !== undefined) return found;
  const list = options.join(' or ');
  const guess = typeof raw === 'string' ? closestWord(raw, options) : undefined;
  const hint = guess === undefined ? '' : `; did you mean "${guess}"?`;
  throw new InputError(path, `expected ${list}, got ${describeValue(raw)}${hint}`);
}

function stem(source: string): string {
  const base = source.split(/[\\/]/).pop() ?? '';
  const dot = base.lastIndexOf('.');
  const s = dot > 0 ? base.slice(0, dot) : base;
  return s === '' ? 'design' : s;
}

function readName(map: Mapping, source: string): string {
  const raw = own(map, 'name');
  if (raw === undefined) return stem(source);
  if (typeof raw !== 'string') {
    const quote = typeof raw === 'number' || typeof raw === 'boolean' ? ' (put it in quotes)' : '';
    throw new InputError('name', `expected text such as "Comparator front end", got ${describeValue(raw)}${quote}`);
  }
  if (raw.trim() === '') throw new InputError('name', 'must not be empty; give a short description or remove name');
  return raw;
}

function readTemperature(map: Mapping): number {
  const raw = own(map, 'temperature');
  if (raw === undefined) throw missing('temperature', 'temperature: 27 C (or 300 K)');
  const kelvin = parseQuantity(raw, 'temperature', 'temperature');
  if (!(kelvin > 0)) throw new InputError('temperature', `must be above absolute zero (0 K), got ${describeValue(raw)}`);
  return kelvin;
}

/** A stage field (top level or in a block): its unit, and whole numbers where it says so. */
function readField(f: FieldDefinition, raw: unknown, path: string): number {
  if (f.integer === true) {
    const wrong = (): InputError => new InputError(path, `expected a whole number of ${f.what} from ${f.limits[0]} to ${f.limits[1]}, got ${describeValue(raw)}`);
    let v: number;
    try {
      v = parseQuantity(raw, f.dimension, path);
    } catch {
      throw wrong();
    }
    if (!Number.isInteger(v) || v < f.limits[0] || v > f.limits[1]) throw wrong();
    return v;
  }
  return positiveQuantity(raw, f.dimension, path);
}

function readBlock(b: BlockDefinition, raw: unknown, inputPolarity: Polarity): DeviceGeometry | ResistorGeometry {
  const example = b.example(inputPolarity);
  const map = asMapping(raw, b.key, example);
  const geometryKeys: readonly string[] = b.kind === 'mos' ? MOS_KEYS : RESISTOR_KEYS;
  refuseUnknownKeys(map, [...geometryKeys, ...b.fields.map((f) => f.key)], b.key);
  const out: Record<string, unknown> = {};
  if (b.kind === 'mos') {
    const pol = own(map, 'polarity');
    if (pol === undefined) throw missing(fieldPath(b.key, 'polarity'), 'polarity: n or polarity: p');
    out['polarity'] = choice(pol, POLARITIES, fieldPath(b.key, 'polarity'));
  }
  const w = own(map, 'w');
  if (w === undefined) throw missing(fieldPath(b.key, 'w'), `the ${b.kind === 'mos' ? 'gate' : 'body'} width, e.g. w: 2 um`);
  const l = own(map, 'l');
  if (l === undefined) throw missing(fieldPath(b.key, 'l'), `the ${b.kind === 'mos' ? 'gate' : 'body'} length, e.g. l: 1 um`);
  out['w'] = positiveQuantity(w, 'length', fieldPath(b.key, 'w'));
  out['l'] = positiveQuantity(l, 'length', fieldPath(b.key, 'l'));
  for (const f of b.fields) {
    const v = own(map, f.key);
    if (v === undefined) {
      if (f.required) throw missing(fieldPath(b.key, f.key), f.example);
      continue;
    }
    out[f.key] = readField(f, v, fieldPath(b.key, f.key));
  }
  return out as unknown as DeviceGeometry | ResistorGeometry;
}

function readParams(raw: unknown, polarity: Polarity, path: string): ProcessParams {
  const map = asMapping(raw, path, '{ vt0: 0.45 V, slope: 1.3, kp: 300 uA/V^2, avt: 5 mV*um, abeta: 1 %*um }');
  refuseUnknownKeys(map, PARAM_KEYS, path);
  const need = (key: 'vt0' | 'slope' | 'kp' | 'avt' | 'abeta'): unknown => {
    const v = own(map, key);
    if (v === undefined) throw missing(fieldPath(path, key), PARAM_EXAMPLES[key]);
    return v;
  };
  const vt0Raw = need('vt0');
  const vt0 = parseQuantity(vt0Raw, 'voltage', fieldPath(path, 'vt0'));
  if (polarity === 'p' && vt0 < 0) {
    throw new InputError(fieldPath(path, 'vt0'), `p-device values are magnitudes; write |V_T0|, e.g. vt0: 0.5 V, got ${describeValue(vt0Raw)}`);
  }
  const slopeRaw = need('slope');
  const slope = parseQuantity(slopeRaw, 'dimensionless', fieldPath(path, 'slope'));
  if (!(slope >= 1)) {
    throw new InputError(fieldPath(path, 'slope'), `must be at least 1 (the slope factor n of a MOS device), got ${describeValue(slopeRaw)}`);
  }
  const kp = positiveQuantity(need('kp'), 'kp', fieldPath(path, 'kp'));
  const avt = positiveQuantity(need('avt'), 'avt', fieldPath(path, 'avt'));
  const abeta = positiveQuantity(need('abeta'), 'abeta', fieldPath(path, 'abeta'));
  const rhoRaw = own(map, 'rho');
  let rho = 0;
  if (rhoRaw !== undefined) {
    rho = parseQuantity(rhoRaw, 'dimensionless', fieldPath(path, 'rho'));
    if (!(Math.abs(rho) <= 1)) throw new InputError(fieldPath(path, 'rho'), `must be a correlation from -1 to 1, got ${describeValue(rhoRaw)}`);
  }
  const optional = (key: 'cox' | 'min_w' | 'min_l', dimension: Dimension): number | undefined => {
    const v = own(map, key);
    return v === undefined ? undefined : positiveQuantity(v, dimension, fieldPath(path, key));
  };
  const cox = optional('cox', 'cox');
  const minW = optional('min_w', 'length');
  const minL = optional('min_l', 'length');
  const expRaw = own(map, 'kp_exponent');
  const kpExponent = expRaw === undefined ? undefined : parseQuantity(expRaw, 'dimensionless', fieldPath(path, 'kp_exponent'));
  return {
    vt0,
    slope,
    kp,
    ...(kpExponent === undefined ? {} : { kpExponent }),
    avt,
    abeta,
    rho,
    ...(cox === undefined ? {} : { cox }),
    ...(minW === undefined ? {} : { minW }),
    ...(minL === undefined ? {} : { minL }),
  };
}

function readProcess(top: Mapping, def: StageDefinition, polarities: readonly Polarity[]): Design['process'] {
  const fix = (pol: Polarity): string => `process.${pol} { vt0, slope, kp, avt, abeta }`;
  const raw = own(top, 'process');
  if (raw === undefined) throw missing('process', `${fix(polarities[0] ?? 'n')} (one entry per polarity used)`);
  const map = asMapping(raw, 'process', '{ n: { vt0: 0.45 V, slope: 1.3, kp: 300 uA/V^2, avt: 5 mV*um, abeta: 1 %*um } }');
  const hasResistors = def.blocks.some((b) => b.kind === 'resistor');
  refuseUnknownKeys(map, hasResistors ? [...PROCESS_KEYS, 'resistor', 'temperature'] : [...PROCESS_KEYS, 'temperature'], 'process');
  const tRaw = own(map, 'temperature');
  const temperature = tRaw === undefined ? undefined : parseQuantity(tRaw, 'temperature', 'process.temperature');
  const nRaw = own(map, 'n');
  const pRaw = own(map, 'p');
  const n = nRaw === undefined ? undefined : readParams(nRaw, 'n', 'process.n');
  const p = pRaw === undefined ? undefined : readParams(pRaw, 'p', 'process.p');
  let resistor: { ar: number } | undefined;
  const rRaw = own(map, 'resistor');
  if (rRaw !== undefined) {
    const rm = asMapping(rRaw, 'process.resistor', '{ ar: 0.5 %*um }');
    refuseUnknownKeys(rm, ['ar'], 'process.resistor');
    const ar = own(rm, 'ar');
    if (ar === undefined) throw missing('process.resistor.ar', 'the resistor matching coefficient, e.g. ar: 0.5 %*um');
    resistor = { ar: positiveQuantity(ar, 'abeta', 'process.resistor.ar') };
  }
  return {
    ...(temperature === undefined ? {} : { temperature }),
    ...(n === undefined ? {} : { n }),
    ...(p === undefined ? {} : { p }),
    ...(resistor === undefined ? {} : { resistor }),
  };
}

function readSpec(top: Mapping, def: StageDefinition): Design['spec'] {
  const fig = def.figure;
  const raw = own(top, 'spec');
  if (raw === undefined) throw missing('spec', `spec: { ${fig.example}, instances: 1 }`);
  const map = asMapping(raw, 'spec', `{ ${fig.example}, instances: 1 }`);
  for (const key of Object.keys(map)) if (key !== fig.specKey && key !== 'instances') throw unknownSpecKey(def, key);
  const off = own(map, fig.specKey);
  if (off === undefined) throw missing(`spec.${fig.specKey}`, `the ${fig.label} limit, e.g. ${fig.example}`);
  let limit: number;
  try {
    limit = positiveQuantity(off, fig.dimension, `spec.${fig.specKey}`);
  } catch (e) {
    // A dimensionless figure's limit is a percentage or a plain fraction: say so rather than "a plain number".
    if (fig.unit !== '' || !(e instanceof InputError) || !e.message.includes('expected a plain number')) throw e;
    throw new InputError(`spec.${fig.specKey}`, `expected a ${fig.label} limit as a percentage or a fraction, e.g. ${fig.example}, got ${describeValue(off)}`);
  }
  const instRaw = own(map, 'instances');
  let instances = 1;
  if (instRaw !== undefined) {
    const wrong = (): InputError => new InputError('spec.instances', `expected a whole number of instances per chip from 1 to 1e12, got ${describeValue(instRaw)}`);
    try {
      instances = parseQuantity(instRaw, 'dimensionless', 'spec.instances');
    } catch {
      throw wrong();
    }
    if (!Number.isInteger(instances) || instances < 1 || instances > 1e12) throw wrong();
  }
  return { [fig.specKey]: limit, instances };
}

/**
 * Parses and checks design-file text (YAML or JSON).
 *
 * Quantities are strings with units (`"2 um"`, `"10 uA"`, `"300 uA/V^2"`, `"5 mV*um"`,
 * `"1 %*um"`, `"27 C"`, `"20 kohm"`) or bare numbers in SI units (kelvin for temperature).
 *
 * @param text the file's contents
 * @param options the syntax and the source name for messages and the default `name`
 * @returns a deeply frozen design in SI units (m, A, V, K, ohm, A/V^2, V*m, m, F/m^2)
 * @throws InputError with the field path (e.g. `input.w`), the bad value and a fix
 * @example
 * const design = parseDesign(text, { source: 'comparator.yaml' });
 * design.input.w // 2e-6 (metres)
 */
export function parseDesign(text: string, options: ParseOptions = {}): Design {
  const source = options.source ?? 'design';
  const format = options.format ?? (/\.json$/i.test(source) ? 'json' : 'yaml');
  const data = format === 'json' ? parseJsonText(text, source) : parseYamlText(text, source);
  if (data === undefined || data === null) {
    throw new InputError('', `${source}: the design file is empty; give temperature, topology, tail, input, process and spec`);
  }
  if (!isMapping(data)) {
    throw new InputError('', `${source}: the top level must be a mapping of fields (temperature: 27 C, topology: simple, ...), got ${describeValue(data)}`);
  }
  const top = data;
  // Before the topology is known, a key no stage type has is still named as a likely typo.
  refuseUnknownKeys(top, [...new Set(STAGES.flatMap(designKeys))], '');
  const topoRaw = own(top, 'topology');
  if (topoRaw === undefined) throw missing('topology', `topology: ${TOPOLOGIES.join(' or ')}`);
  const def = stageDefinition(topoRaw);
  const allowed = designKeys(def);
  for (const key of Object.keys(top)) if (!allowed.includes(key)) throw unknownDesignKey(def, key);

  const name = readName(top, source);
  const temperature = readTemperature(top);
  const fields: Record<string, number> = {};
  for (const f of def.fields) {
    const v = own(top, f.key);
    if (v === undefined) {
      if (f.required) throw missing(f.key, f.example.replace(/^\w+: /, `the ${f.what}, e.g. ${f.key}: `));
      continue;
    }
    fields[f.key] = readField(f, v, f.key);
  }
  const blocks: Record<string, DeviceGeometry | ResistorGeometry> = {};
  let inputPolarity: Polarity = 'n';
  for (const b of def.blocks) {
    const v = own(top, b.key);
    if (v === undefined) {
      const also = b.key === 'input' ? '' : `, or set topology: ${b.key === 'load' ? 'simple' : 'another stage type'}`;
      throw new InputError(b.key, `missing, but topology is ${def.topology}; add ${b.key}: ${b.example(inputPolarity)}${also}`);
    }
    const g = readBlock(b, v, inputPolarity);
    if (b.key === 'input') inputPolarity = (g as DeviceGeometry).polarity;
    blocks[b.key] = g;
  }
  const polarities = def.blocks.flatMap((b) => (b.kind === 'mos' ? [(blocks[b.key] as DeviceGeometry).polarity] : []));
  const process = readProcess(top, def, polarities);
  const spec = readSpec(top, def);
  const conditionsRaw = own(top, 'conditions');
  const conditions = conditionsRaw === undefined ? undefined : readConditions(conditionsRaw, def);
  const design = {
    name,
    temperature,
    topology: def.topology,
    ...fields,
    ...blocks,
    process,
    spec,
    ...(conditions === undefined ? {} : { conditions }),
  } as unknown as Design;
  return deepFreeze(validateDesign(design));
}

function deepFreeze<T>(value: T): T {
  if (typeof value === 'object' && value !== null && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const child of Object.values(value)) deepFreeze(child);
  }
  return value;
}

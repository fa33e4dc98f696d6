/**
 * The design file: YAML or JSON text describing one differential stage, checked field by field
 * and returned as a frozen `Design` in SI units. Every problem is one `InputError` naming the
 * field path, the bad value and a fix; nothing else escapes.
 */
import { readFile, stat } from 'node:fs/promises';
import { basename, extname } from 'node:path';
import { InputError, parseQuantity, validateDesign } from '@twinfet/core';
import type {
  Design,
  DeviceGeometry,
  Dimension,
  OffsetSpec,
  Polarity,
  ProcessParams,
  TopologyName,
} from '@twinfet/core';
import { closestWord } from './didYouMean.js';
import { asMapping, describeValue, fieldPath, isMapping, own, refuseUnknownKeys } from './fieldReader.js';
import type { Mapping } from './fieldReader.js';
import { parseYamlText } from './yamlText.js';

const TOP_KEYS = ['name', 'temperature', 'topology', 'tail', 'input', 'load', 'process', 'spec'] as const;
const DEVICE_KEYS = ['polarity', 'w', 'l'] as const;
const PROCESS_KEYS = ['n', 'p'] as const;
const PARAM_KEYS = ['vt0', 'slope', 'kp', 'avt', 'abeta', 'rho', 'cox', 'wmin', 'lmin'] as const;
const SPEC_KEYS = ['offset', 'instances'] as const;
const TOPOLOGIES: readonly TopologyName[] = ['simple', 'mirror'];
const POLARITIES: readonly Polarity[] = ['n', 'p'];

/** Largest instance count accepted (1e12 keeps Y^M and 1 - Y^(1/M) meaningful in doubles). */
const MAX_INSTANCES = 1e12;
/** Design files are a few hundred bytes; anything this large is the wrong file. */
const MAX_FILE_BYTES = 1 << 20;

/** Example values quoted in "missing" messages, per process parameter. */
const PARAM_EXAMPLES: Readonly<Record<(typeof PARAM_KEYS)[number], string>> = {
  vt0: 'vt0: 0.45 V',
  slope: 'slope: 1.3',
  kp: 'kp: 300 uA/V^2',
  avt: 'avt: 5 mV*um',
  abeta: 'abeta: 1 %*um',
  rho: 'rho: 0',
  cox: 'cox: 8.6 fF/um^2',
  wmin: 'wmin: 0.22 um',
  lmin: 'lmin: 0.18 um',
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

function readName(map: Mapping, source: string): string {
  const raw = own(map, 'name');
  if (raw === undefined) {
    const base = basename(source);
    const stem = base.slice(0, base.length - extname(base).length);
    return stem === '' ? (base === '' ? 'design' : base) : stem;
  }
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
  if (!(kelvin > 0)) {
    throw new InputError('temperature', `must be above absolute zero (0 K), got ${describeValue(raw)}`);
  }
  return kelvin;
}

function readDevice(raw: unknown, path: string, example: string): DeviceGeometry {
  const map = asMapping(raw, path, example);
  refuseUnknownKeys(map, DEVICE_KEYS, path);
  const pol = own(map, 'polarity');
  if (pol === undefined) throw missing(fieldPath(path, 'polarity'), 'polarity: n or polarity: p');
  const polarity = choice(pol, POLARITIES, fieldPath(path, 'polarity'));
  const w = own(map, 'w');
  if (w === undefined) throw missing(fieldPath(path, 'w'), 'the gate width, e.g. w: 2 um');
  const l = own(map, 'l');
  if (l === undefined) throw missing(fieldPath(path, 'l'), 'the gate length, e.g. l: 1 um');
  return {
    polarity,
    w: positiveQuantity(w, 'length', fieldPath(path, 'w')),
    l: positiveQuantity(l, 'length', fieldPath(path, 'l')),
  };
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
    throw new InputError(
      fieldPath(path, 'vt0'),
      `p-device values are magnitudes; write |V_T0|, e.g. vt0: 0.5 V, got ${describeValue(vt0Raw)}`,
    );
  }
  const slopeRaw = need('slope');
  const slope = parseQuantity(slopeRaw, 'dimensionless', fieldPath(path, 'slope'));
  if (!(slope >= 1)) {
    throw new InputError(
      fieldPath(path, 'slope'),
      `must be at least 1 (the slope factor n of a MOS device), got ${describeValue(slopeRaw)}`,
    );
  }
  const kp = positiveQuantity(need('kp'), 'kp', fieldPath(path, 'kp'));
  const avt = positiveQuantity(need('avt'), 'avt', fieldPath(path, 'avt'));
  const abeta = positiveQuantity(need('abeta'), 'abeta', fieldPath(path, 'abeta'));

  const rhoRaw = own(map, 'rho');
  let rho = 0;
  if (rhoRaw !== undefined) {
    rho = parseQuantity(rhoRaw, 'dimensionless', fieldPath(path, 'rho'));
    if (!(Math.abs(rho) <= 1)) {
      throw new InputError(fieldPath(path, 'rho'), `must be a correlation from -1 to 1, got ${describeValue(rhoRaw)}`);
    }
  }

  const optional = (key: 'cox' | 'wmin' | 'lmin', dimension: Dimension): number | undefined => {
    const v = own(map, key);
    return v === undefined ? undefined : positiveQuantity(v, dimension, fieldPath(path, key));
  };
  const cox = optional('cox', 'cox');
  const wmin = optional('wmin', 'length');
  const lmin = optional('lmin', 'length');

  return {
    vt0,
    slope,
    kp,
    avt,
    abeta,
    rho,
    ...(cox === undefined ? {} : { cox }),
    ...(wmin === undefined ? {} : { wmin }),
    ...(lmin === undefined ? {} : { lmin }),
  };
}

function readSpec(raw: unknown): OffsetSpec {
  const map = asMapping(raw, 'spec', '{ offset: 10 mV, instances: 1 }');
  refuseUnknownKeys(map, SPEC_KEYS, 'spec');
  const off = own(map, 'offset');
  if (off === undefined) throw missing('spec.offset', 'the |Vos| limit, e.g. offset: 10 mV');
  const offset = positiveQuantity(off, 'voltage', 'spec.offset');
  const instRaw = own(map, 'instances');
  let instances = 1;
  if (instRaw !== undefined) {
    const wrong = (): InputError =>
      new InputError(
        'spec.instances',
        `expected a whole number of instances per chip from 1 to 1e12, got ${describeValue(instRaw)}`,
      );
    try {
      instances = parseQuantity(instRaw, 'dimensionless', 'spec.instances');
    } catch {
      throw wrong();
    }
    if (!Number.isInteger(instances) || instances < 1 || instances > MAX_INSTANCES) throw wrong();
  }
  return { offset, instances };
}

function deepFreeze<T>(value: T): T {
  if (typeof value === 'object' && value !== null && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const child of Object.values(value)) deepFreeze(child);
  }
  return value;
}

/**
 * Parses and checks design-file text (YAML or JSON).
 *
 * Quantities are strings with units (`"2 um"`, `"10 uA"`, `"300 uA/V^2"`, `"5 mV*um"`,
 * `"1 %*um"`, `"27 C"`) or bare numbers in SI units (kelvin for temperature). See the README's
 * design-file reference for every field and range.
 *
 * @param text the file's contents
 * @param source file name for messages and the default `name`
 * @returns a deeply frozen design in SI units (m, A, V, K, A/V^2, V*m, m, F/m^2)
 * @throws InputError with the field path (e.g. `input.w`), the bad value and a fix
 */
export function parseDesign(text: string, source: string): Design {
  const data = parseYamlText(text, source);
  if (data === undefined || data === null) {
    throw new InputError(
      '',
      `${source}: the design file is empty; give temperature, topology, tail, input, process and spec`,
    );
  }
  if (!isMapping(data)) {
    throw new InputError(
      '',
      `${source}: the top level must be a mapping of fields (temperature: 27 C, topology: simple, ...), got ${describeValue(data)}`,
    );
  }
  const top = data;
  refuseUnknownKeys(top, TOP_KEYS, '');

  const name = readName(top, source);
  const temperature = readTemperature(top);

  const topoRaw = own(top, 'topology');
  if (topoRaw === undefined) throw missing('topology', 'topology: simple or topology: mirror');
  const topology = choice(topoRaw, TOPOLOGIES, 'topology');

  const tailRaw = own(top, 'tail');
  if (tailRaw === undefined) throw missing('tail', 'the tail current, e.g. tail: 10 uA');
  const tail = positiveQuantity(tailRaw, 'current', 'tail');

  const inputRaw = own(top, 'input');
  if (inputRaw === undefined) throw missing('input', 'input: { polarity: n, w: 2 um, l: 1 um }');
  const input = readDevice(inputRaw, 'input', '{ polarity: n, w: 2 um, l: 1 um }');

  const other: Polarity = input.polarity === 'n' ? 'p' : 'n';
  const loadExample = `{ polarity: ${other}, w: 4 um, l: 2 um }`;
  const loadRaw = own(top, 'load');
  let load: DeviceGeometry | undefined;
  if (topology === 'mirror') {
    if (loadRaw === undefined) {
      throw new InputError('load', `missing, but topology is mirror; add load: ${loadExample}, or set topology: simple`);
    }
    load = readDevice(loadRaw, 'load', loadExample);
    if (load.polarity === input.polarity) {
      throw new InputError(
        'load.polarity',
        `a mirror load is the opposite polarity of the input pair (input is ${input.polarity}), so expected ${other}, got "${load.polarity}"`,
      );
    }
  } else if (loadRaw !== undefined) {
    throw new InputError('load', 'a simple stage has ideal loads; remove load or set topology: mirror');
  }

  const processRaw = own(top, 'process');
  const paramsFix = (pol: Polarity): string => `process.${pol} { vt0, slope, kp, avt, abeta }`;
  if (processRaw === undefined) throw missing('process', `${paramsFix(input.polarity)} (one entry per polarity used)`);
  const processMap = asMapping(processRaw, 'process', '{ n: { vt0: 0.45 V, slope: 1.3, kp: 300 uA/V^2, avt: 5 mV*um, abeta: 1 %*um } }');
  refuseUnknownKeys(processMap, PROCESS_KEYS, 'process');
  const nRaw = own(processMap, 'n');
  const pRaw = own(processMap, 'p');
  const n = nRaw === undefined ? undefined : readParams(nRaw, 'n', 'process.n');
  const p = pRaw === undefined ? undefined : readParams(pRaw, 'p', 'process.p');
  const users: ReadonlyArray<readonly [string, DeviceGeometry | undefined]> = [
    ['input', input],
    ['load', load],
  ];
  for (const [user, device] of users) {
    if (device === undefined) continue;
    if ((device.polarity === 'n' ? n : p) === undefined) {
      throw new InputError(
        `process.${device.polarity}`,
        `missing, but ${user} uses a${device.polarity === 'n' ? 'n' : ''} ${device.polarity}-device; add ${paramsFix(device.polarity)}`,
      );
    }
  }

  const specRaw = own(top, 'spec');
  if (specRaw === undefined) throw missing('spec', 'spec: { offset: 10 mV, instances: 1 }');
  const spec = readSpec(specRaw);

  const design: Design = {
    name,
    temperature,
    topology,
    tail,
    input,
    ...(load === undefined ? {} : { load }),
    process: { ...(n === undefined ? {} : { n }), ...(p === undefined ? {} : { p }) },
    spec,
  };
  // The library's own edge check; everything it tests was checked above, so this only guards
  // against the two drifting apart.
  return deepFreeze(validateDesign(design));
}

/** The one-line reason a design file cannot be read, from a Node file-system error. */
function fileProblem(path: string, e: unknown): InputError {
  const code = typeof e === 'object' && e !== null && 'code' in e ? String(e.code) : '';
  switch (code) {
    case 'ENOENT':
    case 'ENOTDIR':
      return new InputError('', `${path}: no such file; check the path`);
    case 'EISDIR':
      return new InputError('', `${path}: is a directory; give the path of a design file (.yaml or .json)`);
    case 'EACCES':
    case 'EPERM':
      return new InputError('', `${path}: cannot read the file (permission denied)`);
    default: {
      const why = e instanceof Error ? e.message.split('\n', 1)[0] : String(e);
      return new InputError('', `${path}: cannot read the file (${why ?? code})`);
    }
  }
}

/**
 * Reads and checks a design file (YAML or JSON, UTF-8).
 *
 * @param path the file's path
 * @returns a deeply frozen design in SI units
 * @throws InputError for a missing, unreadable or oversized file, or any problem in its contents
 */
export async function loadDesign(path: string): Promise<Design> {
  if (path === '') throw new InputError('', 'no design file given; pass the path of a .yaml or .json file');
  let text: string;
  try {
    const info = await stat(path);
    if (info.isDirectory()) {
      throw new InputError('', `${path}: is a directory; give the path of a design file (.yaml or .json)`);
    }
    if (info.size > MAX_FILE_BYTES) {
      throw new InputError('', `${path}: ${info.size} bytes is too large for a design file (limit 1 MiB); check the path`);
    }
    text = await readFile(path, 'utf8');
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw fileProblem(path, e);
  }
  return parseDesign(text, path);
}

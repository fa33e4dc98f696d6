/**
 * The library's edge: every rule a design must meet, in SI units, whoever built it (the
 * design-file reader or a program). Throws InputError naming the field; returns the design with
 * its defaults filled in (rho 0, one instance, a name), frozen.
 */
import type { Design, DeviceGeometry, Polarity, ProcessParams } from './design.js';
import { InputError } from './errors.js';
import { DESIGN_LIMITS, MAX_DEVICE_SIGMA_BETA } from './limits.js';
import { closestWord } from './parse/didYouMean.js';
import type { BlockDefinition, FieldDefinition, StageDefinition } from './stages/definition.js';
import { alternatives, STAGES, stageDefinition, topologiesWith } from './stages/registry.js';
import { fieldPath } from './parse/fieldReader.js';
import { validateConditions } from './conditions.js';
import { designAtTemperature } from './temperatureLaw.js';

function shown(value: unknown): string {
  return typeof value === 'string' ? JSON.stringify(value) : String(value);
}

function positive(value: unknown, field: string, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new InputError(field, `expected a positive finite ${what}, got ${shown(value)}`);
  }
  return value;
}

/** `positive`, then lo <= value <= hi (lo = 0 means only > 0 is required). */
function within(value: unknown, field: string, what: string, [lo, hi]: readonly [number, number], unit: string): number {
  const v = positive(value, field, what);
  if (v < lo || v > hi) {
    const from = lo === 0 ? 'above 0' : `from ${lo} ${unit}`;
    throw new InputError(field, `expected a ${what} ${from} to ${hi} ${unit}, got ${v} ${unit}; check the unit prefix`);
  }
  return v;
}

function wholeNumber(value: unknown, field: string, what: string, [lo, hi]: readonly [number, number]): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < lo || value > hi) {
    throw new InputError(field, `expected a whole number of ${what} from ${lo} to ${hi}, got ${shown(value)}`);
  }
  return value;
}

function checkField(f: FieldDefinition, value: unknown, path: string): void {
  if (f.integer === true) wholeNumber(value, path, f.what, f.limits);
  else within(value, path, f.what, f.limits, f.unit);
}

function checkCurrentFactorSigma(dev: DeviceGeometry, p: ProcessParams, field: string): void {
  const sigma = p.abeta / Math.sqrt(2 * dev.w * dev.l);
  if (!(sigma <= MAX_DEVICE_SIGMA_BETA)) {
    throw new InputError(
      field,
      `sigma(dbeta/beta) = A_beta / sqrt(2 W L) is ${(100 * sigma).toPrecision(3)}% per device, beyond the ${100 * MAX_DEVICE_SIGMA_BETA}% the model accepts; enlarge ${field}.w * ${field}.l or check process.${dev.polarity}.abeta`,
    );
  }
}

function checkProcess(p: ProcessParams, polarity: Polarity): void {
  const field = `process.${polarity}`;
  if (typeof p !== 'object' || p === null) throw new InputError(field, 'expected { vt0, slope, kp, avt, abeta }');
  if (typeof p.vt0 !== 'number' || !Number.isFinite(p.vt0)) {
    throw new InputError(`${field}.vt0`, `expected a finite voltage, got ${shown(p.vt0)}`);
  }
  if (polarity === 'p' && p.vt0 < 0) {
    throw new InputError(`${field}.vt0`, `p-device values are magnitudes; write |V_T0|, e.g. vt0: 0.5 V, got ${p.vt0} V`);
  }
  const [slopeLo, slopeHi] = DESIGN_LIMITS.slope;
  if (typeof p.slope !== 'number' || !Number.isFinite(p.slope) || p.slope < slopeLo || p.slope > slopeHi) {
    throw new InputError(`${field}.slope`, `must be a slope factor n from ${slopeLo} to ${slopeHi} (at least 1 for a MOS device), got ${shown(p.slope)}`);
  }
  within(p.kp, `${field}.kp`, 'KP', DESIGN_LIMITS.kp, 'A/V^2');
  within(p.avt, `${field}.avt`, 'A_VT', DESIGN_LIMITS.avt, 'V*m');
  within(p.abeta, `${field}.abeta`, 'A_beta', DESIGN_LIMITS.abeta, 'm (fraction*m)');
  if (p.rho !== undefined && (typeof p.rho !== 'number' || !Number.isFinite(p.rho) || Math.abs(p.rho) > 1)) {
    throw new InputError(`${field}.rho`, `must be a correlation from -1 to 1, got ${shown(p.rho)}`);
  }
  if (p.cox !== undefined) within(p.cox, `${field}.cox`, 'Cox', DESIGN_LIMITS.cox, 'F/m^2');
  if (p.minW !== undefined) positive(p.minW, `${field}.min_w`, 'smallest drawn width in metres');
  if (p.minL !== undefined) positive(p.minL, `${field}.min_l`, 'smallest drawn length in metres');
  if (p.kpExponent !== undefined) {
    const [lo, hi] = DESIGN_LIMITS.kpExponent;
    if (typeof p.kpExponent !== 'number' || !Number.isFinite(p.kpExponent) || p.kpExponent < lo || p.kpExponent > hi) {
      throw new InputError(`${field}.kp_exponent`, `expected a mobility temperature exponent from ${lo} to ${hi} such as -1.5, got ${shown(p.kpExponent)}`);
    }
  }
}


/** The keys of a design common to every stage type. */
export const COMMON_DESIGN_KEYS = ['name', 'temperature', 'topology', 'process', 'spec'] as const;

/** Every top-level key a design of this stage type may hold, in the documented order. */
export function designKeys(def: StageDefinition): string[] {
  return ['name', 'temperature', 'topology', ...def.fields.map((f) => f.key), ...def.blocks.map((b) => b.key), 'process', 'spec', 'conditions'];
}

/**
 * The refusal for a top-level key the stage type does not have: another stage's block (with the
 * topologies that have it), or a likely typo.
 */
export function unknownDesignKey(def: StageDefinition, key: string): InputError {
  const others = topologiesWith(key);
  if (others.length > 0) {
    const what = def.topology === 'simple' && key === 'load' ? 'a simple stage has ideal loads' : `a ${def.topology} stage has no ${key}`;
    return new InputError(key, `${what}; remove ${key} or set topology: ${alternatives(others)}`);
  }
  const guess = closestWord(key, designKeys(def));
  const hint = guess === undefined ? `expected one of ${designKeys(def).join(', ')}` : `did you mean "${guess}"?`;
  return new InputError(fieldPath('', key), `unknown key; ${hint}`);
}

/** The refusal for a spec key: another stage type's figure (naming this one's), or a typo. */
export function unknownSpecKey(def: StageDefinition, key: string): InputError {
  const fig = def.figure;
  const other = STAGES.some((s) => s.figure.specKey === key);
  const guess = other ? fig.specKey : closestWord(key, [fig.specKey, 'instances']);
  const why = other ? `a ${def.topology} stage is specified by its ${fig.label} (${fig.example})` : 'unknown key';
  return new InputError(fieldPath('spec', key), `${why}; ${guess === undefined ? `expected one of ${fig.specKey}, instances` : `did you mean "${guess}"?`}`);
}

function checkBlock(design: Design, def: StageDefinition, b: BlockDefinition, inputPolarity: Polarity | undefined): void {
  const raw = design[b.key];
  if (typeof raw !== 'object' || raw === null) {
    throw new InputError(b.key, `missing, but topology is ${def.topology}; add ${b.key}: ${b.example(inputPolarity ?? 'n')}`);
  }
  const g = raw as Record<string, unknown>;
  if (b.kind === 'mos') {
    const pol = g['polarity'];
    if (pol !== 'n' && pol !== 'p') throw new InputError(`${b.key}.polarity`, `expected "n" or "p", got ${shown(pol)}`);
    if (inputPolarity !== undefined && b.polarity !== 'any') {
      const want = b.polarity === 'same-as-input' ? inputPolarity : inputPolarity === 'n' ? 'p' : 'n';
      if (pol !== want) {
        const rel = b.polarity === 'same-as-input' ? 'the same' : 'the opposite';
        throw new InputError(`${b.key}.polarity`, `the ${b.label} is ${rel} polarity as the input devices (input is ${inputPolarity}), so expected ${want}, got "${pol}"`);
      }
    }
  }
  within(g['w'], `${b.key}.w`, 'width', DESIGN_LIMITS.length, 'm');
  within(g['l'], `${b.key}.l`, 'length', DESIGN_LIMITS.length, 'm');
  for (const f of b.fields) {
    const v = g[f.key];
    if (v === undefined) {
      if (f.required) throw new InputError(`${b.key}.${f.key}`, `missing; add ${f.example}`);
      continue;
    }
    checkField(f, v, `${b.key}.${f.key}`);
  }
  if (b.kind === 'mos') {
    const polarity = g['polarity'] as Polarity;
    const p = design.process?.[polarity];
    if (p === undefined) {
      throw new InputError(`process.${polarity}`, `missing, but ${b.key} uses a${polarity === 'n' ? 'n' : ''} ${polarity}-device; add process.${polarity} { vt0, slope, kp, avt, abeta }`);
    }
    checkProcess(p, polarity);
    checkCurrentFactorSigma(g as unknown as DeviceGeometry, p, b.key);
  } else {
    const r = design.process?.resistor;
    if (r === undefined || typeof r !== 'object' || r === null) {
      throw new InputError('process.resistor', `missing, but ${b.key} holds resistors; add process.resistor { ar: 0.5 %*um }`);
    }
    within(r.ar, 'process.resistor.ar', 'A_R', DESIGN_LIMITS.ar, 'm (fraction*m)');
  }
}

function withDefaults(design: Design): Design {
  const params = (p: ProcessParams | undefined): ProcessParams | undefined => (p === undefined || p.rho !== undefined ? p : { ...p, rho: 0 });
  const n = params(design.process.n);
  const p = params(design.process.p);
  const complete = n === design.process.n && p === design.process.p && design.spec.instances !== undefined && typeof design.name === 'string';
  if (complete) return design;
  return deepFreeze({
    ...design,
    name: design.name ?? 'design',
    process: {
      ...design.process,
      ...(n === undefined ? {} : { n }),
      ...(p === undefined ? {} : { p }),
    },
    spec: { ...design.spec, instances: design.spec.instances ?? 1 },
  });
}

function deepFreeze<T>(value: T): T {
  if (typeof value === 'object' && value !== null && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const child of Object.values(value)) deepFreeze(child);
  }
  return value;
}

/**
 * Checks a design in SI units at the library's edge, with every rule the design-file reader
 * applies (the reader checks syntax and units, then calls this).
 * @returns the same design when nothing was left to its default, else a deeply frozen copy with
 *   the defaults (rho = 0, instances = 1, name "design") filled in
 * @throws InputError naming the field, the bad value and the fix
 */
export function validateDesign(design: Design): Design {
  if (typeof design !== 'object' || design === null) throw new InputError('design', 'expected an object');
  const def = stageDefinition(design.topology);
  const allowed = designKeys(def);
  for (const key of Object.keys(design)) {
    if (!allowed.includes(key) && design[key] !== undefined) throw unknownDesignKey(def, key);
  }
  if (design.name !== undefined && (typeof design.name !== 'string' || design.name.trim() === '')) {
    throw new InputError('name', `expected non-empty text such as "Comparator front end", got ${shown(design.name)}`);
  }
  within(design.temperature, 'temperature', 'temperature', DESIGN_LIMITS.temperature, 'K');
  for (const f of def.fields) {
    const v = design[f.key];
    if (v === undefined) {
      if (f.required) throw new InputError(f.key, `missing; add ${f.example}`);
      continue;
    }
    checkField(f, v, f.key);
  }
  if (typeof design.process !== 'object' || design.process === null) {
    throw new InputError('process', 'missing; add process.n or process.p { vt0, slope, kp, avt, abeta }');
  }
  const inputPolarity = (design.input as DeviceGeometry | undefined)?.polarity;
  for (const b of def.blocks) checkBlock(design, def, b, b.key === 'input' ? undefined : inputPolarity);
  for (const pol of ['n', 'p'] as const) {
    const p = design.process[pol];
    if (p !== undefined) checkProcess(p, pol);
  }
  if (design.process.temperature !== undefined) {
    within(design.process.temperature, 'process.temperature', 'temperature', DESIGN_LIMITS.temperature, 'K');
  }
  designAtTemperature(design); // KP moved to the design temperature must stay in range
  if (typeof design.spec !== 'object' || design.spec === null) {
    throw new InputError('spec', `missing; give { ${def.figure.example}, instances: 1 }`);
  }
  const fig = def.figure;
  for (const key of Object.keys(design.spec)) if (key !== fig.specKey && key !== 'instances') throw unknownSpecKey(def, key);
  const limit = design.spec[fig.specKey];
  if (limit === undefined) throw new InputError(`spec.${fig.specKey}`, `missing; add ${fig.example}`);
  if (fig.unit === '') {
    // A dimensionless figure is written and shown in %: so are its limits.
    const v = positive(limit, `spec.${fig.specKey}`, `${fig.label} limit`);
    const [lo, hi] = fig.limits;
    if (v < lo || v > hi) throw new InputError(`spec.${fig.specKey}`, `expected a ${fig.label} limit ${lo === 0 ? 'above 0 %' : `from ${100 * lo} %`} up to ${100 * hi} %, got ${Number((100 * v).toPrecision(6))} %`);
  } else within(limit, `spec.${fig.specKey}`, `${fig.label} limit`, fig.limits, fig.unit);
  if (design.spec.instances !== undefined) wholeNumber(design.spec.instances, 'spec.instances', 'instances per chip', DESIGN_LIMITS.instances);
  def.validate?.(design);
  validateConditions(design, def, validateDesign);
  return withDefaults(design);
}

/** The limit the spec sets on the stage's figure (validated designs always have it). */
export function specLimit(design: Design): number {
  const key = stageDefinition(design.topology).figure.specKey;
  const v = design.spec[key];
  if (v === undefined) throw new Error(`internal: spec.${key} missing after validation`);
  return v;
}

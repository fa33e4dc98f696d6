/**
 * Operating conditions: the same instance (the same mismatch draws) at another temperature, bias
 * or global process shift. A condition is turned into a plain design of the same stage type
 * (`conditionDesign`), which that stage's own module compiles; nothing here knows a stage type
 * beyond its definition's fields and blocks.
 */
import type { Design, OperatingCondition, Polarity, PolarityShift, ProcessParams } from './design.js';
import { InputError } from './errors.js';
import { DESIGN_LIMITS } from './limits.js';
import { closestWord } from './parse/didYouMean.js';
import { describeValue, fieldPath, isMapping } from './parse/fieldReader.js';
import type { BlockDefinition, FieldDefinition, StageDefinition } from './stages/definition.js';
import { stageDefinition, STAGES } from './stages/registry.js';
import { designAtTemperature } from './temperatureLaw.js';

/** The keys a polarity's shift may hold. */
export const SHIFT_KEYS = ['kp', 'vt0'] as const;

/** The stage fields a condition may set: top-level bias fields, and the blocks' own fields. */
export interface ConditionFields {
  /** Top-level fields (`tail`); whole-number fields (a cell count) are structure, not condition. */
  readonly top: readonly FieldDefinition[];
  /** Blocks with fields beyond their geometry (`sources: { current }`), with those fields. */
  readonly blocks: readonly { readonly block: BlockDefinition; readonly fields: readonly FieldDefinition[] }[];
}

/** What a condition of this stage type may set besides its name, temperature and shift. */
export function conditionFields(def: StageDefinition): ConditionFields {
  const bias = (f: FieldDefinition): boolean => f.integer !== true;
  return {
    top: def.fields.filter(bias),
    blocks: def.blocks.filter((b) => b.fields.some(bias)).map((block) => ({ block, fields: block.fields.filter(bias) })),
  };
}

/** Every key a condition of this stage type may hold, in the documented order. */
export function conditionKeys(def: StageDefinition): string[] {
  const f = conditionFields(def);
  return ['name', 'temperature', ...f.top.map((x) => x.key), ...f.blocks.map((b) => b.block.key), 'shift'];
}

/** The path of condition `i` (`conditions[2]`). */
export function conditionPath(i: number): string {
  return `conditions[${i}]`;
}

function shiftedParams(p: ProcessParams, s: PolarityShift | undefined): ProcessParams {
  if (s === undefined) return p;
  return {
    ...p,
    ...(s.kp === undefined ? {} : { kp: p.kp * (1 + s.kp) }),
    ...(s.vt0 === undefined ? {} : { vt0: p.vt0 + s.vt0 }),
  };
}

/**
 * The design at one condition: its temperature, fields and process shifts over the design's
 * own values, and `process.temperature` pinned to where KP is given (the design's temperature
 * unless the process says otherwise), so the temperature law moves KP from there. A condition
 * that changes nothing gives a design that compiles to exactly the design's own numbers.
 */
export function conditionDesign(design: Design, condition: OperatingCondition): Design {
  const def = stageDefinition(design.topology);
  const fields = conditionFields(def);
  const { conditions: _all, ...base } = design;
  const out: Record<string, unknown> = { ...base, temperature: condition.temperature ?? design.temperature };
  for (const f of fields.top) if (condition[f.key] !== undefined) out[f.key] = condition[f.key];
  for (const { block } of fields.blocks) {
    const given = condition[block.key];
    if (given !== undefined) out[block.key] = { ...(design[block.key] as object), ...(given as object) };
  }
  const s = condition.shift;
  const pol = (k: Polarity): ProcessParams | undefined => {
    const p = design.process[k];
    return p === undefined ? undefined : shiftedParams(p, s?.[k]);
  };
  const n = pol('n');
  const p = pol('p');
  out['process'] = {
    ...design.process,
    temperature: design.process.temperature ?? design.temperature,
    ...(n === undefined ? {} : { n }),
    ...(p === undefined ? {} : { p }),
  };
  return out as Design;
}

/** The design at every condition, in the listed order (empty without conditions). */
export function conditionDesigns(design: Design): Design[] {
  return (design.conditions ?? []).map((c) => conditionDesign(design, c));
}

/**
 * A condition as reports echo it: name, temperature (K), the effective value of each field a
 * condition may set (inherited or its own), and the shifts it gives.
 */
export function conditionSummary(design: Design, condition: OperatingCondition): Record<string, unknown> {
  const def = stageDefinition(design.topology);
  const f = conditionFields(def);
  const d = conditionDesign(design, condition);
  const out: Record<string, unknown> = { name: condition.name, temperature: d.temperature };
  for (const x of f.top) if (d[x.key] !== undefined) out[x.key] = d[x.key];
  for (const { block, fields } of f.blocks) {
    const g = d[block.key] as Record<string, unknown>;
    const own: Record<string, unknown> = {};
    for (const x of fields) if (g[x.key] !== undefined) own[x.key] = g[x.key];
    if (Object.keys(own).length > 0) out[block.key] = own;
  }
  if (condition.shift !== undefined) out['shift'] = condition.shift;
  return out;
}

/** Everything but the name and temperature of a condition, as text: equal text, equal condition. */
function signature(design: Design, c: OperatingCondition): string {
  const { name: _n, temperature: _t, ...rest } = conditionSummary(design, c);
  const shift = c.shift;
  const norm = (s: PolarityShift | undefined): PolarityShift => ({ kp: s?.kp ?? 0, vt0: s?.vt0 ?? 0 });
  return JSON.stringify({ ...rest, shift: { n: norm(shift?.n), p: norm(shift?.p) } });
}

/** The two conditions a drift is taken between, by index into `design.conditions`. */
export interface DriftPair {
  readonly from: number;
  readonly to: number;
}

const byName = (design: Design) => (a: number, b: number): number => {
  const x = design.conditions![a]!.name;
  const y = design.conditions![b]!.name;
  return x < y ? -1 : x > y ? 1 : 0;
};

/**
 * The default drift pair: among conditions that differ only in temperature, the coldest and the
 * hottest of the group with the widest span; none when no two such conditions exist. Ties are
 * broken by name, so the order of the list never matters.
 */
export function defaultDriftPair(design: Design): DriftPair | null {
  const cs = design.conditions ?? [];
  const temps = conditionDesigns(design).map((d) => d.temperature);
  const groups = new Map<string, number[]>();
  cs.forEach((c, i) => {
    const key = signature(design, c);
    groups.set(key, [...(groups.get(key) ?? []), i]);
  });
  const order = byName(design);
  let best: { pair: DriftPair; span: number } | null = null;
  for (const members of groups.values()) {
    const sorted = [...members].sort(order);
    let cold = sorted[0]!;
    let hot = sorted[0]!;
    for (const i of sorted) {
      if (temps[i]! < temps[cold]!) cold = i;
      if (temps[i]! > temps[hot]!) hot = i;
    }
    const span = temps[hot]! - temps[cold]!;
    if (!(span > 0)) continue;
    const better =
      best === null ||
      span > best.span ||
      (span === best.span && (order(cold, best.pair.from) < 0 || (cold === best.pair.from && order(hot, best.pair.to) < 0)));
    if (better) best = { pair: { from: cold, to: hot }, span };
  }
  return best === null ? null : best.pair;
}

/**
 * The drift pair named `from,to` (condition names), checked against the design.
 * @throws InputError on `option` for a design without conditions, an unknown name (with the
 *   closest spelling) or two conditions at one temperature
 */
export function namedDriftPair(design: Design, names: readonly [string, string], option = 'drift'): DriftPair {
  const cs = design.conditions ?? [];
  if (cs.length === 0) throw new InputError(option, 'the design has no conditions; add a conditions list (e.g. cold and hot) to take a drift between two of them');
  const all = cs.map((c) => c.name);
  const find = (name: string): number => {
    const i = all.indexOf(name);
    if (i >= 0) return i;
    const guess = closestWord(name, all);
    throw new InputError(option, `unknown condition ${JSON.stringify(name)}${guess === undefined ? '' : `; did you mean "${guess}"?`} (the conditions are ${all.join(', ')})`);
  };
  const from = find(names[0]);
  const to = find(names[1]);
  const temps = conditionDesigns(design).map((d) => d.temperature);
  if (temps[from] === temps[to]) {
    throw new InputError(option, `${names[0]} and ${names[1]} are at the same temperature (${temps[from]} K); a drift needs two temperatures`);
  }
  return { from, to };
}

/**
 * Refuses keys a condition of this stage type cannot hold: the geometry of a block (the
 * instance's own at every condition), a structural field, another stage type's field, a typo.
 * @throws InputError `conditions[i].<key>: ...`
 */
export function refuseConditionKeys(map: Readonly<Record<string, unknown>>, def: StageDefinition, path: string): void {
  const keys = conditionKeys(def);
  const sets = keys.slice(1).join(', ');
  refuse(map, keys, path, (key) => {
    if (def.blocks.some((b) => b.key === key)) {
      return `the ${key} block's geometry is the instance's own and the same at every condition; a condition sets only ${sets}`;
    }
    if (def.fields.some((f) => f.key === key)) return `${key} sets the stage's structure and cannot change with a condition`;
    const owners = STAGES.filter((s) => s.topology !== def.topology && conditionKeys(s).includes(key));
    if (owners.length > 0) return `a ${def.topology} stage has no ${key}; a condition of this stage sets ${sets}`;
    return undefined;
  });
}

// ---- validation (called by validateDesign, which passes itself in to check each condition's design)

function fail(path: string, message: string): never {
  throw new InputError(path, message);
}

function inRange(value: unknown, path: string, what: string, [lo, hi]: readonly [number, number], unit: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < lo || value > hi) {
    fail(path, `expected a ${what} from ${lo} ${unit} to ${hi} ${unit}, got ${typeof value === 'number' ? `${value} ${unit}` : describeValue(value)}`);
  }
  return value;
}

function refuse(map: Record<string, unknown>, allowed: readonly string[], path: string, other?: (key: string) => string | undefined): void {
  for (const key of Object.keys(map)) {
    if (allowed.includes(key) || map[key] === undefined) continue;
    const why = other?.(key);
    if (why !== undefined) fail(fieldPath(path, key), why);
    const guess = closestWord(key, allowed);
    fail(fieldPath(path, key), `unknown key; ${guess === undefined ? `expected one of ${allowed.join(', ')}` : `did you mean "${guess}"?`}`);
  }
}

function checkShift(design: Design, raw: unknown, path: string): void {
  if (!isMapping(raw)) fail(path, `expected a mapping such as { n: { kp: -10 % } }, got ${describeValue(raw)}`);
  refuse(raw, ['n', 'p'], path);
  for (const pol of ['n', 'p'] as const) {
    const s = raw[pol];
    if (s === undefined) continue;
    const sp = fieldPath(path, pol);
    if (!isMapping(s)) fail(sp, `expected a mapping such as { kp: -10 %, vt0: 20 mV }, got ${describeValue(s)}`);
    refuse(s, SHIFT_KEYS, sp);
    const proc = design.process[pol];
    if (proc === undefined) fail(sp, `the design has no process.${pol}, so there is nothing to shift; remove ${sp}`);
    if (s['kp'] !== undefined) {
      const kp = s['kp'];
      const kpPath = fieldPath(sp, 'kp');
      if (typeof kp !== 'number' || !Number.isFinite(kp)) fail(kpPath, `expected a relative change such as -10 %, got ${describeValue(kp)}`);
      const shifted = proc.kp * (1 + kp);
      if (!(shifted > 0)) {
        fail(kpPath, `a shift of ${Number((kp * 100).toPrecision(6))} % makes KP ${shifted === 0 ? 'zero' : 'negative'} (${proc.kp} A/V^2 x ${Number((1 + kp).toPrecision(6))}); give a shift above -100 %`);
      }
      const [lo, hi] = DESIGN_LIMITS.kp;
      if (shifted < lo || shifted > hi) fail(kpPath, `a shift of ${Number((kp * 100).toPrecision(6))} % makes KP ${shifted.toPrecision(4)} A/V^2, outside ${lo} to ${hi} A/V^2`);
    }
    if (s['vt0'] !== undefined) {
      const v = s['vt0'];
      const vPath = fieldPath(sp, 'vt0');
      if (typeof v !== 'number' || !Number.isFinite(v)) fail(vPath, `expected a voltage change such as 20 mV, got ${describeValue(v)}`);
      if (pol === 'p' && proc.vt0 + v < 0) {
        fail(vPath, `a shift of ${Number((v * 1e3).toPrecision(6))} mV makes the p-devices' |V_T0| negative (${Number((proc.vt0 + v).toPrecision(6))} V); p-device values are magnitudes`);
      }
    }
  }
}

/** An error found in a condition's design, moved onto the condition's own field where it has one. */
function relabel(e: InputError, c: OperatingCondition, path: string, def: StageDefinition): InputError {
  const field = e.field;
  const detail = e.message.startsWith(`${field}: `) ? e.message.slice(field.length + 2) : e.message;
  let at: string | undefined;
  if (field === 'temperature') at = fieldPath(path, 'temperature');
  else if (def.fields.some((f) => f.key === field)) at = fieldPath(path, field);
  else {
    const m = /^process\.([np])\.(kp|vt0)$/.exec(field);
    if (m !== null) {
      const pol = m[1] as Polarity;
      const key = m[2] as 'kp' | 'vt0';
      if (c.shift?.[pol]?.[key] !== undefined) at = `${path}.shift.${pol}.${key}`;
      else if (key === 'kp' && c.temperature !== undefined) at = fieldPath(path, 'temperature');
    } else {
      const b = /^([A-Za-z0-9_-]+)\.([A-Za-z0-9_-]+)$/.exec(field);
      if (b !== null && isMapping(c[b[1]!]) && (c[b[1]!] as Record<string, unknown>)[b[2]!] !== undefined) at = `${path}.${field}`;
    }
  }
  if (at !== undefined) return new InputError(at, detail);
  return new InputError(path, `at this condition, ${e.message}`);
}

/**
 * Checks `design.conditions` at the library's edge: a list of 1 to 64 conditions with unique
 * names, known keys, temperatures from 1 K to 1000 K, fields within their limits, shifts that
 * keep KP positive, and a valid design at each condition.
 * @param validate the design validator, applied to each condition's design
 * @throws InputError naming the condition's field (`conditions[2].shift.n.kp`)
 */
export function validateConditions(design: Design, def: StageDefinition, validate: (d: Design) => Design): void {
  const cs = design.conditions as unknown;
  if (cs === undefined) return;
  const example = '[{ name: cold, temperature: -40 C }, { name: hot, temperature: 125 C }]';
  if (!Array.isArray(cs)) fail('conditions', `expected a list of conditions such as ${example}, got ${describeValue(cs)}`);
  const [lo, hi] = DESIGN_LIMITS.conditions;
  if (cs.length < lo) fail('conditions', `the list is empty; give at least one condition such as ${example}, or remove conditions`);
  if (cs.length > hi) fail('conditions', `${cs.length} conditions given; at most ${hi} are accepted`);
  const fields = conditionFields(def);
  const seen = new Map<string, number>();
  cs.forEach((raw: unknown, i) => {
    const path = conditionPath(i);
    if (!isMapping(raw)) fail(path, `expected a mapping such as { name: hot, temperature: 125 C }, got ${describeValue(raw)}`);
    refuseConditionKeys(raw, def, path);
    const name = raw['name'];
    if (name === undefined) fail(fieldPath(path, 'name'), 'missing; give each condition a name such as name: hot');
    if (typeof name !== 'string' || name.trim() === '') fail(fieldPath(path, 'name'), `expected a short non-empty name such as "hot", got ${describeValue(name)}`);
    if (name.includes(',')) fail(fieldPath(path, 'name'), `${JSON.stringify(name)} holds a comma, which --drift uses between two names; choose another name`);
    const before = seen.get(name);
    if (before !== undefined) fail(fieldPath(path, 'name'), `${JSON.stringify(name)} is already the name of ${conditionPath(before)}; condition names must be unique`);
    seen.set(name, i);
    if (raw['temperature'] !== undefined) inRange(raw['temperature'], fieldPath(path, 'temperature'), 'temperature', DESIGN_LIMITS.temperature, 'K');
    for (const f of fields.top) if (raw[f.key] !== undefined) inRange(raw[f.key], fieldPath(path, f.key), f.what, f.limits, f.unit);
    for (const { block, fields: own } of fields.blocks) {
      const g = raw[block.key];
      if (g === undefined) continue;
      const bp = fieldPath(path, block.key);
      const allowed = own.map((f) => f.key);
      if (!isMapping(g)) fail(bp, `expected a mapping such as { ${own[0]!.example} }, got ${describeValue(g)}`);
      refuse(g, allowed, bp, (key) =>
        ['w', 'l', 'polarity'].includes(key) ? `the geometry is the instance's own and the same at every condition; a condition sets only ${allowed.join(', ')} here` : undefined,
      );
      for (const f of own) if (g[f.key] !== undefined) inRange(g[f.key], fieldPath(bp, f.key), f.what, f.limits, f.unit);
    }
    if (raw['shift'] !== undefined) checkShift(design, raw['shift'], fieldPath(path, 'shift'));
    const c = raw as OperatingCondition;
    try {
      designAtTemperature(validate(conditionDesign(design, c)));
    } catch (e) {
      if (e instanceof InputError) throw relabel(e, c, path, def);
      throw e;
    }
  });
}

/**
 * The design file's `conditions` list: units and spelling, condition by condition, with paths
 * such as `conditions[2].shift.n.kp`. The rules on the values (ranges, unique names, a valid
 * design at each condition) are `validateConditions`', which `validateDesign` applies.
 */
import { conditionFields, conditionPath, refuseConditionKeys, SHIFT_KEYS } from '../conditions.js';
import type { OperatingCondition } from '../design.js';
import { InputError } from '../errors.js';
import type { StageDefinition } from '../stages/definition.js';
import { parseQuantity } from '../units.js';
import { asMapping, describeValue, fieldPath, own, refuseUnknownKeys } from './fieldReader.js';

const EXAMPLE = '[{ name: cold, temperature: -40 C }, { name: hot, temperature: 125 C }]';

function readShift(raw: unknown, path: string): OperatingCondition['shift'] {
  const map = asMapping(raw, path, '{ n: { kp: -10 % }, p: { kp: -10 % } }');
  refuseUnknownKeys(map, ['n', 'p'], path);
  const out: Record<string, Record<string, number>> = {};
  for (const pol of ['n', 'p'] as const) {
    const s = own(map, pol);
    if (s === undefined) continue;
    const sp = fieldPath(path, pol);
    const m = asMapping(s, sp, '{ kp: -10 %, vt0: 20 mV }');
    refuseUnknownKeys(m, SHIFT_KEYS, sp);
    const one: Record<string, number> = {};
    const kp = own(m, 'kp');
    if (kp !== undefined) one['kp'] = parseQuantity(kp, 'dimensionless', fieldPath(sp, 'kp'));
    const vt0 = own(m, 'vt0');
    if (vt0 !== undefined) one['vt0'] = parseQuantity(vt0, 'voltage', fieldPath(sp, 'vt0'));
    out[pol] = one;
  }
  return out;
}

/**
 * Reads the `conditions` list of a design file (values in SI units).
 * @throws InputError naming the condition's field, e.g. `conditions[1].tempreature: unknown key; did you mean "temperature"?`
 */
export function readConditions(raw: unknown, def: StageDefinition): OperatingCondition[] {
  if (!Array.isArray(raw)) throw new InputError('conditions', `expected a list of conditions such as ${EXAMPLE}, got ${describeValue(raw)}`);
  const fields = conditionFields(def);
  return raw.map((item: unknown, i) => {
    const path = conditionPath(i);
    const map = asMapping(item, path, '{ name: hot, temperature: 125 C }');
    refuseConditionKeys(map, def, path);
    const out: Record<string, unknown> = {};
    const name = own(map, 'name');
    if (name === undefined) throw new InputError(fieldPath(path, 'name'), 'missing; give each condition a name such as name: hot');
    if (typeof name !== 'string') {
      const quote = typeof name === 'number' || typeof name === 'boolean' ? ' (put it in quotes)' : '';
      throw new InputError(fieldPath(path, 'name'), `expected a short name such as "hot", got ${describeValue(name)}${quote}`);
    }
    out['name'] = name;
    const t = own(map, 'temperature');
    if (t !== undefined) out['temperature'] = parseQuantity(t, 'temperature', fieldPath(path, 'temperature'));
    for (const f of fields.top) {
      const v = own(map, f.key);
      if (v !== undefined) out[f.key] = parseQuantity(v, f.dimension, fieldPath(path, f.key));
    }
    for (const { block, fields: blockFields } of fields.blocks) {
      const g = own(map, block.key);
      if (g === undefined) continue;
      const bp = fieldPath(path, block.key);
      const m = asMapping(g, bp, `{ ${blockFields[0]!.example} }`);
      refuseUnknownKeys(m, blockFields.map((f) => f.key), bp);
      const values: Record<string, number> = {};
      for (const f of blockFields) {
        const v = own(m, f.key);
        if (v !== undefined) values[f.key] = parseQuantity(v, f.dimension, fieldPath(bp, f.key));
      }
      out[block.key] = values;
    }
    const shift = own(map, 'shift');
    if (shift !== undefined) out['shift'] = readShift(shift, fieldPath(path, 'shift'));
    return out as OperatingCondition;
  });
}

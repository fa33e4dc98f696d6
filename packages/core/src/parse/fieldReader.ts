/**
 * Small checks shared by the design-file sections: is this a mapping, are its keys known,
 * how is a bad value quoted in a one-line message.
 */
import { InputError } from '../errors.js';
import { closestWord } from './didYouMean.js';

/** Plain data as the YAML reader returns it for a mapping. */
export type Mapping = Readonly<Record<string, unknown>>;

/**
 * How a rejected value is shown in a message: text in double quotes (shortened), numbers and
 * booleans as written, containers by kind.
 *
 * @param value any parsed value
 * @returns a short one-line description
 * @example describeValue('2 mA') // '"2 mA"'
 */
export function describeValue(value: unknown): string {
  if (typeof value === 'string') {
    const shown = value.length > 60 ? `${value.slice(0, 57)}...` : value;
    return JSON.stringify(shown);
  }
  if (typeof value === 'number' || typeof value === 'boolean' || typeof value === 'bigint') return String(value);
  if (value === null) return 'an empty value';
  if (value === undefined) return 'nothing';
  if (Array.isArray(value)) return 'a list';
  if (value instanceof Uint8Array) return 'binary data';
  if (value instanceof Date) return 'a date';
  if (typeof value === 'object') return 'a mapping';
  return `a ${typeof value}`;
}

/**
 * Dotted path of a child field; keys that are not plain words are quoted so the message
 * stays one unambiguous line.
 *
 * @param parent the parent's path (`''` at the top level)
 * @param key the child's key
 * @example fieldPath('process', 'n') // 'process.n'
 */
export function fieldPath(parent: string, key: string): string {
  const shown = /^[A-Za-z0-9_-]+$/.test(key) ? key : JSON.stringify(key);
  return parent === '' ? shown : `${parent}.${shown}`;
}

/** True for the plain objects a YAML or JSON mapping becomes. */
export function isMapping(value: unknown): value is Mapping {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) return false;
  const proto: unknown = Object.getPrototypeOf(value);
  return proto === Object.prototype || proto === null;
}

/**
 * The value as a mapping, or an InputError `<path>: expected a mapping such as <example>, got ...`.
 *
 * @param value the parsed value
 * @param path the field's dotted path
 * @param example an inline example of the expected mapping
 */
export function asMapping(value: unknown, path: string, example: string): Mapping {
  if (!isMapping(value)) {
    throw new InputError(path, `expected a mapping such as ${example}, got ${describeValue(value)}`);
  }
  return value;
}

/**
 * Refuses keys that are not in `allowed`, suggesting the nearest spelling.
 *
 * @param map the mapping to check
 * @param allowed the accepted keys, in the order they are documented
 * @param path the mapping's dotted path (`''` at the top level)
 * @throws InputError `<path>.<key>: unknown key; did you mean "..."?` or listing the accepted keys
 */
export function refuseUnknownKeys(map: Mapping, allowed: readonly string[], path: string): void {
  for (const key of Object.keys(map)) {
    if (allowed.includes(key)) continue;
    const guess = closestWord(key, allowed);
    const hint = guess === undefined ? `expected one of ${allowed.join(', ')}` : `did you mean "${guess}"?`;
    throw new InputError(fieldPath(path, key), `unknown key; ${hint}`);
  }
}

/** The own value of `key`, or undefined when the key is absent (inherited keys never count). */
export function own(map: Mapping, key: string): unknown {
  return Object.hasOwn(map, key) ? map[key] : undefined;
}

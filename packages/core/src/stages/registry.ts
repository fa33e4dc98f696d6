/**
 * The stage registry: every stage type, one line each. Adding a stage type is a module beside
 * this file exporting its definition, and its line here.
 */
import { closestWord } from '../parse/didYouMean.js';
import { InputError } from '../errors.js';
import { CURRENT_MIRROR_STAGE } from './currentMirror.js';
import type { StageDefinition } from './definition.js';
import { FOLDED_STAGE } from './folded.js';
import { MIRROR_STAGE } from './mirror.js';
import { RESISTOR_STAGE } from './resistor.js';
import { SELECTOR_STAGE } from './selector.js';
import { SIMPLE_STAGE } from './simple.js';

/** Every stage type, in the order help texts list them. */
export const STAGES: readonly StageDefinition[] = [SIMPLE_STAGE, MIRROR_STAGE, RESISTOR_STAGE, FOLDED_STAGE, CURRENT_MIRROR_STAGE, SELECTOR_STAGE];

/** The topology names, as a design file writes them. */
export const TOPOLOGIES: readonly string[] = STAGES.map((s) => s.topology);

/** The stage types that have a top-level field or block `key` (for "set topology: ..." hints). */
export function topologiesWith(key: string): string[] {
  return STAGES.filter((s) => s.fields.some((f) => f.key === key) || s.blocks.some((b) => b.key === key)).map((s) => s.topology);
}

/**
 * Words for a block or field the design's stage type lacks: "a load (the mirror or resistor
 * stages have one), but this design is a simple stage (ideal loads)".
 */
export function lacksText(def: StageDefinition, key: string): string {
  const owners = topologiesWith(key);
  const have = owners.length === 0 ? '' : ` (the ${alternatives(owners)} stage${owners.length > 1 ? 's have' : ' has'} one)`;
  const ideal = def.topology === 'simple' && key === 'load' ? ' (ideal loads)' : '';
  return `${/^[aeiou]/.test(key) ? 'an' : 'a'} ${key}${have}, but this design is a ${def.topology} stage${ideal}`;
}

/** `a`, `a or b`, `a, b or c`: a list of alternatives in words. */
export function alternatives(items: readonly string[]): string {
  return items.length <= 1 ? items.join('') : `${items.slice(0, -1).join(', ')} or ${items[items.length - 1]!}`;
}

/**
 * The definition of a stage type.
 * @throws InputError on `field` (default `topology`) naming the known types and the closest spelling
 */
export function stageDefinition(topology: unknown, field = 'topology'): StageDefinition {
  const found = STAGES.find((s) => s.topology === topology);
  if (found !== undefined) return found;
  const guess = typeof topology === 'string' ? closestWord(topology, TOPOLOGIES) : undefined;
  const hint = guess === undefined ? '' : `; did you mean "${guess}"?`;
  const list = `${TOPOLOGIES.slice(0, -1).join(', ')} or ${TOPOLOGIES[TOPOLOGIES.length - 1]!}`;
  const got = typeof topology === 'string' ? JSON.stringify(topology) : String(topology);
  throw new InputError(field, `expected ${list}, got ${got}${hint}`);
}

/**
 * Pieces several stage definitions share: the input pair block, the tail current, the offset
 * figure of the differential stages.
 */
import type { Polarity } from '../design.js';
import { DESIGN_LIMITS } from '../limits.js';
import type { BlockDefinition, FieldDefinition, FigureDefinition } from './definition.js';

/** The tail current of a differential stage. */
export const TAIL_FIELD: FieldDefinition = {
  key: 'tail',
  dimension: 'current',
  what: 'tail current',
  example: 'tail: 10 uA',
  limits: DESIGN_LIMITS.tail,
  unit: 'A',
  required: true,
};

/** The opposite polarity, for examples of complementary blocks. */
export function otherPolarity(p: Polarity): Polarity {
  return p === 'n' ? 'p' : 'n';
}

/** The input pair M1/M2 (M1 is the device on the side whose current the load mirrors). */
export const INPUT_PAIR: BlockDefinition = {
  key: 'input',
  kind: 'mos',
  elements: ['M1', 'M2'],
  label: 'input pair',
  polarity: 'any',
  fields: [],
  example: () => '{ polarity: n, w: 2 um, l: 1 um }',
  sizable: true,
};

/** Vos = V_G1 - V_G2 that balances the stage; the spec bounds |Vos|. */
export const OFFSET_FIGURE: FigureDefinition = {
  name: 'offset',
  specKey: 'offset',
  label: 'offset',
  symbol: 'Vos',
  unit: 'V',
  sided: 'two',
  dimension: 'voltage',
  limits: DESIGN_LIMITS.offset,
  example: 'offset: 10 mV',
};

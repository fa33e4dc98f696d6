/**
 * Values that are valid but far outside any real device, the usual sign of a unit slip: a bare
 * number is in SI units, so `spec: { offset: 7.8125 }` is 7.8 V, not 7.8 mV. These are warnings,
 * not refusals (this project's thresholds; common practice, no source).
 */
import { formatQuantity } from './units.js';
import { linearisedSigma } from './linearised.js';
import type { Stage } from './stages/definition.js';

/** An offset-like limit above this, volts, is almost surely millivolts written as volts. */
export const SLIP_LIMIT_VOLTS = 1;
/** A spec this many linearised sigmas out is beyond any useful yield (the yield prints as 1). */
export const SLIP_SIGMAS = 50;
/** A tail current above this, amperes, is beyond any input stage's bias. */
export const SLIP_TAIL_AMPS = 10e-3;
/** A width or length above this, metres (1 mm), is beyond any matched device. */
export const SLIP_LENGTH_M = 1e-3;

/** The shortest decimal text of x scaled to a prefix, for a "write ..." hint. */
function hint(x: number, scale: number, unit: string): string {
  return `${Number((x * scale).toPrecision(6))} ${unit}`;
}

/**
 * Warnings for values that look like unit slips, each one line naming the field and the value in
 * SI units with a hint. `limit` is the spec limit in use and `limitField` where it came from
 * (`spec.offset`, or the command line's `--spec`).
 * @example unitSlips(stage, 7.8125, 'spec.offset')
 * // ['spec.offset = 7.8125 V is 2009.6 linearised sigma, beyond 50; if millivolts were meant, write "7.8125 mV" (a number without a unit is in volts)']
 */
export function unitSlips(stage: Stage, limit: number, limitField: string): string[] {
  const out: string[] = [];
  const fig = stage.definition.figure;
  const sigma = linearisedSigma(stage);
  const inVolts = fig.unit === 'V';
  const value = inVolts ? `${limit} V` : `${limit}`;
  const levels = limit / sigma;
  if (inVolts && limit > SLIP_LIMIT_VOLTS) {
    out.push(`${limitField} = ${value} is above ${SLIP_LIMIT_VOLTS} V; if millivolts were meant, write "${hint(limit, 1, 'mV')}" (a number without a unit is in volts)`);
  } else if (levels > SLIP_SIGMAS) {
    const unitHint = inVolts ? `if millivolts were meant, write "${hint(limit, 1, 'mV')}" (a number without a unit is in volts)` : 'a number without a unit is a fraction: write "0.5 %" for half a percent';
    out.push(`${limitField} = ${value} is ${levels.toPrecision(5)} linearised sigma, beyond ${SLIP_SIGMAS}; ${unitHint}`);
  }
  const tail = stage.design.tail;
  if (tail !== undefined && tail > SLIP_TAIL_AMPS) {
    out.push(`tail = ${tail} A is above ${formatQuantity(SLIP_TAIL_AMPS, 'A')}; if microamperes were meant, write "${hint(tail, 1, 'uA')}" (a number without a unit is in amperes)`);
  }
  for (const b of stage.definition.blocks) {
    const g = (b.key === 'input' ? stage.design.input : stage.design[b.key]) as { w: number; l: number };
    for (const k of ['w', 'l'] as const) {
      if (g[k] > SLIP_LENGTH_M) out.push(`${b.key}.${k} = ${g[k]} m is above 1 mm; if micrometres were meant, write "${hint(g[k], 1, 'um')}" (a number without a unit is in metres)`);
    }
  }
  return out;
}

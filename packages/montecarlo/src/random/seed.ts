import { InputError } from '@twinfet/core';

/** The seed used when none is given: fixed, and printed with every report so a run can be repeated. */
export const DEFAULT_SEED = '1';

/** A seed as text (numbers are taken as their decimal text). */
export function seedText(seed: string | number | undefined): string {
  if (seed === undefined) return DEFAULT_SEED;
  if (typeof seed === 'number') {
    if (!Number.isFinite(seed)) throw new InputError('seed', `expected text or a finite number, got ${seed}`);
    return String(seed);
  }
  if (typeof seed !== 'string' || seed.length === 0 || seed.length > 200) {
    throw new InputError('seed', `expected 1 to 200 characters, got ${JSON.stringify(seed)}`);
  }
  return seed;
}

import { InputError, isInputError } from '@twinfet/core';
import { seedText } from '@twinfet/montecarlo';

/**
 * A whole number from the command line: accepts `100000`, `1e6`, `1_000_000`.
 * @param examples what the message suggests, e.g. "2 or 4" for a thread count
 * @throws InputError naming the option.
 */
export function parseCount(text: string, option: string, min: number, max: number, examples = '100000, 1e6 or 1_000_000'): number {
  const t = text.trim().replace(/_/g, '');
  const x = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(t) ? Number(t) : Number.NaN;
  if (!Number.isFinite(x) || !Number.isInteger(x)) {
    throw new InputError(option, `expected a whole number such as ${examples}, got "${text}"`);
  }
  if (x < min || x > max) {
    throw new InputError(option, `expected a whole number from ${fmt(min)} to ${fmt(max)}, got "${text}"`);
  }
  return x;
}

function fmt(x: number): string {
  return x >= 1e6 ? x.toExponential(0).replace('+', '') : String(x);
}

/** A probability strictly between 0 and 1, e.g. a confidence level or a yield target. */
export function parseFraction(text: string, option: string, example: string): number {
  const t = text.trim();
  const pct = t.endsWith('%');
  const body = pct ? t.slice(0, -1) : t;
  const x = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(body) ? Number(body) / (pct ? 100 : 1) : Number.NaN;
  if (!Number.isFinite(x) || x <= 0 || x >= 1) {
    throw new InputError(option, `expected a number strictly between 0 and 1 such as ${example}, got "${text}"`);
  }
  return x;
}

/** A seed: the library's rule (`seedText`), reported on `--seed`. */
export function parseSeed(text: string): string {
  try {
    return seedText(text);
  } catch (e) {
    if (!isInputError(e)) throw e;
    throw new InputError('--seed', e.message.replace(/^seed: /, ''));
  }
}

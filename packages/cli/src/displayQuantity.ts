/**
 * The display unit of a plotted quantity: the SI unit with the prefix that puts a typical value
 * between 1 and 1000, and the factor from SI to it.
 */
import type { PlotFigure } from './plot.js';

/** A quantity's words, symbol and SI unit ('%' for a fraction shown in percent). */
export interface NamedQuantity {
  readonly name: string;
  readonly symbol: string;
  readonly unit: string;
}

/** Prefixes by power of ten, for units that take them. */
const PREFIXES: readonly [number, string][] = [[-15, 'f'], [-12, 'p'], [-9, 'n'], [-6, '\u00b5'], [-3, 'm'], [0, ''], [3, 'k']];
/** Units the page scales with a prefix. */
const PREFIXED = new Set(['V', 'A', 'A/V', 'F', 'm', 's']);

/**
 * The display unit for a quantity whose values are about `typical` in size: the SI unit with
 * the prefix that puts `typical` between 1 and 1000. '%' shows a fraction in percent.
 */
export function displayQuantity(quantity: NamedQuantity, typical: number): PlotFigure {
  const label = quantity.name;
  const symbol = quantity.symbol;
  if (quantity.unit === '%') return { label, symbol, unit: '%', scale: 100 };
  if (!PREFIXED.has(quantity.unit) || !(typical > 0)) return { label, symbol, unit: quantity.unit, scale: 1 };
  const e = Math.floor(Math.log10(typical) / 3) * 3;
  const hit = PREFIXES.find(([p]) => p === Math.min(3, Math.max(-15, e))) ?? [0, ''];
  return { label, symbol, unit: `${hit[1]}${quantity.unit}`, scale: 10 ** -hit[0] };
}

/**
 * Numbers as the page shows them: SI prefixes chosen from the value, a true minus sign and the
 * micro sign, and the display unit of a plotted quantity.
 */
import { formatQuantity } from '@twinfet/core';
import type { DisplayQuantity } from '../plot.js';
import type { Quantity } from './stages/types.js';

/** Prefixes by power of ten, for units that take them. */
const PREFIXES: readonly [number, string][] = [[-15, 'f'], [-12, 'p'], [-9, 'n'], [-6, '\u00b5'], [-3, 'm'], [0, ''], [3, 'k']];
/** Units the page scales with a prefix. */
const PREFIXED = new Set(['V', 'A', 'A/V', 'F', 'm', 's']);

/** A value with its unit, `digits` significant figures, prefixed (2.5 mV, 35 µA). */
export function q(value: number, unit: string, digits = 4): string {
  if (unit === '%') return `${minus(String(Number((100 * value).toPrecision(digits))))} %`;
  return micro(minus(formatQuantity(value, unit, digits)));
}

/** The ASCII micro prefix of the terminal output ("10 uA") as the micro sign ("10 µA"). */
export function micro(text: string): string {
  return text.replace(/(\d) u(?=[A-Za-z])/g, '$1 \u00b5');
}

/** Hyphen-minus to the minus sign in a number's text. */
export function minus(text: string): string {
  return text.replace(/(^|[\s([])-(?=[\d.])/g, '$1\u2212');
}

/** A plain number with `digits` significant figures (scientific below 1e-3 and from 1e5). */
export function plain(x: number, digits = 4): string {
  if (x === 0) return '0';
  const a = Math.abs(x);
  const t = a >= 1e-3 && a < 1e5 ? String(Number(x.toPrecision(digits))) : x.toExponential(digits - 1).replace('e+', 'e');
  return minus(t).replace(/e-/, 'e\u2212');
}

/** A fraction as a percentage. */
export function percent(x: number, digits = 3): string {
  return `${minus(String(Number((100 * x).toPrecision(digits))))} %`;
}

/** Area of one device, µm^2. */
export function um2(a: number, digits = 4): string {
  return `${plain(a * 1e12, digits)} \u00b5m\u00b2`;
}

/**
 * The display unit for a quantity whose values are about `typical` in size: the SI unit with
 * the prefix that puts `typical` between 1 and 1000. '%' shows a fraction in percent.
 */
export function displayQuantity(quantity: Quantity, typical: number): DisplayQuantity {
  const label = `${quantity.name} ${quantity.symbol}`;
  if (quantity.unit === '%') return { label, unit: '%', scale: 100 };
  if (!PREFIXED.has(quantity.unit) || !(typical > 0)) return { label, unit: quantity.unit, scale: 1 };
  const e = Math.floor(Math.log10(typical) / 3) * 3;
  const hit = PREFIXES.find(([p]) => p === Math.min(3, Math.max(-15, e))) ?? [0, ''];
  return { label, unit: `${hit[1]}${quantity.unit}`, scale: 10 ** -hit[0] };
}

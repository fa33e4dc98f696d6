/**
 * Numbers as the page shows them: SI prefixes chosen from the value, a true minus sign and the
 * micro sign, and the display unit of a plotted quantity.
 */
import { formatQuantity } from '@twinfet/core';
import type { Quantity } from './stages/types.js';

/** A value with its unit, `digits` significant figures, prefixed (2.5 mV, 35 µA). */
export function q(value: number, unit: string, digits = 4): string {
  if (unit === '%') return `${minus(String(Number((100 * value).toPrecision(digits))))} %`;
  return micro(minus(formatQuantity(value, unit, digits)));
}

/** The ASCII micro prefix of the terminal output ("10 uA") as the micro sign ("10 µA"). */
export function micro(text: string): string {
  return text.replace(/(\d) u(?=[A-Za-z])/g, '$1 \u00b5').replace(/(\d) ([kMG]?)ohm\b/g, '$1 $2\u03a9');
}

/** Hyphen-minus to the minus sign in a number's text. */
export function minus(text: string): string {
  return text.replace(/(^|[\s([])-(?=[\d.])/g, '$1\u2212');
}

/** The unit a figure's values are shown in: its SI unit, or '%' for a dimensionless figure (a fraction). */
export function figureUnit(f: { readonly unit: string }): string {
  return f.unit === '' ? '%' : f.unit;
}

/** A figure as a quantity on an axis: its words, symbol and display unit. */
export function figureQuantity(f: { readonly label: string; readonly symbol: string; readonly unit: string }): Quantity {
  return { name: f.label, symbol: f.symbol, unit: figureUnit(f) };
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

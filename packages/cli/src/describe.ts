import { ZERO_CELSIUS_K, type Design } from '@twinfet/core';

/** The design as the reports echo it (SI units). */
export function designSummary(d: Design) {
  return {
    name: d.name,
    topology: d.topology,
    temperature: d.temperature,
    temperatureC: d.temperature - ZERO_CELSIUS_K,
    tail: d.tail,
    input: d.input,
    ...(d.load === undefined ? {} : { load: d.load }),
    spec: d.spec,
  };
}

/** A fraction as a percentage with `digits` significant figures. */
export function pct(x: number, digits: number): string {
  return `${(100 * x).toPrecision(digits)} %`;
}

/** Compact scientific text for small or large plain numbers. */
export function sci(x: number, digits: number): string {
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a >= 1e-3 && a < 1e4 ? String(Number(x.toPrecision(digits))) : x.toExponential(digits - 1);
}

/** Human label of a budget group. */
export function shareLabel(role: string, parameter: string): string {
  return `${role} pair ${parameter === 'vt' ? 'dV_T' : 'dbeta/beta'}`;
}

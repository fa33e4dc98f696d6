import type { Design, DeviceGeometry, Polarity, ProcessParams } from './design.js';
import { InputError } from './errors.js';

function positive(value: unknown, field: string, what: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new InputError(field, `expected a positive finite ${what}, got ${String(value)}`);
  }
}

/**
 * Outer limits of the values a design may hold, SI units (this project's rule; common practice,
 * no source). They are far beyond any real device, and chosen so that every derived quantity
 * (W L, I_S, IC, the sigmas, spec/sigma) stays a finite, non-zero double: without them a width of
 * 1e300 m or an A_VT of 5e-324 V*m passes "positive and finite" and yields NaN or Infinity later.
 */
export const DESIGN_LIMITS = {
  temperature: [1, 1000],
  tail: [1e-18, 1],
  length: [1e-9, 1e-2],
  slope: [1, 10],
  kp: [1e-9, 1],
  avt: [1e-12, 1e-6],
  abeta: [0, 1e-5],
  cox: [0, 1],
  offset: [0, 10],
} as const satisfies Record<string, readonly [number, number]>;

/**
 * Largest per-device sigma(dbeta/beta) = A_beta / sqrt(2 W L) accepted, as a fraction (100%).
 * Beyond it the log-normal current factor spans hundreds of decades within a few sigma and
 * the offset overflows; no matching model is meant for it (this project's rule, no source).
 */
export const MAX_DEVICE_SIGMA_BETA = 1;

function checkCurrentFactorSigma(dev: DeviceGeometry, p: ProcessParams, field: string): void {
  const sigma = p.abeta / Math.sqrt(2 * dev.w * dev.l);
  if (!(sigma <= MAX_DEVICE_SIGMA_BETA)) {
    throw new InputError(
      field,
      `sigma(dbeta/beta) = A_beta / sqrt(2 W L) is ${(100 * sigma).toPrecision(3)}% per device, beyond the ${100 * MAX_DEVICE_SIGMA_BETA}% the model accepts; enlarge ${field}.w * ${field}.l or check process.${dev.polarity}.abeta`,
    );
  }
}

/** `positive`, then lo <= value <= hi (lo = 0 means only > 0 is required). */
function within(value: unknown, field: string, what: string, [lo, hi]: readonly [number, number], unit: string): void {
  positive(value, field, what);
  const v = value as number;
  if (v < lo || v > hi) {
    const from = lo === 0 ? 'above 0' : `from ${lo} ${unit}`;
    throw new InputError(field, `expected a ${what} ${from} to ${hi} ${unit}, got ${v} ${unit}; check the unit prefix`);
  }
}

function checkDevice(dev: DeviceGeometry | undefined, field: string): DeviceGeometry {
  if (dev === undefined || typeof dev !== 'object' || dev === null) {
    throw new InputError(field, 'missing; give { polarity, w, l }');
  }
  if (dev.polarity !== 'n' && dev.polarity !== 'p') {
    throw new InputError(`${field}.polarity`, `expected "n" or "p", got ${JSON.stringify(dev.polarity)}`);
  }
  within(dev.w, `${field}.w`, 'width', DESIGN_LIMITS.length, 'm');
  within(dev.l, `${field}.l`, 'length', DESIGN_LIMITS.length, 'm');
  return dev;
}

function checkProcess(p: ProcessParams | undefined, polarity: Polarity, user: string): void {
  const field = `process.${polarity}`;
  if (p === undefined || typeof p !== 'object' || p === null) {
    throw new InputError(field, `missing, but ${user} uses a ${polarity}-device; add ${field} { vt0, slope, kp, avt, abeta }`);
  }
  if (typeof p.vt0 !== 'number' || !Number.isFinite(p.vt0)) {
    throw new InputError(`${field}.vt0`, `expected a finite voltage, got ${String(p.vt0)}`);
  }
  const [slopeLo, slopeHi] = DESIGN_LIMITS.slope;
  if (typeof p.slope !== 'number' || !Number.isFinite(p.slope) || p.slope < slopeLo || p.slope > slopeHi) {
    throw new InputError(`${field}.slope`, `expected a slope factor n from ${slopeLo} to ${slopeHi}, got ${String(p.slope)}`);
  }
  within(p.kp, `${field}.kp`, 'KP', DESIGN_LIMITS.kp, 'A/V^2');
  within(p.avt, `${field}.avt`, 'A_VT', DESIGN_LIMITS.avt, 'V*m');
  within(p.abeta, `${field}.abeta`, 'A_beta', DESIGN_LIMITS.abeta, 'm (fraction*m)');
  if (typeof p.rho !== 'number' || !Number.isFinite(p.rho) || Math.abs(p.rho) > 1) {
    throw new InputError(`${field}.rho`, `expected a correlation in [-1, 1], got ${String(p.rho)}`);
  }
  if (p.cox !== undefined) within(p.cox, `${field}.cox`, 'Cox', DESIGN_LIMITS.cox, 'F/m^2');
  if (p.wmin !== undefined) positive(p.wmin, `${field}.wmin`, 'minimum width in metres');
  if (p.lmin !== undefined) positive(p.lmin, `${field}.lmin`, 'minimum length in metres');
}

/**
 * Checks a design in SI units at the library's edge (the design-file loader checks units and
 * spelling before this). Throws InputError naming the field; returns the same object.
 */
export function validateDesign(design: Design): Design {
  if (typeof design !== 'object' || design === null) throw new InputError('design', 'expected an object');
  if (design.topology !== 'simple' && design.topology !== 'mirror') {
    throw new InputError('topology', `expected "simple" or "mirror", got ${JSON.stringify(design.topology)}`);
  }
  within(design.temperature, 'temperature', 'temperature', DESIGN_LIMITS.temperature, 'K');
  within(design.tail, 'tail', 'tail current', DESIGN_LIMITS.tail, 'A');
  const input = checkDevice(design.input, 'input');
  checkProcess(design.process?.[input.polarity], input.polarity, 'input');
  checkCurrentFactorSigma(input, design.process[input.polarity]!, 'input');
  if (design.topology === 'mirror') {
    const load = checkDevice(design.load, 'load');
    checkProcess(design.process[load.polarity], load.polarity, 'load');
    checkCurrentFactorSigma(load, design.process[load.polarity]!, 'load');
  } else if (design.load !== undefined) {
    throw new InputError('load', 'a simple stage has ideal loads; remove load or set topology: mirror');
  }
  if (typeof design.spec !== 'object' || design.spec === null) {
    throw new InputError('spec', 'missing; give { offset, instances }');
  }
  within(design.spec.offset, 'spec.offset', 'offset limit', DESIGN_LIMITS.offset, 'V');
  const m = design.spec.instances;
  if (typeof m !== 'number' || !Number.isInteger(m) || m < 1 || m > 1e12) {
    throw new InputError('spec.instances', `expected a whole number from 1 to 1e12, got ${String(m)}`);
  }
  return design;
}

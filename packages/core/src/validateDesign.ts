import type { Design, DeviceGeometry, Polarity, ProcessParams } from './design.js';
import { InputError } from './errors.js';

function positive(value: unknown, field: string, what: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new InputError(field, `expected a positive finite ${what}, got ${String(value)}`);
  }
}

function checkDevice(dev: DeviceGeometry | undefined, field: string): DeviceGeometry {
  if (dev === undefined || typeof dev !== 'object' || dev === null) {
    throw new InputError(field, 'missing; give { polarity, w, l }');
  }
  if (dev.polarity !== 'n' && dev.polarity !== 'p') {
    throw new InputError(`${field}.polarity`, `expected "n" or "p", got ${JSON.stringify(dev.polarity)}`);
  }
  positive(dev.w, `${field}.w`, 'width in metres');
  positive(dev.l, `${field}.l`, 'length in metres');
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
  if (typeof p.slope !== 'number' || !Number.isFinite(p.slope) || p.slope < 1) {
    throw new InputError(`${field}.slope`, `expected a slope factor n >= 1, got ${String(p.slope)}`);
  }
  positive(p.kp, `${field}.kp`, 'KP in A/V^2');
  positive(p.avt, `${field}.avt`, 'A_VT in V*m');
  positive(p.abeta, `${field}.abeta`, 'A_beta in m (fraction*m)');
  if (typeof p.rho !== 'number' || !Number.isFinite(p.rho) || Math.abs(p.rho) > 1) {
    throw new InputError(`${field}.rho`, `expected a correlation in [-1, 1], got ${String(p.rho)}`);
  }
  if (p.cox !== undefined) positive(p.cox, `${field}.cox`, 'Cox in F/m^2');
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
  positive(design.temperature, 'temperature', 'temperature in kelvin');
  positive(design.tail, 'tail', 'tail current in amperes');
  const input = checkDevice(design.input, 'input');
  checkProcess(design.process?.[input.polarity], input.polarity, 'input');
  if (design.topology === 'mirror') {
    const load = checkDevice(design.load, 'load');
    checkProcess(design.process[load.polarity], load.polarity, 'load');
  } else if (design.load !== undefined) {
    throw new InputError('load', 'a simple stage has ideal loads; remove load or set topology: mirror');
  }
  if (typeof design.spec !== 'object' || design.spec === null) {
    throw new InputError('spec', 'missing; give { offset, instances }');
  }
  positive(design.spec.offset, 'spec.offset', 'offset limit in volts');
  const m = design.spec.instances;
  if (typeof m !== 'number' || !Number.isInteger(m) || m < 1 || m > 1e12) {
    throw new InputError('spec.instances', `expected a whole number from 1 to 1e12, got ${String(m)}`);
  }
  return design;
}

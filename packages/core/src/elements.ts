/**
 * Building blocks the stage modules share: per-device and per-resistor constants (Pelgrom
 * sigmas, correlation weights, I_S), their random variables, operating-point rows and warnings.
 */
import type { Design, DeviceGeometry, Polarity, ProcessParams, ResistorGeometry } from './design.js';
import { gmOverId, inversionRegion, ekvInverse, specificCurrent } from './ekv.js';
import { deviceSigmaBeta, deviceSigmaVt } from './pelgrom.js';
import type { DeviceOperatingPoint, ResistorOperatingPoint } from './stages/definition.js';
import { MISMATCH_PARAMETERS, type MismatchParameter, type RandomVariable } from './variables.js';

/** Per-device constants shared by the stage modules. */
export interface DeviceConstants {
  readonly geometry: DeviceGeometry;
  readonly process: ProcessParams;
  readonly rho: number;
  readonly sigmaVt: number;
  readonly sigmaBeta: number;
  /** sigma_beta * rho: weight of u_vt in the beta deviate. */
  readonly betaFromVt: number;
  /** sigma_beta * sqrt(1 - rho^2): weight of u_beta in the beta deviate. */
  readonly betaOwn: number;
  readonly specificCurrent: number;
}

/** Per-resistor constants. */
export interface ResistorConstants {
  readonly geometry: ResistorGeometry;
  /** Per-resistor sigma(dR/R) = A_R / sqrt(2 W L), a fraction. */
  readonly sigmaR: number;
}

/** Process parameters for a polarity; validateDesign has ensured they exist. */
export function processFor(design: Design, polarity: Polarity): ProcessParams {
  const p = design.process[polarity];
  if (p === undefined) throw new Error(`internal: process.${polarity} missing after validation`);
  return p;
}

/** A block of the design as MOS geometry (the stage's definition says it is one; validated). */
export function deviceBlock(design: Design, key: string): DeviceGeometry {
  const g = key === 'input' ? design.input : design[key];
  if (typeof g !== 'object' || g === null) throw new Error(`internal: block ${key} missing after validation`);
  return g as DeviceGeometry;
}

/** A block of the design as resistor geometry (validated). */
export function resistorBlock(design: Design, key: string): ResistorGeometry {
  const g = design[key];
  if (typeof g !== 'object' || g === null) throw new Error(`internal: block ${key} missing after validation`);
  return g as ResistorGeometry;
}

/** The tail current of a stage that has one (validated). */
export function tailCurrent(design: Design): number {
  if (design.tail === undefined) throw new Error('internal: tail missing after validation');
  return design.tail;
}

/** Hoisted per-device constants (sigmas, correlation weights, I_S). */
export function deviceConstants(design: Design, geometry: DeviceGeometry, thermalVoltageV: number): DeviceConstants {
  const process = processFor(design, geometry.polarity);
  const rho = process.rho ?? 0;
  const sigmaBeta = deviceSigmaBeta(process.abeta, geometry.w, geometry.l);
  return {
    geometry,
    process,
    rho,
    sigmaVt: deviceSigmaVt(process.avt, geometry.w, geometry.l),
    sigmaBeta,
    betaFromVt: sigmaBeta * rho,
    betaOwn: sigmaBeta * Math.sqrt(1 - rho * rho),
    specificCurrent: specificCurrent(process.slope, process.kp, geometry.w, geometry.l, thermalVoltageV),
  };
}

/** Hoisted per-resistor constants; the same per-element convention as the devices (A / sqrt(2 W L)). */
export function resistorConstants(design: Design, geometry: ResistorGeometry): ResistorConstants {
  const ar = design.process.resistor?.ar;
  if (ar === undefined) throw new Error('internal: process.resistor missing after validation');
  return { geometry, sigmaR: ar / Math.sqrt(2 * geometry.w * geometry.l) };
}

function variable(device: string, role: string, parameter: MismatchParameter, sigma: number, rho: number): RandomVariable {
  return { name: `${device}.${MISMATCH_PARAMETERS[parameter].suffix}`, device, role, parameter, sigma, rho };
}

/** The two variables (vt, beta) of one device. */
export function deviceVariables(device: string, role: string, c: DeviceConstants): RandomVariable[] {
  return [variable(device, role, 'vt', c.sigmaVt, c.rho), variable(device, role, 'beta', c.sigmaBeta, c.rho)];
}

/** The one variable (r) of one resistor. */
export function resistorVariable(device: string, role: string, c: ResistorConstants): RandomVariable {
  return variable(device, role, 'r', c.sigmaR, 0);
}

/** Operating point of a device carrying `currentA` in saturation. */
export function deviceOperatingPoint(
  device: string,
  role: string,
  c: DeviceConstants,
  currentA: number,
  thermalVoltageV: number,
): DeviceOperatingPoint {
  const ic = currentA / c.specificCurrent;
  const gmId = gmOverId(ic, c.process.slope, thermalVoltageV);
  const area = c.geometry.w * c.geometry.l;
  const base = {
    device,
    role,
    polarity: c.geometry.polarity,
    w: c.geometry.w,
    l: c.geometry.l,
    current: currentA,
    specificCurrent: c.specificCurrent,
    ic,
    region: inversionRegion(ic),
    gmOverId: gmId,
    gm: gmId * currentA,
    overdrive: c.process.slope * thermalVoltageV * ekvInverse(ic),
    gateArea: area,
    sigmaVt: c.sigmaVt,
    sigmaBeta: c.sigmaBeta,
  };
  return c.process.cox === undefined ? base : { ...base, gateCapacitance: c.process.cox * area };
}

/** Operating point of a resistor carrying `currentA`. */
export function resistorOperatingPoint(device: string, role: string, c: ResistorConstants, currentA: number): ResistorOperatingPoint {
  const g = c.geometry;
  const base = { device, role, w: g.w, l: g.l, area: g.w * g.l, current: currentA, sigmaR: c.sigmaR };
  return g.r === undefined ? base : { ...base, resistance: g.r };
}

/**
 * Warnings where the area law is stretched (Drennan & McAndrew, IEEE JSSC 38(3), 2003): below
 * the process's smallest drawn width or length, or within 2x of it.
 */
export function geometryWarnings(role: string, c: DeviceConstants): string[] {
  const out: string[] = [];
  const { minW, minL } = c.process;
  const um = (x: number): string => `${Number((x * 1e6).toPrecision(4))} um`;
  const check = (value: number, min: number | undefined, key: 'w' | 'l', what: string, why: string): void => {
    if (min === undefined) return;
    const processKey = `process.${c.geometry.polarity}.min_${key}`;
    if (value < min) {
      out.push(`${role}.${key} = ${um(value)} is below the process's smallest drawn ${what} ${processKey} = ${um(min)}: such a device cannot be drawn, and the area law does not hold for it`);
    } else if (value < 2 * min) {
      out.push(`${role}.${key} is within 2x of the process minimum ${what}: the area law may underestimate mismatch of ${why} devices`);
    }
  };
  check(c.geometry.w, minW, 'w', 'width', 'narrow');
  check(c.geometry.l, minL, 'l', 'length', 'short');
  return out;
}

import type { Design, DeviceGeometry, Polarity, ProcessParams } from './design.js';
import { gmOverId, inversionRegion, ekvInverse, specificCurrent } from './ekv.js';
import { deviceSigmaBeta, deviceSigmaVt } from './pelgrom.js';
import type { DeviceConstants, DeviceOperatingPoint } from './stage.js';
import type { DeviceName, DeviceRole, RandomVariable } from './variables.js';

/** Process parameters for a polarity; validateDesign has ensured they exist. */
export function processFor(design: Design, polarity: Polarity): ProcessParams {
  const p = design.process[polarity];
  if (p === undefined) throw new Error(`internal: process.${polarity} missing after validation`);
  return p;
}

/** Hoisted per-device constants (sigmas, correlation weights, I_S). */
export function deviceConstants(design: Design, geometry: DeviceGeometry, thermalVoltageV: number): DeviceConstants {
  const process = processFor(design, geometry.polarity);
  const sigmaBeta = deviceSigmaBeta(process.abeta, geometry.w, geometry.l);
  return {
    geometry,
    process,
    sigmaVt: deviceSigmaVt(process.avt, geometry.w, geometry.l),
    sigmaBeta,
    betaFromVt: sigmaBeta * process.rho,
    betaOwn: sigmaBeta * Math.sqrt(1 - process.rho * process.rho),
    specificCurrent: specificCurrent(process.slope, process.kp, geometry.w, geometry.l, thermalVoltageV),
  };
}

/** The two variables (vt, beta) of one device. */
export function deviceVariables(device: DeviceName, role: DeviceRole, c: DeviceConstants): RandomVariable[] {
  return [
    { device, role, parameter: 'vt', sigma: c.sigmaVt, rho: c.process.rho },
    { device, role, parameter: 'beta', sigma: c.sigmaBeta, rho: c.process.rho },
  ];
}

/** Operating point of a device carrying `currentA` in saturation. */
export function deviceOperatingPoint(
  device: DeviceName,
  role: DeviceRole,
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

/** Warnings where the model's assumptions are stretched (Drennan & McAndrew, IEEE JSSC 38(3), 2003). */
export function geometryWarnings(role: DeviceRole, c: DeviceConstants): string[] {
  const out: string[] = [];
  const { wmin, lmin } = c.process;
  if (wmin !== undefined && c.geometry.w < 2 * wmin) {
    out.push(`${role}.w is within 2x of the process minimum width: the area law may underestimate mismatch of narrow devices`);
  }
  if (lmin !== undefined && c.geometry.l < 2 * lmin) {
    out.push(`${role}.l is within 2x of the process minimum length: the area law may underestimate mismatch of short devices`);
  }
  return out;
}

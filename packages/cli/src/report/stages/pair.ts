/**
 * The differential pair away from balance, shared by the stages built on one: with the sources
 * joined and I1 + I2 = I_B, the share f = I1 / I_B at a given gate-voltage difference. In the
 * EKV model (Enz, Krummenacher, Vittoz, AICSP 8, 1995) each device has I_k = I_Sk F(v_k), and the
 * common source cancels from v1 - v2, so f solves
 *   t(f) = v(f I_B / I_S1) - v((1 - f) I_B / I_S2) = (V_G1 - V_G2 - dV_T1 + dV_T2) / (n U_T)
 * (magnitudes for a p pair), v the closed-form inverse of F. t increases with f from -inf to
 * +inf, so the root is unique.
 */
import { ekvForwardDerivative, ekvInverse, type Stage } from '@twinfet/core';

/** The solve stops when t is met to this relative error (t is in units of n U_T). */
const T_TOLERANCE = 1e-13;
/** The logit y = ln(f / (1 - f)) is kept within +-600, where e^-600 is still a normal double. */
const Y_LIMIT = 600;

/** f and 1 - f from the logit y, each without cancellation. */
function shares(y: number): [number, number] {
  if (y >= 0) {
    const e = Math.exp(-y);
    return [1 / (1 + e), e / (1 + e)];
  }
  const e = Math.exp(y);
  return [e / (1 + e), 1 / (1 + e)];
}

/**
 * The share f = I1 / I_B (and 1 - f) of a pair whose normalised input is t, given
 * a1 = I_S1 / I_B and a2 = I_S2 / I_B, and the logit y = ln(f / (1 - f)) of the solution (a
 * good start for a neighbouring t). Newton's method on y, guarded by bisection; it starts from
 * `start`, or from the weak-inversion solution y = t + ln(a1 / a2), which is exact there.
 * Returns NaN shares when t is beyond what doubles can resolve (|y| > 600).
 * @example pairShare(0, 0.1, 0.1) // [0.5, 0.5, 0]
 */
export function pairShare(t: number, a1: number, a2: number, start?: number): [number, number, number] {
  let lo = -Y_LIMIT;
  let hi = Y_LIMIT;
  let y = Math.min(hi, Math.max(lo, start ?? t + Math.log(a1 / a2)));
  const tol = T_TOLERANCE * Math.max(1, Math.abs(t));
  for (let k = 0; k < 200; k++) {
    const [f, g] = shares(y);
    const v1 = ekvInverse(f / a1);
    const v2 = ekvInverse(g / a2);
    const r = v1 - v2 - t;
    if (Math.abs(r) <= tol) return [f, g, y];
    if (r > 0) hi = y;
    else lo = y;
    // dt/dy = f g [1 / (a1 F'(v1)) + 1 / (a2 F'(v2))], from dv/d(IC) = 1 / F'(v).
    const slope = f * g * (1 / (a1 * ekvForwardDerivative(v1)) + 1 / (a2 * ekvForwardDerivative(v2)));
    let next = y - r / slope;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (next === y || hi - lo < 1e-15 * Math.max(1, Math.abs(y))) return [f, g, y];
    y = next;
  }
  return [Number.NaN, Number.NaN, Number.NaN];
}

/** One device's mismatch in one instance: its threshold shift and current-factor exponent. */
export interface DeviceDraw {
  /** dV_T, volts (magnitude convention for a p device). */
  dVt: number;
  /** I_S / I_S,nominal = beta / beta_nominal = exp(z). */
  specific: number;
}

/**
 * Reads each device's draw for one instance from u[base ..], in the layout of
 * Stage.variables (device-major, vt then beta; the beta deviate is rho u_vt + sqrt(1 - rho^2)
 * u_beta scaled by its sigma, as the stages sample it). Writes into `out` (one per device).
 */
export function deviceDraws(stage: Stage, u: Float64Array, base: number, out: DeviceDraw[]): void {
  const vars = stage.variables;
  for (let j = 0, d = 0; j < vars.length; j += 2, d++) {
    const vt = vars[j]!;
    const beta = vars[j + 1]!;
    const uv = u[base + j]!;
    const ub = u[base + j + 1]!;
    const slot = out[d]!;
    slot.dVt = vt.sigma * uv;
    slot.specific = Math.exp(beta.sigma * (beta.rho * uv + Math.sqrt(1 - beta.rho * beta.rho) * ub));
  }
}

/** Fresh draw slots for the stage's devices. */
export function drawSlots(stage: Stage): DeviceDraw[] {
  return Array.from({ length: stage.variables.length / 2 }, () => ({ dVt: 0, specific: 1 }));
}

/** The input pair's constants: tail, polarity sign, n U_T and nominal I_S / I_B. */
export function pairConstants(stage: Stage): { tail: number; sign: number; nut: number; a0: number; ic: number } {
  const d = stage.design;
  const proc = d.process[d.input.polarity];
  if (proc === undefined) throw new Error(`internal: process.${d.input.polarity} missing after validation`);
  const m1 = stage.operatingPoint[0]!;
  return { tail: d.tail, sign: d.input.polarity === 'n' ? 1 : -1, nut: proc.slope * stage.thermalVoltage, a0: m1.specificCurrent / d.tail, ic: m1.ic };
}

/**
 * The gate-voltage difference |V_G1 - V_G2| at which the nominal pair carries the share f:
 * n U_T [v(f / a0) - v((1 - f) / a0)].
 */
export function nominalInputAtShare(c: { nut: number; a0: number }, f: number): number {
  return c.nut * (ekvInverse(f / c.a0) - ekvInverse((1 - f) / c.a0));
}

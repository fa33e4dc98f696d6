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

/** One element's mismatch in one instance. */
export interface ElementDraw {
  /** dV_T, volts (magnitude convention for a p device); 0 for a resistor. */
  dVt: number;
  /** beta / beta_nominal (= I_S / I_S,nominal) = exp(z_beta); 1 for a resistor. */
  specific: number;
  /** R / R_nominal = exp(sigma_R u); 1 for a MOS device. */
  ratio: number;
}

/**
 * Reads every element's draw for one instance from u[base ..], following Stage.variables (by
 * element and parameter, so any layout works): dV_T = sigma u_vt; the current factor
 * exp(sigma (rho u_vt + sqrt(1 - rho^2) u_beta)) and the resistor exp(sigma u_r), as the stages
 * sample them.
 */
export function drawReader(stage: Stage): { index(element: string): number; read(u: Float64Array, base: number): readonly ElementDraw[] } {
  const vars = stage.variables;
  const elements = [...new Set(vars.map((v) => v.device))];
  const slots: ElementDraw[] = elements.map(() => ({ dVt: 0, specific: 1, ratio: 1 }));
  const at = vars.map((v) => elements.indexOf(v.device));
  const vtOf = vars.map((v) => vars.findIndex((x) => x.device === v.device && x.parameter === 'vt'));
  return {
    index: (element) => {
      const i = elements.indexOf(element);
      if (i < 0) throw new Error(`internal: the stage has no element ${element}`);
      return i;
    },
    read: (u, base) => {
      for (const s of slots) {
        s.dVt = 0;
        s.specific = 1;
        s.ratio = 1;
      }
      vars.forEach((v, j) => {
        const s = slots[at[j]!]!;
        const uj = u[base + j]!;
        if (v.parameter === 'vt') s.dVt = v.sigma * uj;
        else if (v.parameter === 'r') s.ratio = Math.exp(v.sigma * uj);
        else {
          const k = vtOf[j]!;
          const uv = k < 0 ? 0 : u[base + k]!;
          s.specific = Math.exp(v.sigma * (v.rho * uv + Math.sqrt(1 - v.rho * v.rho) * uj));
        }
      });
      return slots;
    },
  };
}

/** The input pair's constants: tail, polarity sign, n U_T, nominal I_S1 and I_S / I_B, and IC. */
export function pairConstants(stage: Stage): { tail: number; sign: number; nut: number; specific: number; a0: number; ic: number } {
  const d = stage.design;
  const proc = d.process[d.input.polarity];
  const tail = d.tail;
  if (proc === undefined || tail === undefined) throw new Error('internal: a pair stage without its process or tail after validation');
  const m1 = stage.operatingPoint[0]!;
  return { tail, sign: d.input.polarity === 'n' ? 1 : -1, nut: proc.slope * stage.thermalVoltage, specific: m1.specificCurrent, a0: m1.specificCurrent / tail, ic: m1.ic };
}

/**
 * The gate-voltage difference |V_G1 - V_G2| at which the nominal pair carries the share f:
 * n U_T [v(f / a0) - v((1 - f) / a0)].
 */
export function nominalInputAtShare(c: { nut: number; a0: number }, f: number): number {
  return c.nut * (ekvInverse(f / c.a0) - ekvInverse((1 - f) / c.a0));
}

import type { DeviceGeometry } from '../src/design.js';
/**
 * Closed forms written out for the tests, from the published formulas only (never from a
 * compiled stage): U_T = kT/q, the EKV 1995 I_D/gm (Enz, Krummenacher & Vittoz, AICSP 8, 1995),
 * and the linearised offset sigma with a V_T / current-factor correlation, derived below.
 */
import type { Design, ProcessParams } from '../src/index.js';

/** U_T = kT/q, k = 1.380649e-23 J/K and q = 1.602176634e-19 C (exact in the 2019 SI). */
export const thermal = (t: number): number => (1.380649e-23 * t) / 1.602176634e-19;

/** I_D/gm of a device at the given current: n U_T sqrt(IC) / (1 - e^{-sqrt IC}) (EKV 1995). */
export function idOverGm(p: ProcessParams, w: number, l: number, current: number, t: number): number {
  const ut = thermal(t);
  const is = 2 * p.slope * p.kp * (w / l) * ut * ut;
  const s = Math.sqrt(current / is);
  return (p.slope * ut * s) / -Math.expm1(-s);
}

/**
 * The linearised sigma with a correlation rho between a device's dV_T and ln(beta_i/beta),
 * derived here. Each device draws two independent unit normals; its current-factor deviate is
 * z = sigma_beta (rho u_vt + sqrt(1 - rho^2) u_beta) (README, "Correlation rho").
 *
 * Input pair: V_Gi = V_Ti + n U_T v(I_i / I_Si) and n U_T dv/d(ln IC) = I_D/gm (differentiate
 * v = 2 ln(e^{sqrt IC} - 1)), so to first order Vos = (dV_T1 - dV_T2) - k (z1 - z2) + k ln(I1/I2)
 * with k = (I_D/gm)_in. One device's part sigma_VT u_vt - k z has variance
 *   (sigma_VT - k rho sigma_beta)^2 + k^2 (1 - rho^2) sigma_beta^2
 *     = sigma_VT^2 + k^2 sigma_beta^2 - 2 rho k sigma_VT sigma_beta,
 * and the two devices together, with the pair sigmas S = sqrt(2) sigma_VT, B = sqrt(2) sigma_beta,
 *   S^2 + k^2 B^2 - 2 rho k S B.
 * Mirror load: M4 copies M3 at the same V_GS, so ln(I4/I3) = (z4 - z3) - g (dV_T4 - dV_T3) with
 * g = (gm/I_D)_load; with I2 = I4 and I1 = I3 at balance, ln(I1/I2) = -ln(I4/I3). The load adds
 *   k^2 (B_L^2 + g^2 S_L^2 - 2 rho_L g S_L B_L).
 * With rho = 0 both reduce to Kinget's forms (IEEE JSSC 40(6), 2005).
 */
export function correlatedSigma(d: Design): number {
  const pin = d.process[d.input.polarity]!;
  const areaIn = d.input.w * d.input.l;
  const s = pin.avt / Math.sqrt(areaIn);
  const b = pin.abeta / Math.sqrt(areaIn);
  const k = idOverGm(pin, d.input.w, d.input.l, d.tail! / 2, d.temperature);
  let v = s * s + k * k * b * b - 2 * (pin.rho ?? 0) * k * s * b;
  if ((d['load'] as DeviceGeometry | undefined) !== undefined) {
    const pl = d.process[(d['load'] as DeviceGeometry).polarity]!;
    const areaL = (d['load'] as DeviceGeometry).w * (d['load'] as DeviceGeometry).l;
    const sl = pl.avt / Math.sqrt(areaL);
    const bl = pl.abeta / Math.sqrt(areaL);
    const g = 1 / idOverGm(pl, (d['load'] as DeviceGeometry).w, (d['load'] as DeviceGeometry).l, d.tail! / 2, d.temperature);
    v += k * k * (bl * bl + g * g * sl * sl - 2 * (pl.rho ?? 0) * g * sl * bl);
  }
  return Math.sqrt(v);
}

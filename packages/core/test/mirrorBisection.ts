/**
 * The five-transistor stage's offset by an independent route (the tests' reference for its
 * exact balance), shared by topologies.test.ts and mirrorRegions.test.ts: M3 (diode) carries I1,
 * M4 at the same V_GS carries I4 = I_S4 F(v(I1/I_S3) - (V_T4 - V_T3)/(n U_T)) (EKV 1995, Enz,
 * Krummenacher & Vittoz, AICSP 8), I1 + I4 = I_B solved by bisection on I1 down to adjacent
 * doubles, then Vos = (V_T1 - V_T2) + n U_T (v(I1/I_S1) - v(I2/I_S2)), negated for a p pair.
 */
import type { compileStage } from '../src/compileStage.js';
import type { DeviceGeometry } from '../src/design.js';
import { ekvForward, ekvInverse } from '../src/ekv.js';

type Stage = ReturnType<typeof compileStage>;

/** Vos by bisection, and the pair's sqrt(IC1), sqrt(IC2) at the balance. */
export function mirrorBisection(st: Stage, u: Float64Array): { vos: number; s1: number; s2: number } {
  const d = st.design;
  const [m1, , m3] = st.operatingPoint;
  const ut = st.thermalVoltage;
  const pl = d.process[(d['load'] as DeviceGeometry).polarity]!;
  const pi = d.process[d.input.polarity]!;
  const vt3 = m3!.sigmaVt * u[4]!;
  const vt4 = m3!.sigmaVt * u[6]!;
  const is3 = m3!.specificCurrent * Math.exp(m3!.sigmaBeta * u[5]!);
  const is4 = m3!.specificCurrent * Math.exp(m3!.sigmaBeta * u[7]!);
  const i4 = (i1: number): number => is4 * ekvForward(ekvInverse(i1 / is3) - (vt4 - vt3) / (pl.slope * ut));
  let lo = 0;
  let hi = d.tail!;
  for (let k = 0; k < 300; k++) {
    const mid = 0.5 * (lo + hi);
    if (mid === lo || mid === hi) break;
    if (mid + i4(mid) < d.tail!) lo = mid;
    else hi = mid;
  }
  const i1 = 0.5 * (lo + hi);
  const is1 = m1!.specificCurrent * Math.exp(m1!.sigmaBeta * u[1]!);
  const is2 = m1!.specificCurrent * Math.exp(m1!.sigmaBeta * u[3]!);
  const sign = d.input.polarity === 'n' ? 1 : -1;
  const vos = sign * (m1!.sigmaVt * (u[0]! - u[2]!) + pi.slope * ut * (ekvInverse(i1 / is1) - ekvInverse((d.tail! - i1) / is2)));
  return { vos, s1: Math.sqrt(i1 / is1), s2: Math.sqrt((d.tail! - i1) / is2) };
}

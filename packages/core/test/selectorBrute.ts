import type { Design } from '../src/design.js';
import { ekvForward, specificCurrent } from '../src/ekv.js';
import { deviceSigmaBeta, deviceSigmaVt } from '../src/pelgrom.js';
import { thermalVoltage } from '../src/thermal.js';

/**
 * The required lead by brute force, written apart from the stage's solver: for a trial lead,
 * the common source V_S is bisected until sum_i I_S,i F((V_i - V_T,i - n V_S) / (n U_T)) = I_B
 * (F the EKV forward current), and the lead itself is bisected on the sign of
 * I_1 - max_j I_j (raising the lead raises I_1 and lowers every I_j). For n cells with rho = 0.
 */
export function bruteLead(d: Design, u: Float64Array, base = 0): number {
  const ut = thermalVoltage(d.temperature);
  const cells = d['cells'] as number;
  const p = d.process.n!;
  const tail = d.tail!;
  const nut = p.slope * ut;
  const sVt = deviceSigmaVt(p.avt, d.input.w, d.input.l);
  const sB = deviceSigmaBeta(p.abeta, d.input.w, d.input.l);
  const is0 = specificCurrent(p.slope, p.kp, d.input.w, d.input.l, ut);
  const isOf = Array.from({ length: cells }, (_, i) => is0 * Math.exp(sB * u[base + 2 * i + 1]!));
  const vtOf = Array.from({ length: cells }, (_, i) => sVt * u[base + 2 * i]!);
  const currents = (lead: number): number[] => {
    const at = (vs: number): number[] => isOf.map((is, i) => is * ekvForward(((i === 0 ? lead : 0) - vtOf[i]! - p.slope * vs) / nut));
    let lo = -5;
    let hi = 5; // the sum falls as V_S rises
    for (let k = 0; k < 200 && hi - lo > 1e-15; k++) {
      const mid = 0.5 * (lo + hi);
      if (at(mid).reduce((a, b) => a + b, 0) > tail) lo = mid;
      else hi = mid;
    }
    return at(0.5 * (lo + hi));
  };
  let lo = -0.5;
  let hi = 0.5;
  for (let k = 0; k < 200 && hi - lo > 1e-14; k++) {
    const mid = 0.5 * (lo + hi);
    const c = currents(mid);
    if (c[0]! >= Math.max(...c.slice(1))) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}


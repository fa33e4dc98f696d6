/**
 * The folded stage's offset by an independent route (the tests' reference for its exact
 * balance): a plain bisection on the balance, shared by folded.test.ts and foldedEdges.test.ts.
 */
import type { Design, DeviceGeometry, ProcessParams } from '../src/design.js';
import { ekvForward, ekvInverse, specificCurrent } from '../src/ekv.js';
import { thermalVoltage } from '../src/thermal.js';

export const block = (d: Design, key: string): DeviceGeometry => d[key] as DeviceGeometry;

/**
 * Vos by an independent route, straight from the balance of the issue: each source carries
 * I_Sk F(v_F - dV_Tk/(n U_T)) at the shared bias, I7 = I5 - I1, I8 = I_S8 F(v7 - (dV_T8 - dV_T7)/(n U_T)),
 * bisect I8 = I6 - (I_B - I1) for I1, then Vos = (V_T1 - V_T2) + n U_T (v1 - v2) from each side's EKV
 * inverse (Enz, Krummenacher & Vittoz, AICSP 8, 1995), negated for a p pair (magnitudes).
 */
export function bisectionOffset(d: Design, u: readonly number[]): number {
  const ut = thermalVoltage(d.temperature);
  const dev = (key: string, k: number): { is: number; dvt: number; nut: number } => {
    const g = block(d, key);
    const p: ProcessParams = d.process[g.polarity]!;
    const rho = p.rho ?? 0;
    const s = 1 / Math.sqrt(2 * g.w * g.l);
    const z = rho * u[2 * k]! + Math.sqrt(1 - rho * rho) * u[2 * k + 1]!;
    return { is: specificCurrent(p.slope, p.kp, g.w, g.l, ut) * Math.exp(p.abeta * s * z), dvt: p.avt * s * u[2 * k]!, nut: p.slope * ut };
  };
  const [m1, m2, m5, m6, m7, m8] = [dev('input', 0), dev('input', 1), dev('sources', 2), dev('sources', 3), dev('load', 4), dev('load', 5)];
  const src = block(d, 'sources');
  const p5 = d.process[src.polarity]!;
  const vF = ekvInverse(src.current! / specificCurrent(p5.slope, p5.kp, src.w, src.l, ut));
  const i5 = m5.is * ekvForward(vF - m5.dvt / m5.nut);
  const i6 = m6.is * ekvForward(vF - m6.dvt / m6.nut);
  const tail = d.tail!;
  const g = (i1: number): number => m8.is * ekvForward(ekvInverse((i5 - i1) / m7.is) - (m8.dvt - m7.dvt) / m7.nut) - (i6 - tail + i1);
  let lo = Math.max(0, tail - i6);
  let hi = Math.min(tail, i5);
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (g(mid) > 0) lo = mid;
    else hi = mid;
  }
  const i1 = 0.5 * (lo + hi);
  const vos = m1.dvt - m2.dvt + m1.nut * (ekvInverse(i1 / m1.is) - ekvInverse((tail - i1) / m2.is));
  return d.input.polarity === 'n' ? vos : -vos;
}

import type { Design } from './design.js';
import { ekvInverse, normalisedGmOverId } from './ekv.js';
import { deviceConstants, deviceOperatingPoint, deviceVariables, geometryWarnings } from './deviceConstants.js';
import type { Stage } from './stage.js';
import { thermalVoltage } from './thermal.js';

/** Relative residual of I1 + I4 = I_B at which the balance solve stops. */
export const MIRROR_TOLERANCE = 1e-12;
/** Iteration cap of the guarded Newton solve (bisection alone needs ~60 on any bracket). */
export const MIRROR_MAX_ITERATIONS = 200;

/**
 * Five-transistor stage with a current-mirror load (DOMAIN.md): M1 drives the diode M3, M4 copies
 * it against M2, I1 + I2 = I_B and I4 = I2 at balance (no channel-length modulation).
 *
 * The balance is solved in t = v3 (M3's normalised pinch-off minus source voltage), where
 * h(t) = a3 F(t) + a4 F(t - d) - 1, a_k = I_Sk / I_B, d = (V_T4 - V_T3)/(n_p U_T),
 * is increasing in t: guarded Newton (Newton inside a bracket kept from the signs of h, bisection
 * when a step leaves it). Then Vos follows from the pair as in the simple stage.
 * Sample layout: [M1 vt, M1 beta, M2 vt, M2 beta, M3 vt, M3 beta, M4 vt, M4 beta].
 */
export function compileMirrorPair(design: Design, temperatureWarnings: readonly string[]): Stage {
  const load = design.load;
  if (load === undefined) throw new Error('internal: mirror without load after validation');
  const ut = thermalVoltage(design.temperature);
  const ci = deviceConstants(design, design.input, ut);
  const cl = deviceConstants(design, load, ut);
  const half = design.tail / 2;
  const ops = [
    deviceOperatingPoint('M1', 'input', ci, half, ut),
    deviceOperatingPoint('M2', 'input', ci, half, ut),
    deviceOperatingPoint('M3', 'load', cl, half, ut),
    deviceOperatingPoint('M4', 'load', cl, half, ut),
  ] as const;

  const sign = design.input.polarity === 'n' ? 1 : -1;
  const nutIn = ci.process.slope * ut;
  const nutLoad = cl.process.slope * ut;
  const sVtIn = ci.sigmaVt;
  const bRIn = ci.betaFromVt;
  const bSIn = ci.betaOwn;
  const dScale = cl.sigmaVt / nutLoad;
  const bRL = cl.betaFromVt;
  const bSL = cl.betaOwn;
  const a0 = cl.specificCurrent / design.tail; // I_S3 / I_B without mismatch
  const r0 = design.tail / ci.specificCurrent; // I_B / I_S1 without mismatch
  const t0 = ekvInverse(ops[2].ic); // balance without mismatch
  const tol = MIRROR_TOLERANCE;
  const maxIter = MIRROR_MAX_ITERATIONS;

  const offset = (u: Float64Array, base: number): number => {
    const a3 = a0 * Math.exp(bRL * u[base + 4]! + bSL * u[base + 5]!);
    const a4 = a0 * Math.exp(bRL * u[base + 6]! + bSL * u[base + 7]!);
    const d = dScale * (u[base + 6]! - u[base + 4]!);
    const hd = 0.5 * d;
    let t = t0;
    let lo = -Infinity;
    let hi = Infinity;
    let f3 = 0;
    let f4 = 0;
    let converged = false;
    for (let k = 0; k < maxIter; k++) {
      // softplus and logistic of x = t/2 and y = (t - d)/2 from one exp each (no overflow).
      const x = 0.5 * t;
      let l3: number, g3: number;
      if (x > 0) { const e = Math.exp(-x); l3 = x + Math.log1p(e); g3 = 1 / (1 + e); }
      else { const e = Math.exp(x); l3 = Math.log1p(e); g3 = e / (1 + e); }
      const y = x - hd;
      let l4: number, g4: number;
      if (y > 0) { const e = Math.exp(-y); l4 = y + Math.log1p(e); g4 = 1 / (1 + e); }
      else { const e = Math.exp(y); l4 = Math.log1p(e); g4 = e / (1 + e); }
      f3 = a3 * l3 * l3;
      f4 = a4 * l4 * l4;
      const h = f3 + f4 - 1;
      if (Math.abs(h) <= tol) { converged = true; break; }
      if (h < 0) lo = t; else hi = t;
      const dh = a3 * l3 * g3 + a4 * l4 * g4;
      let next = t - h / dh;
      if (!(next > lo && next < hi)) {
        if (lo === -Infinity || hi === Infinity) {
          // Open a bracket: at tLo both currents are <= I_B/2, at tHi one of them is >= I_B.
          const tLo = Math.min(ekvInverse(0.5 / a3), ekvInverse(0.5 / a4) + d);
          const tHi = Math.max(ekvInverse(1 / a3), ekvInverse(1 / a4) + d);
          if (lo === -Infinity) lo = Math.min(tLo, t);
          if (hi === Infinity) hi = Math.max(tHi, t);
        }
        next = 0.5 * (lo + hi);
      }
      t = next;
    }
    if (!converged) return NaN;
    // I1 = f3 I_B and I2 = I4 = f4 I_B, each accurate to its own size (I_B - I1 would lose a
    // small I2 to cancellation when one side takes nearly all the tail current).
    const e1 = Math.exp(-(bRIn * u[base]! + bSIn * u[base + 1]!));
    const e2 = Math.exp(-(bRIn * u[base + 2]! + bSIn * u[base + 3]!));
    const v1 = ekvInverse(f3 * r0 * e1);
    const v2 = ekvInverse(f4 * r0 * e2);
    return sign * (sVtIn * (u[base]! - u[base + 2]!) + nutIn * (v1 - v2));
  };

  const offsets = (u: Float64Array, count: number, out: Float64Array, outBase: number): number => {
    let failed = 0;
    for (let i = 0, j = 0; i < count; i++, j += 8) {
      const x = offset(u, j);
      if (x !== x) failed++;
      out[outBase + i] = x;
    }
    return failed;
  };

  // Linearised (DOMAIN.md, Kinget 2005): the load's current ratio m = I4/I3 at equal gates,
  // ln m ~ z_beta4 - z_beta3 - (gm/I_D)_load (dV_T4 - dV_T3), moves Vos by -(I_D/gm)_in ln m.
  const idOverGmIn = nutIn / normalisedGmOverId(ops[0].ic);
  const gmIdLoad = normalisedGmOverId(ops[2].ic) / nutLoad;
  const vtIn = sign * (sVtIn - idOverGmIn * bRIn);
  const betaIn = sign * (-idOverGmIn * bSIn);
  // d(ln m)/du for M4's variables; M3's are the negatives.
  const dmVt4 = bRL - gmIdLoad * cl.sigmaVt;
  const dmBeta4 = bSL;
  const vtLoad4 = -sign * idOverGmIn * dmVt4;
  const betaLoad4 = -sign * idOverGmIn * dmBeta4;
  const sensitivities = Float64Array.of(
    vtIn, betaIn, -vtIn, -betaIn,
    -vtLoad4, -betaLoad4, vtLoad4, betaLoad4,
  );

  return {
    design,
    topology: 'mirror',
    thermalVoltage: ut,
    dimension: 8,
    variables: [
      ...deviceVariables('M1', 'input', ci),
      ...deviceVariables('M2', 'input', ci),
      ...deviceVariables('M3', 'load', cl),
      ...deviceVariables('M4', 'load', cl),
    ],
    sensitivities,
    operatingPoint: ops,
    warnings: [...temperatureWarnings, ...geometryWarnings('input', ci), ...geometryWarnings('load', cl)],
    offset,
    offsets,
  };
}

import type { Design } from '../design.js';
import { ekvInverseOfRoot, lnExpm1OverS, normalisedGmOverId } from '../ekv.js';
import { deviceBlock, deviceConstants, deviceOperatingPoint, deviceVariables, geometryWarnings, tailCurrent } from '../elements.js';
import { EXPM1_SMALL_LIMIT, expm1Small, expSmall } from '../expSmall.js';
import { thermalVoltage } from '../thermal.js';
import { INPUT_PAIR, OFFSET_FIGURE, otherPolarity, TAIL_FIELD } from './common.js';
import type { BlockDefinition, StageDefinition, StageModel } from './definition.js';

/** Relative residual of I1 + I4 = I_B at which the balance solve stops. */
export const MIRROR_TOLERANCE = 1e-12;
/** Iteration cap of the guarded Newton solve (bisection alone needs ~60 on any bracket). */
export const MIRROR_MAX_ITERATIONS = 200;

/**
 * Five-transistor stage with a current-mirror load: M1 drives the diode M3, M4 copies
 * it against M2, I1 + I2 = I_B and I4 = I2 at balance (no channel-length modulation).
 *
 * The balance is solved in s = sqrt(I3/I_S3), where h(s) = a3 s^2 + a4 F(v3 - d) - 1,
 * a_k = I_Sk / I_B, d = (V_T4 - V_T3)/(n_p U_T), is increasing on the closed bracket
 * [0, 1/sqrt(a3)]: guarded Newton (Newton inside the bracket, narrowed from the signs of h, and
 * bisection when a step leaves it). Working in s needs one expm1 and one log1p per step.
 * Then Vos follows from the pair as in the simple stage.
 * Sample layout: [M1 vt, M1 beta, M2 vt, M2 beta, M3 vt, M3 beta, M4 vt, M4 beta].
 */
function compileMirrorPair(design: Design): StageModel {
  const tail = tailCurrent(design);
  const ut = thermalVoltage(design.temperature);
  const ci = deviceConstants(design, deviceBlock(design, 'input'), ut);
  const cl = deviceConstants(design, deviceBlock(design, 'load'), ut);
  const half = tail / 2;
  const ops = [
    deviceOperatingPoint('M1', 'input', ci, half, ut),
    deviceOperatingPoint('M2', 'input', ci, half, ut),
    deviceOperatingPoint('M3', 'load', cl, half, ut),
    deviceOperatingPoint('M4', 'load', cl, half, ut),
  ] as const;

  const sign = ci.geometry.polarity === 'n' ? 1 : -1;
  const nutIn = ci.process.slope * ut;
  const nutLoad = cl.process.slope * ut;
  const sVtIn = ci.sigmaVt;
  const bRIn = ci.betaFromVt;
  const bSIn = ci.betaOwn;
  const dScale = cl.sigmaVt / nutLoad;
  const bRL = cl.betaFromVt;
  const bSL = cl.betaOwn;
  const a0 = cl.specificCurrent / tail; // I_S3 / I_B without mismatch
  const c0 = Math.sqrt(a0 * (tail / ci.specificCurrent)); // sqrt(I_S3 / I_S1) without mismatch
  const sStart = Math.sqrt(ops[2].ic); // balance without mismatch
  // dL4/d(d/2) at the balance without mismatch is -(1 - e^{-s0}): see the first guess below.
  const gamma = -Math.expm1(-sStart);
  const tol = MIRROR_TOLERANCE;
  const maxIter = MIRROR_MAX_ITERATIONS;

  // The batch is solved in passes over the block, numpy-fashion: each pass is a loop whose
  // iterations are independent and whose transcendental calls do not wait on one another (a
  // chain such as expm1 -> log1p inside one iteration leaves the CPU waiting on its latency;
  // in separate passes the calls of neighbouring samples overlap). Every value is computed by
  // the same expression as in a per-sample loop, so the bits do not depend on the passes.
  // Scratch arrays only grow; they never carry results from one call to the next.
  let cap = 0;
  let A3 = new Float64Array(0);
  let A4 = A3;
  let DX = A3;
  let HD = A3;
  let S = A3;
  let LO = A3;
  let HI = A3;
  let L4 = A3;
  let EM = A3;
  let X1 = A3;
  let X2 = A3;
  let ACTIVE = new Int32Array(0);
  let KIND = new Int32Array(0);
  const ensure = (n: number): void => {
    if (n <= cap) return;
    cap = Math.max(n, 2 * cap);
    A3 = new Float64Array(cap);
    A4 = new Float64Array(cap);
    DX = new Float64Array(cap);
    HD = new Float64Array(cap);
    S = new Float64Array(cap);
    LO = new Float64Array(cap);
    HI = new Float64Array(cap);
    L4 = new Float64Array(cap);
    EM = new Float64Array(cap);
    X1 = new Float64Array(cap);
    X2 = new Float64Array(cap);
    ACTIVE = new Int32Array(cap);
    KIND = new Int32Array(cap);
  };

  const figures = (u: Float64Array, count: number, out: Float64Array, outBase: number): number => {
    ensure(count);
    // Pass 1: the load's current factors (their exponents are a few percent: expSmall's
    // polynomial) and e^{-d/2} (an exp call; d/2 is often beyond its range).
    for (let i = 0, b = 0; i < count; i++, b += 8) {
      A3[i] = a0 * expSmall(bRL * u[b + 4]! + bSL * u[b + 5]!);
      A4[i] = a0 * expSmall(bRL * u[b + 6]! + bSL * u[b + 7]!);
      const hd = 0.5 * dScale * (u[b + 6]! - u[b + 4]!);
      HD[i] = hd;
      DX[i] = Math.exp(-hd);
    }
    // Pass 2: first guess. With L4 ~ s - gamma d/2, h(s) = 0 is a quadratic with a closed-form
    // root; its error is second order in the mismatch, so Newton needs about one step from it.
    for (let i = 0; i < count; i++) {
      const a3 = A3[i]!;
      const a4 = A4[i]!;
      const hi = 1 / Math.sqrt(a3);
      const ghd = gamma * HD[i]!;
      const disc = a3 + a4 - a3 * a4 * ghd * ghd;
      let s = disc > 0 ? (a4 * ghd + Math.sqrt(disc)) / (a3 + a4) : sStart;
      if (!(s > 0 && s < hi)) s = 0.5 * hi;
      S[i] = s;
      LO[i] = 0;
      HI[i] = hi;
      ACTIVE[i] = i;
    }
    // Unknown s = sqrt(IC3) = ln(1 + e^{v3/2}) on the closed bracket [0, 1/sqrt(a3)]:
    // h(s) = a3 s^2 + a4 L4^2 - 1 with L4 = ln(1 + e^{v4/2}) = log1p(expm1(s) e^{-d/2}).
    let active = count;
    for (let k = 0; k < maxIter && active > 0; k++) {
      // Passes 3 and 4: expm1(s), then L4 = log1p(expm1(s) D) (s > 30 is handled in pass 5).
      for (let j = 0; j < active; j++) {
        const i = ACTIVE[j]!;
        const s = S[i]!;
        if (s <= 30) EM[i] = Math.expm1(s);
      }
      for (let j = 0; j < active; j++) {
        const i = ACTIVE[j]!;
        if (S[i]! <= 30) L4[i] = Math.log1p(EM[i]! * DX[i]!);
      }
      // Pass 5: the guarded Newton step.
      let still = 0;
      for (let j = 0; j < active; j++) {
        const i = ACTIVE[j]!;
        const s = S[i]!;
        const dexp = DX[i]!;
        let l4: number;
        let dl4: number;
        let d2l4 = Number.NaN; // second derivative, where it is cheap (below)
        if (s <= 30) {
          const em = EM[i]!;
          const ey = em * dexp;
          l4 = L4[i]!;
          const q = 1 / (1 + ey);
          dl4 = dexp * (em + 1) * q;
          d2l4 = dl4 * (1 - dl4); // = e^s D (1 - D) / (1 + (e^s - 1) D)^2
        } else {
          // Log domain where expm1(s) would overflow: v4/2 = ln(expm1 s) - d/2.
          const y = s + Math.log1p(-Math.exp(-s)) - HD[i]!;
          let g: number;
          if (y > 0) { const e = Math.exp(-y); l4 = y + Math.log1p(e); g = 1 / (1 + e); }
          else { const e = Math.exp(y); l4 = Math.log1p(e); g = e / (1 + e); }
          dl4 = g / -Math.expm1(-s); // dy/ds = 1/(1 - e^{-s})
          L4[i] = l4;
        }
        const a3 = A3[i]!;
        const a4 = A4[i]!;
        const h = a3 * s * s + a4 * l4 * l4 - 1;
        if (Math.abs(h) <= tol) continue;
        let lo = LO[i]!;
        let hi = HI[i]!;
        if (h < 0) lo = s; else hi = s;
        let next = s - h / (2 * a3 * s + 2 * a4 * l4 * dl4);
        if (!(next > lo && next < hi)) next = 0.5 * (lo + hi); // bisection guard
        S[i] = next;
        LO[i] = lo;
        HI[i] = hi;
        // A last small Newton step needs no new expm1/log1p: L4 moves by its second-order Taylor
        // step. With w = L4' (so L4'' = w(1 - w), L4''' = w(1 - w)(1 - 2w), |L4'''| <= 0.1 + 2w^3),
        // the neglected term is below |ds|^3 (0.1 + 2 w^3) / 6; it is accepted only when that is
        // under 1e-14 L4, which moves the residual h by less than 2e-14 against the 1e-12 asked
        // for. The residual is then evaluated at the new point and must meet the tolerance.
        const ds = next - s;
        const ads3 = Math.abs(ds * ds * ds);
        if (Math.abs(ds) <= 1e-6 && ads3 * (0.1 + 2 * dl4 * dl4 * dl4) <= 6e-14 * l4) {
          const l4n = l4 + ds * (dl4 + 0.5 * ds * d2l4);
          if (Math.abs(a3 * next * next + a4 * l4n * l4n - 1) <= tol) {
            L4[i] = l4n;
            continue;
          }
        }
        ACTIVE[still++] = i;
      }
      active = still;
    }
    for (let j = 0; j < active; j++) L4[ACTIVE[j]!] = Number.NaN; // not converged: reported as NaN
    // sqrt(IC1) = s sqrt(a3 I_B/I_S1) and sqrt(IC2) = L4 sqrt(a4 I_B/I_S2) (I2 = I4); then
    // v1 - v2 as ekvInverseDifference computes it, its calls spread over passes 7 and 8.
    // Pass 6: s1 and s2 (their exponents are differences of current-factor deviates: expSmall).
    for (let i = 0, b = 0; i < count; i++, b += 8) {
      const z3 = bRL * u[b + 4]! + bSL * u[b + 5]!;
      const z4 = bRL * u[b + 6]! + bSL * u[b + 7]!;
      const q1 = 0.5 * (z3 - (bRIn * u[b]! + bSIn * u[b + 1]!));
      const q2 = 0.5 * (z4 - (bRIn * u[b + 2]! + bSIn * u[b + 3]!));
      A3[i] = S[i]! * c0 * expSmall(q1);
      A4[i] = L4[i]! * c0 * expSmall(q2);
      HD[i] = q1;
      DX[i] = q2;
    }
    // Pass 7: each sample's region: both sides at or below s = 1 need the log of s/L4 (pass 8).
    // Both above, with v = 2 ln(e^s - 1): v1 - v2 = 2 log1p(expm1(s1 - s2) (1 + 1/expm1(s2))),
    // one expm1 call here and, for |s1 - s2| <= 1/4, a polynomial for expm1(s1 - s2) (pass 8);
    // a wider split keeps ekvInverseDifference's 2 (s1 - s2) + 2 ln(expm1(-s1)/expm1(-s2)).
    // Otherwise (or NaN), v1 - v2 directly.
    for (let i = 0; i < count; i++) {
      const s1 = A3[i]!;
      const s2 = A4[i]!;
      if (s1 <= 1 && s2 <= 1) {
        KIND[i] = 0;
        X1[i] = S[i]! / L4[i]!;
      } else if (s1 > 1 && s2 > 1) {
        const split = s1 - s2;
        if (split >= -EXPM1_SMALL_LIMIT && split <= EXPM1_SMALL_LIMIT) {
          KIND[i] = 1;
          X1[i] = Math.expm1(s2);
        } else {
          KIND[i] = 3;
          X1[i] = Math.expm1(-s1);
          X2[i] = Math.expm1(-s2);
        }
      } else {
        KIND[i] = 2;
        X1[i] = ekvInverseOfRoot(s1) - ekvInverseOfRoot(s2);
      }
    }
    // Pass 8: the one log (or log1p), v1 - v2 and Vos.
    let failed = 0;
    for (let i = 0, b = 0; i < count; i++, b += 8) {
      const kind = KIND[i]!;
      const s1 = A3[i]!;
      const s2 = A4[i]!;
      let dv: number;
      if (kind === 0) dv = 2 * (Math.log(X1[i]!) + HD[i]! - DX[i]!) + 2 * (lnExpm1OverS(s1) - lnExpm1OverS(s2));
      else if (kind === 1) dv = 2 * Math.log1p(expm1Small(s1 - s2) * (1 + 1 / X1[i]!));
      else if (kind === 3) dv = 2 * (s1 - s2) + 2 * Math.log(X1[i]! / X2[i]!);
      else dv = X1[i]!;
      const vos = sign * (sVtIn * (u[b]! - u[b + 2]!) + nutIn * dv);
      // NaN from a failed solve, or a side whose current underflowed to zero (no finite
      // balance): reported as non-converged, never as a number or +-Infinity.
      if (vos - vos === 0) out[outBase + i] = vos;
      else { out[outBase + i] = Number.NaN; failed++; }
    }
    return failed;
  };

  // Single evaluations (design-point search, tests) go through the same code, so a sample gives
  // the same bits alone or in a batch.
  const one = new Float64Array(8);
  const oneOut = new Float64Array(1);
  const figure = (u: Float64Array, base: number): number => {
    for (let j = 0; j < 8; j++) one[j] = u[base + j]!;
    figures(one, 1, oneOut, 0);
    return oneOut[0]!;
  };

  // Linearised (Kinget, IEEE JSSC 40(6), 2005): the load's current ratio m = I4/I3 at equal gates,
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
    thermalVoltage: ut,
    variables: [
      ...deviceVariables('M1', 'input', ci),
      ...deviceVariables('M2', 'input', ci),
      ...deviceVariables('M3', 'load', cl),
      ...deviceVariables('M4', 'load', cl),
    ],
    sensitivities,
    operatingPoint: ops,
    warnings: [...geometryWarnings('input', ci), ...geometryWarnings('load', cl)],
    figure,
    figures,
  };
}

/** The mirror load M3 (diode, driven by M1) / M4 (copies it against M2). */
const MIRROR_LOAD: BlockDefinition = {
  key: 'load',
  kind: 'mos',
  elements: ['M3', 'M4'],
  label: 'mirror load',
  polarity: 'opposite-to-input',
  fields: [],
  example: (input) => `{ polarity: ${otherPolarity(input)}, w: 4 um, l: 2 um }`,
  sizable: true,
};

/** `topology: mirror`: the five-transistor stage with a current-mirror load. */
export const MIRROR_STAGE: StageDefinition = {
  topology: 'mirror',
  summary: 'five-transistor stage: input pair with a current-mirror load',
  fields: [TAIL_FIELD],
  blocks: [INPUT_PAIR, MIRROR_LOAD],
  figure: OFFSET_FIGURE,
  compile: compileMirrorPair,
};

import type { Design } from '../design.js';
import { ekvInverseOfRoot, lnExpm1OverS, normalisedGmOverId } from '../ekv.js';
import { deviceBlock, deviceConstants, deviceOperatingPoint, deviceVariables, geometryWarnings, tailCurrent } from '../elements.js';
import { EXPM1_SMALL_LIMIT, expm1Large, expm1Small, expSmall } from '../expSmall.js';
import { thermalVoltage } from '../thermal.js';
import { INPUT_PAIR, OFFSET_FIGURE, otherPolarity, TAIL_FIELD } from './common.js';
import type { BlockDefinition, StageDefinition, StageModel } from './definition.js';

/** Relative residual of I1 + I4 = I_B at which the balance solve stops. */
export const MIRROR_TOLERANCE = 1e-12;
/** Round cap of the guarded Newton solve (bisection alone needs log2(bracket / s) + ~40 halvings: sqrt(IC3) below ~1e-60, at draws of hundreds of sigma, can reach it: reported as not converged). */
export const MIRROR_MAX_ITERATIONS = 200;

/**
 * The per-design constants of the balance and the offset, read once when the stage is compiled.
 * Sample layout: [M1 vt, M1 beta, M2 vt, M2 beta, M3 vt, M3 beta, M4 vt, M4 beta].
 */
interface MirrorConstants {
  /** +1 for an n input pair, -1 for p. */
  readonly sign: number;
  /** n U_T of the input pair and of the load, V. */
  readonly nutIn: number;
  readonly nutLoad: number;
  /** The input pair's sigma(V_T), V, and its current-factor deviate per unit draw (from V_T, own). */
  readonly sVtIn: number;
  readonly bRIn: number;
  readonly bSIn: number;
  /** The load's sigma(V_T) / (n_p U_T), and its current-factor deviate per unit draw (from V_T, own). */
  readonly dScale: number;
  readonly bRL: number;
  readonly bSL: number;
  /** I_S3 / I_B without mismatch. */
  readonly a0: number;
  /** sqrt(I_S3 / I_S1) without mismatch. */
  readonly c0: number;
  /** s = sqrt(IC3) at the balance without mismatch. */
  readonly sStart: number;
  /** dL4/d(d/2) at the balance without mismatch is -(1 - e^{-s0}) = -gamma (see firstGuess). */
  readonly gamma: number;
}

/**
 * Scratch arrays of a batch, one entry per sample. They only grow; they never carry results
 * from one call to the next. Between the passes they hold, in turn: the load's current factors
 * a3, a4 then the pair's roots s1, s2 (A3, A4); d/2 then the exponent q1 (HD); e^{d/2} - 1 then
 * q2 (DX); the unknown s and its bracket (S, LO, HI); L4 (L4); expm1(s), then dL4/ds (EM);
 * the region of the final formula and its operands (KIND, X1, X2); the samples still iterating
 * (ACTIVE).
 */
class MirrorScratch {
  cap = 0;
  A3 = new Float64Array(0);
  A4 = this.A3;
  DX = this.A3;
  HD = this.A3;
  S = this.A3;
  LO = this.A3;
  HI = this.A3;
  L4 = this.A3;
  EM = this.A3;
  X1 = this.A3;
  X2 = this.A3;
  ACTIVE = new Int32Array(0);
  KIND = new Int32Array(0);

  ensure(n: number): void {
    if (n <= this.cap) return;
    const cap = Math.max(n, 2 * this.cap);
    this.cap = cap;
    this.A3 = new Float64Array(cap);
    this.A4 = new Float64Array(cap);
    this.DX = new Float64Array(cap);
    this.HD = new Float64Array(cap);
    this.S = new Float64Array(cap);
    this.LO = new Float64Array(cap);
    this.HI = new Float64Array(cap);
    this.L4 = new Float64Array(cap);
    this.EM = new Float64Array(cap);
    this.X1 = new Float64Array(cap);
    this.X2 = new Float64Array(cap);
    this.ACTIVE = new Int32Array(cap);
    this.KIND = new Int32Array(cap);
  }
}

// The batch is solved in passes over the block, numpy-fashion: each pass is a loop whose
// iterations are independent and whose transcendental calls do not wait on one another (a
// chain such as expm1 -> log1p inside one iteration leaves the CPU waiting on its latency; in
// separate passes the calls of neighbouring samples overlap). Every value is computed by the
// same expression as in a per-sample loop, so the bits do not depend on the passes. Each pass
// is a function of its own: small functions are compiled (and optimised) sooner.

/**
 * Pass 1: the load's current factors a3, a4 (their exponents are a few percent: expSmall's
 * polynomial), d/2 = (V_T4 - V_T3)/(2 n_p U_T) and e^{d/2} - 1 (expm1Small's polynomial up to
 * |d/2| = 1/4, beyond expSmall's range of 1/32 that d/2 often leaves).
 */
function loadFactors(k: MirrorConstants, t: MirrorScratch, u: Float64Array, count: number): void {
  const { a0, bRL, bSL, dScale } = k;
  const { A3, A4, HD, DX } = t;
  for (let i = 0, b = 0; i < count; i++, b += 8) {
    A3[i] = a0 * expSmall(bRL * u[b + 4]! + bSL * u[b + 5]!);
    A4[i] = a0 * expSmall(bRL * u[b + 6]! + bSL * u[b + 7]!);
    const hd = 0.5 * dScale * (u[b + 6]! - u[b + 4]!);
    HD[i] = hd;
    DX[i] = expm1Small(hd);
  }
}

/**
 * Pass 2: the first guess of s and its bracket [0, 1/sqrt(a3)]. With L4 ~ s - gamma d/2,
 * h(s) = 0 is a quadratic with a closed-form root; its error is second order in the mismatch,
 * so Newton needs about one step from it.
 */
function firstGuess(k: MirrorConstants, t: MirrorScratch, count: number): void {
  const { gamma, sStart } = k;
  const { A3, A4, HD, S, LO, HI, ACTIVE } = t;
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
}

/**
 * M4's root L4 = ln(1 + (e^s - 1) e^{-d/2}) from s, hd = d/2, e = e^{d/2} - 1, em = e^s - 1 and
 * g = e^{d/2}, in the form loadRoots describes (exported for its test against the
 * library-function form).
 */
export function mirrorLoadRoot(s: number, hd: number, e: number, em: number, g: number): number {
  const w = e / (em + 1);
  return s >= 1 && w <= 0.5 ? s - hd + Math.log1p(w) : Math.log1p(em / g);
}

/**
 * e^{d/2} from hd = d/2 and e = e^{d/2} - 1: 1 + e where that keeps its digits (d/2 >= -1/4,
 * within 0.8 ulp), an exp call below, where 1 + e would cancel (it is 0 from d/2 < -37 on).
 */
function loadExp(hd: number, e: number): number {
  return hd >= -EXPM1_SMALL_LIMIT ? 1 + e : Math.exp(hd);
}

/**
 * Passes 3 and 4 of a Newton round (s <= 30; beyond, newtonStep): expm1(s), then, with
 * E = e^{d/2} - 1 and w = E e^{-s} = E / (expm1(s) + 1), L4 = ln(1 + expm1(s) / (1 + E)) as
 *   L4 = s - d/2 + log1p(w)            for s >= 1 and w <= 1/2 (since 1 + (e^s - 1) e^{-d/2} =
 *                                       e^{s - d/2} (1 + w); log1p of a small argument),
 *   L4 = log1p(expm1(s) / e^{d/2})     otherwise (e^{d/2} by loadExp).
 * Where the first form is used, L4 >= ln(1 + (e - 1) / (1 + e/2)) = 0.55 and |log1p(w)| <= 0.41,
 * so its two terms do not cancel. EM then keeps dL4/ds = e^s / (e^s - 1 + e^{d/2}) for the
 * Newton step, written (expm1(s) + 1) / (expm1(s) + e^{d/2}): a sum of two positive terms, which
 * keeps its digits where 1 / (1 + w) would not (w -> -1 when e^{d/2} and s are both tiny).
 */
function loadRoots(t: MirrorScratch, active: number): void {
  const { ACTIVE, S, EM, L4, DX, HD } = t;
  for (let j = 0; j < active; j++) {
    const i = ACTIVE[j]!;
    const s = S[i]!;
    if (s <= 30) EM[i] = expm1Large(s);
  }
  for (let j = 0; j < active; j++) {
    const i = ACTIVE[j]!;
    const s = S[i]!;
    if (s <= 30) {
      const em = EM[i]!;
      const e = DX[i]!;
      const hd = HD[i]!;
      const g = loadExp(hd, e);
      L4[i] = mirrorLoadRoot(s, hd, e, em, g);
      EM[i] = (em + 1) / (em + g);
    }
  }
}

/**
 * Pass 5 of a Newton round: the guarded Newton step of every sample still iterating, which
 * stay listed at the front of ACTIVE; returns how many remain.
 */
function newtonStep(t: MirrorScratch, active: number, tol: number): number {
  const { ACTIVE, S, EM, L4, HD, A3, A4, LO, HI } = t;
  let still = 0;
  for (let j = 0; j < active; j++) {
    const i = ACTIVE[j]!;
    const s = S[i]!;
    let l4: number;
    let dl4: number;
    let d2l4 = Number.NaN; // second derivative, where it is cheap (below)
    if (s <= 30) {
      l4 = L4[i]!;
      dl4 = EM[i]!; // dL4/ds = e^s / (e^s - 1 + e^{d/2}) (loadRoots)
      d2l4 = dl4 * (1 - dl4);
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
    // for. The residual is then evaluated at the new point and must meet the tolerance. The
    // bound uses w at s; over a step |ds| <= 1e-3, w moves by at most |ds| |L4''| <= 1e-3 w
    // max(1, w), which leaves the bound's margin (0.1 against the largest |w(1-w)(1-2w)| =
    // 0.096 for w < 1, 2w^3 against 2w^3 - 3w^2 + w above) intact. (A cap of 1e-6 instead
    // sent 29% of the comparator example's samples to a second expm1/log1p round, 2% now;
    // the offsets moved by at most 3.4e-16 V, a residual far inside the 1e-12 tolerance.)
    const ds = next - s;
    const ads3 = Math.abs(ds * ds * ds);
    if (Math.abs(ds) <= 1e-3 && ads3 * (0.1 + 2 * dl4 * dl4 * dl4) <= 6e-14 * l4) {
      const l4n = l4 + ds * (dl4 + 0.5 * ds * d2l4);
      if (Math.abs(a3 * next * next + a4 * l4n * l4n - 1) <= tol) {
        L4[i] = l4n;
        continue;
      }
    }
    ACTIVE[still++] = i;
  }
  return still;
}

/**
 * Newton rounds of the balance, summed over samples, since the last `takeMirrorRounds` (in this
 * thread). One addition per round of a 1024-sample block, not per sample: it measures the
 * solve's work, which its cost test holds to about one round per sample.
 */
let rounds = 0;

/** The balance's Newton rounds summed over samples since the last call (this thread), and resets the count. */
export function takeMirrorRounds(): number {
  const r = rounds;
  rounds = 0;
  return r;
}

/**
 * The balance I1 + I4 = I_B of every sample, in s = sqrt(IC3) = ln(1 + e^{v3/2}) on the closed
 * bracket [0, 1/sqrt(a3)]: h(s) = a3 s^2 + a4 L4^2 - 1 with L4 = ln(1 + e^{v4/2}) =
 * log1p(expm1(s) e^{-d/2}), by guarded Newton rounds from firstGuess. Leaves s in S and L4 in
 * L4; L4 is NaN where the solve did not converge in `maxIter` rounds.
 */
function balance(t: MirrorScratch, count: number, tol: number, maxIter: number): void {
  let active = count;
  for (let k = 0; k < maxIter && active > 0; k++) {
    rounds += active;
    loadRoots(t, active);
    active = newtonStep(t, active, tol);
  }
  for (let j = 0; j < active; j++) t.L4[t.ACTIVE[j]!] = Number.NaN; // not converged: reported as NaN
}

/**
 * Pass 6: the input pair's roots s1 = sqrt(IC1) = s sqrt(a3 I_B/I_S1) and s2 = sqrt(IC2) =
 * L4 sqrt(a4 I_B/I_S2) (I2 = I4) into A3, A4, with the exponents q1, q2 (differences of
 * current-factor deviates: expSmall) into HD, DX.
 */
function pairRoots(k: MirrorConstants, t: MirrorScratch, u: Float64Array, count: number): void {
  const { bRL, bSL, bRIn, bSIn, c0 } = k;
  const { A3, A4, HD, DX, S, L4 } = t;
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
}

/**
 * Pass 7: v1 - v2 as ekvInverseDifference computes it, its calls spread over this pass and the
 * next. Each sample's region: both sides at or below s = 1 need the log of s/L4 (next pass).
 * Both above, with v = 2 ln(e^s - 1): v1 - v2 = 2 log1p(expm1(s1 - s2) (1 + 1/expm1(s2))), one
 * expm1 call here and, for |s1 - s2| <= 1/4, a polynomial for expm1(s1 - s2) (next pass); a
 * wider split keeps ekvInverseDifference's 2 (s1 - s2) + 2 ln(expm1(-s1)/expm1(-s2)).
 * Otherwise (or NaN), v1 - v2 directly.
 */
function offsetRegions(t: MirrorScratch, count: number): void {
  const { A3, A4, KIND, X1, X2, S, L4 } = t;
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
        X1[i] = expm1Large(s2);
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
}

/** Pass 8: the one log (or log1p), v1 - v2 and Vos into out; returns how many are NaN. */
function offsets(k: MirrorConstants, t: MirrorScratch, u: Float64Array, count: number, out: Float64Array, outBase: number): number {
  const { sign, sVtIn, nutIn } = k;
  const { KIND, A3, A4, X1, X2, HD, DX } = t;
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
}

/**
 * d(Vos)/du at u = 0, linearised (Kinget, IEEE JSSC 40(6), 2005): the load's current ratio
 * m = I4/I3 at equal gates, ln m ~ z_beta4 - z_beta3 - (gm/I_D)_load (dV_T4 - dV_T3), moves Vos
 * by -(I_D/gm)_in ln m.
 */
function mirrorSensitivities(k: MirrorConstants, icIn: number, icLoad: number, sigmaVtLoad: number): Float64Array {
  const { sign, nutIn, nutLoad, sVtIn, bRIn, bSIn, bRL, bSL } = k;
  const idOverGmIn = nutIn / normalisedGmOverId(icIn);
  const gmIdLoad = normalisedGmOverId(icLoad) / nutLoad;
  const vtIn = sign * (sVtIn - idOverGmIn * bRIn);
  const betaIn = sign * (-idOverGmIn * bSIn);
  // d(ln m)/du for M4's variables; M3's are the negatives.
  const dmVt4 = bRL - gmIdLoad * sigmaVtLoad;
  const dmBeta4 = bSL;
  const vtLoad4 = -sign * idOverGmIn * dmVt4;
  const betaLoad4 = -sign * idOverGmIn * dmBeta4;
  return Float64Array.of(
    vtIn, betaIn, -vtIn, -betaIn,
    -vtLoad4, -betaLoad4, vtLoad4, betaLoad4,
  );
}

/**
 * Five-transistor stage with a current-mirror load: M1 drives the diode M3, M4 copies
 * it against M2, I1 + I2 = I_B and I4 = I2 at balance (no channel-length modulation).
 *
 * The balance is solved in s = sqrt(I3/I_S3), where h(s) = a3 s^2 + a4 F(v3 - d) - 1,
 * a_k = I_Sk / I_B, d = (V_T4 - V_T3)/(n_p U_T), is increasing on the closed bracket
 * [0, 1/sqrt(a3)]: guarded Newton (Newton inside the bracket, narrowed from the signs of h, and
 * bisection when a step leaves it). Working in s needs one expm1 and one log1p per step.
 * Then Vos follows from the pair as in the simple stage.
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

  const nutLoad = cl.process.slope * ut;
  const a0 = cl.specificCurrent / tail;
  const sStart = Math.sqrt(ops[2].ic);
  const k: MirrorConstants = {
    sign: ci.geometry.polarity === 'n' ? 1 : -1,
    nutIn: ci.process.slope * ut,
    nutLoad,
    sVtIn: ci.sigmaVt,
    bRIn: ci.betaFromVt,
    bSIn: ci.betaOwn,
    dScale: cl.sigmaVt / nutLoad,
    bRL: cl.betaFromVt,
    bSL: cl.betaOwn,
    a0,
    c0: Math.sqrt(a0 * (tail / ci.specificCurrent)),
    sStart,
    gamma: -Math.expm1(-sStart),
  };
  const t = new MirrorScratch();

  const figures = (u: Float64Array, count: number, out: Float64Array, outBase: number): number => {
    t.ensure(count);
    loadFactors(k, t, u, count);
    firstGuess(k, t, count);
    balance(t, count, MIRROR_TOLERANCE, MIRROR_MAX_ITERATIONS);
    pairRoots(k, t, u, count);
    offsetRegions(t, count);
    return offsets(k, t, u, count, out, outBase);
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

  return {
    thermalVoltage: ut,
    variables: [
      ...deviceVariables('M1', 'input', ci),
      ...deviceVariables('M2', 'input', ci),
      ...deviceVariables('M3', 'load', cl),
      ...deviceVariables('M4', 'load', cl),
    ],
    sensitivities: mirrorSensitivities(k, ops[0].ic, ops[2].ic, cl.sigmaVt),
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

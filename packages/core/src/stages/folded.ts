import type { Design, DeviceGeometry } from '../design.js';
import { ekvForward, ekvInverse, ekvInverseDifference, normalisedGmOverId } from '../ekv.js';
import { deviceBlock, deviceConstants, deviceOperatingPoint, deviceVariables, geometryWarnings, tailCurrent } from '../elements.js';
import { InputError } from '../errors.js';
import { DESIGN_LIMITS } from '../limits.js';
import { thermalVoltage } from '../thermal.js';
import { formatQuantity } from '../units.js';
import { INPUT_PAIR, OFFSET_FIGURE, otherPolarity, TAIL_FIELD } from './common.js';
import type { BlockDefinition, StageDefinition, StageModel } from './definition.js';

/** Residual of the folded balance, relative to the total folded current I5 + I6 - I_B, at which the solve stops. */
export const FOLDED_TOLERANCE = 1e-12;
/** Iteration cap of the guarded Newton solve (bisection alone needs ~60 on any bracket). */
export const FOLDED_MAX_ITERATIONS = 200;

/**
 * Residual evaluations of the common-node solve, summed over samples, since the last
 * `takeFoldedEvaluations` (in this thread): one addition per sample. It measures the solve's
 * work, which its cost test holds to a few evaluations per sample.
 */
let evaluations = 0;

/** The folded stage's residual evaluations summed over samples since the last call (this thread), and resets the count. */
export function takeFoldedEvaluations(): number {
  const e = evaluations;
  evaluations = 0;
  return e;
}

/**
 * Folded-cascode input stage (static, saturation, no channel-length modulation). The pair M1/M2
 * draws I1, I2 (I1 + I2 = I_B) from the folding nodes; the sources M5/M6 share one gate bias, so
 * each carries I_k = I_Sk F(v_F - dV_Tk/(n U_T)), v_F the EKV inverse of the nominal
 * `sources.current`. The folded branches carry I5 - I1 into the diode M7 and I6 - I2 to M8,
 * which copies M7 (same V_GS); the cascodes pass the current and do not enter. Balance:
 * I8 = I6 - I2.
 *
 * Solved in q = sqrt(I7/I_S7), with all currents in units of I_B: I7 = a7 q^2 and
 * I8 = a8 L8(q)^2, L8 = ln(1 + e^{v8/2}) = log1p(expm1(q) e^{-d/2}), d = (V_T8 - V_T7)/(n U_T);
 * I7 + I8 = I5 + I6 - I_B = T is then h(q) = a7 q^2 + a8 L8^2 - T = 0, increasing on the closed
 * bracket [0, sqrt(T/a7)] (the same form as the five-transistor mirror's balance): guarded
 * Newton, bisection when a step leaves the bracket. Then I1 = I5 - I7 and Vos follows from the
 * pair as in the simple stage. A draw with no balance (T <= 0, or I1 outside (0, I_B): the
 * folding sources cannot carry the pair's current) is reported as not evaluated (NaN).
 * Sample layout: [M1 vt, M1 beta, M2 vt, M2 beta, M5 .., M6 .., M7 .., M8 ..].
 */
function compileFolded(design: Design): StageModel {
  const tail = tailCurrent(design);
  const ut = thermalVoltage(design.temperature);
  const srcBlock = deviceBlock(design, 'sources');
  const ci = deviceConstants(design, deviceBlock(design, 'input'), ut);
  const cs = deviceConstants(design, srcBlock, ut);
  const cl = deviceConstants(design, deviceBlock(design, 'load'), ut);
  const source = srcBlock.current;
  if (source === undefined) throw new Error('internal: sources.current missing after validation');
  const half = tail / 2;
  const branch = source - half;
  const ops = [
    deviceOperatingPoint('M1', 'input', ci, half, ut),
    deviceOperatingPoint('M2', 'input', ci, half, ut),
    deviceOperatingPoint('M5', 'sources', cs, source, ut),
    deviceOperatingPoint('M6', 'sources', cs, source, ut),
    deviceOperatingPoint('M7', 'load', cl, branch, ut),
    deviceOperatingPoint('M8', 'load', cl, branch, ut),
  ] as const;

  const sign = ci.geometry.polarity === 'n' ? 1 : -1;
  const nutIn = ci.process.slope * ut;
  const sVtIn = ci.sigmaVt;
  const bRIn = ci.betaFromVt;
  const bSIn = ci.betaOwn;
  const aS0 = cs.specificCurrent / tail; // I_S5 / I_B without mismatch
  const vF = ekvInverse(source / cs.specificCurrent); // the sources' shared bias, normalised
  const dSrc = cs.sigmaVt / (cs.process.slope * ut);
  const bRS = cs.betaFromVt;
  const bSS = cs.betaOwn;
  const aL0 = cl.specificCurrent / tail; // I_S7 / I_B without mismatch
  const hdLoad = (0.5 * cl.sigmaVt) / (cl.process.slope * ut);
  const bRL = cl.betaFromVt;
  const bSL = cl.betaOwn;
  const cIn = tail / ci.specificCurrent; // I_B / I_S1 without mismatch
  const qStart = Math.sqrt(ops[4].ic);
  const tol = FOLDED_TOLERANCE;
  const maxIter = FOLDED_MAX_ITERATIONS;

  const figure = (u: Float64Array, b: number): number => {
    const s5 = aS0 * Math.exp(bRS * u[b + 4]! + bSS * u[b + 5]!) * ekvForward(vF - dSrc * u[b + 4]!);
    const s6 = aS0 * Math.exp(bRS * u[b + 6]! + bSS * u[b + 7]!) * ekvForward(vF - dSrc * u[b + 6]!);
    const total = s5 + s6 - 1;
    if (!(total > 0) || !Number.isFinite(total)) return Number.NaN;
    const a7 = aL0 * Math.exp(bRL * u[b + 8]! + bSL * u[b + 9]!);
    const a8 = aL0 * Math.exp(bRL * u[b + 10]! + bSL * u[b + 11]!);
    const hd = hdLoad * (u[b + 10]! - u[b + 8]!);
    const dexp = Math.exp(-hd);
    let lo = 0;
    let hi = Math.sqrt(total / a7);
    let q = qStart < hi ? qStart : 0.5 * hi;
    let converged = false;
    let k = 0;
    for (; k < maxIter; k++) {
      let l8: number;
      let dl8: number;
      if (q <= 30) {
        const em = Math.expm1(q);
        const ey = em * dexp;
        l8 = Math.log1p(ey);
        dl8 = (dexp * (em + 1)) / (1 + ey);
      } else {
        // Log domain where expm1(q) would overflow: v8/2 = ln(expm1 q) - d/2.
        const y = q + Math.log1p(-Math.exp(-q)) - hd;
        let g: number;
        if (y > 0) { const e = Math.exp(-y); l8 = y + Math.log1p(e); g = 1 / (1 + e); }
        else { const e = Math.exp(y); l8 = Math.log1p(e); g = e / (1 + e); }
        dl8 = g / -Math.expm1(-q);
      }
      const h = a7 * q * q + a8 * l8 * l8 - total;
      if (Math.abs(h) <= tol * total) { converged = true; break; }
      if (h < 0) lo = q; else hi = q;
      let next = q - h / (2 * a7 * q + 2 * a8 * l8 * dl8);
      if (!(next > lo && next < hi)) next = 0.5 * (lo + hi); // bisection guard
      if (next === q) break; // the bracket cannot narrow further in doubles
      q = next;
    }
    evaluations += converged ? k + 1 : k;
    if (!converged) return Number.NaN;
    const x1 = s5 - a7 * q * q; // I1 / I_B
    const x2 = 1 - x1;
    if (!(x1 > 0 && x2 > 0)) return Number.NaN;
    const z1 = bRIn * u[b]! + bSIn * u[b + 1]!;
    const z2 = bRIn * u[b + 2]! + bSIn * u[b + 3]!;
    const s1 = Math.sqrt(x1 * cIn * Math.exp(-z1));
    const s2 = Math.sqrt(x2 * cIn * Math.exp(-z2));
    const dv = ekvInverseDifference(s1, s2, s1 <= 1 && s2 <= 1 ? 0.5 * (Math.log(x1 / x2) - z1 + z2) : Number.NaN);
    const vos = sign * (sVtIn * (u[b]! - u[b + 2]!) + nutIn * dv);
    return vos - vos === 0 ? vos : Number.NaN;
  };

  const figures = (u: Float64Array, count: number, out: Float64Array, outBase: number): number => {
    let failed = 0;
    for (let i = 0, j = 0; i < count; i++, j += 12) {
      const vos = figure(u, j);
      out[outBase + i] = vos;
      if (vos !== vos) failed++;
    }
    return failed;
  };

  // Linearised (first-order analysis of the balance above; the mirror-stage analysis of Kinget,
  // IEEE JSSC 40(6), 2005 carried through the folding nodes): with dI_k / I_k = z_k - (gm/I_D)_k dV_Tk,
  // 2 dI1 = (dI5 - dI6) + I_load ln(I8/I7), so
  // Vos = dV_T,12 - (I_D/gm)_in z_12 - (gm_src/gm_in) dV_T,56 + (I_src/gm_in) z_56
  //       - (gm_load/gm_in) dV_T,87 + (I_load/gm_in) z_87   (x_jk = x_j - x_k).
  const gmIn = ops[0].gm;
  const idOverGmIn = nutIn / normalisedGmOverId(ops[0].ic);
  const vtIn = sign * (sVtIn - idOverGmIn * bRIn);
  const betaIn = sign * (-idOverGmIn * bSIn);
  const vtSrc = sign * (-(ops[2].gm / gmIn) * cs.sigmaVt + (source / gmIn) * bRS);
  const betaSrc = sign * (source / gmIn) * bSS;
  const vtLoad = sign * (-(ops[4].gm / gmIn) * cl.sigmaVt + (branch / gmIn) * bRL);
  const betaLoad = sign * (branch / gmIn) * bSL;
  const sensitivities = Float64Array.of(
    vtIn, betaIn, -vtIn, -betaIn,
    vtSrc, betaSrc, -vtSrc, -betaSrc,
    -vtLoad, -betaLoad, vtLoad, betaLoad,
  );

  return {
    thermalVoltage: ut,
    variables: [
      ...deviceVariables('M1', 'input', ci),
      ...deviceVariables('M2', 'input', ci),
      ...deviceVariables('M5', 'sources', cs),
      ...deviceVariables('M6', 'sources', cs),
      ...deviceVariables('M7', 'load', cl),
      ...deviceVariables('M8', 'load', cl),
    ],
    sensitivities,
    operatingPoint: ops,
    warnings: [...geometryWarnings('input', ci), ...geometryWarnings('sources', cs), ...geometryWarnings('load', cl)],
    figure,
    figures,
  };
}

/** M5 (feeds M1's side) / M6: the folding current sources, each carrying `current` nominally. */
const FOLDING_SOURCES: BlockDefinition = {
  key: 'sources',
  kind: 'mos',
  elements: ['M5', 'M6'],
  label: 'folding current sources',
  polarity: 'opposite-to-input',
  fields: [
    { key: 'current', dimension: 'current', what: 'folding source current', example: 'current: 20 uA', limits: DESIGN_LIMITS.tail, unit: 'A', required: true },
  ],
  example: (input) => `{ polarity: ${otherPolarity(input)}, w: 4 um, l: 2 um, current: 20 uA }`,
  sizable: true,
  terms: { vt: '(gm_sources/gm_in) A_VT/sqrt(WL_sources)', beta: '(I_sources/gm_in) A_beta/sqrt(WL_sources)' },
};

/** M7 (diode, carries I5 - I1) / M8 (copies it against I6 - I2): the mirror under the folded branches. */
const FOLDED_LOAD: BlockDefinition = {
  key: 'load',
  kind: 'mos',
  elements: ['M7', 'M8'],
  label: 'bottom mirror',
  polarity: 'same-as-input',
  fields: [],
  example: (input) => `{ polarity: ${input}, w: 4 um, l: 2 um }`,
  sizable: true,
  terms: { vt: '(gm_load/gm_in) A_VT/sqrt(WL_load)', beta: '(I_load/gm_in) A_beta/sqrt(WL_load)' },
};

/** Each folded branch carries sources.current - tail/2 at balance: it must be positive. */
function validateFolded(design: Design): void {
  const src = (design['sources'] as DeviceGeometry).current!;
  const half = design.tail! / 2;
  if (!(src > half)) {
    throw new InputError(
      'sources.current',
      `must exceed half the tail current (${formatQuantity(half, 'A')}): each folded branch carries sources.current - tail/2 at balance, got ${formatQuantity(src, 'A')}; raise sources.current or lower tail`,
    );
  }
}

/** `topology: folded`: the folded-cascode input stage with a mirror under the folded branches. */
export const FOLDED_STAGE: StageDefinition = {
  topology: 'folded',
  summary: 'folded-cascode input stage: input pair, folding current sources, mirror under the folded branches',
  fields: [TAIL_FIELD],
  blocks: [INPUT_PAIR, FOLDING_SOURCES, FOLDED_LOAD],
  figure: OFFSET_FIGURE,
  validate: validateFolded,
  compile: compileFolded,
};

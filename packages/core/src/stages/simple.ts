import type { Design } from '../design.js';
import { ekvInverseDifference, ekvInverseDifferenceNear, NEAR_HALF_WIDTH, normalisedGmOverId } from '../ekv.js';
import { deviceBlock, deviceConstants, deviceOperatingPoint, deviceVariables, geometryWarnings, tailCurrent } from '../elements.js';
import { thermalVoltage } from '../thermal.js';
import { INPUT_PAIR, OFFSET_FIGURE, TAIL_FIELD } from './common.js';
import type { StageDefinition, StageModel } from './definition.js';

/**
 * Simple stage: ideal equal loads, balance at I1 = I2 = I_B/2. Closed form (from the EKV inverse,
 * Enz, Krummenacher & Vittoz, AICSP 8, 1995, applied to each side at I_B/2):
 * Vos = (V_T1 - V_T2) + n U_T [v(I_B/(2 I_S1)) - v(I_B/(2 I_S2))], v the EKV inverse.
 * A p-pair is described by magnitudes, so its Vos = V_G1 - V_G2 has the opposite sign.
 * Sample layout: [u_vt1, u_beta1, u_vt2, u_beta2].
 */
function compileSimplePair(design: Design): StageModel {
  const ut = thermalVoltage(design.temperature);
  const c = deviceConstants(design, deviceBlock(design, 'input'), ut);
  const half = tailCurrent(design) / 2;
  const op1 = deviceOperatingPoint('M1', 'input', c, half, ut);
  const op2 = deviceOperatingPoint('M2', 'input', c, half, ut);

  // Hoisted constants of the hot loop.
  const sign = c.geometry.polarity === 'n' ? 1 : -1;
  const nut = c.process.slope * ut;
  const sVt = c.sigmaVt;
  const bR = c.betaFromVt;
  const bS = c.betaOwn;
  // sqrt(IC_i) = sqrt(IC0) * exp(-z_beta,i / 2): one exp per device, no sqrt per sample.
  const s0 = Math.sqrt(op1.ic);

  // Below IC ~ 0.94 and for the usual few-percent current factors, v1 - v2 is a short series in
  // the exponents x_i = -z_i/2 (no exp call); other draws take the closed form.
  const near = ekvInverseDifferenceNear(s0);
  const figure = (u: Float64Array, base: number): number => {
    const a = u[base]!;
    const c2 = u[base + 2]!;
    const z1 = bR * a + bS * u[base + 1]!;
    const z2 = bR * c2 + bS * u[base + 3]!;
    const x1 = -0.5 * z1;
    const x2 = -0.5 * z2;
    // ln(s1/s2) = -(z1 - z2)/2 exactly, so weak and moderate inversion need no log call.
    const dv =
      near !== undefined && x1 >= -NEAR_HALF_WIDTH && x1 <= NEAR_HALF_WIDTH && x2 >= -NEAR_HALF_WIDTH && x2 <= NEAR_HALF_WIDTH
        ? near(x1, x2)
        : ekvInverseDifference(s0 * Math.exp(x1), s0 * Math.exp(x2), -0.5 * (z1 - z2));
    const vos = sign * (sVt * (a - c2) + nut * dv);
    // A current factor so far out that exp overflows (sigma(dbeta/beta) of hundreds) has no
    // finite balance: NaN, counted as not evaluated like a failed mirror solve, never +-Infinity.
    return vos - vos === 0 ? vos : Number.NaN;
  };

  const figures = (u: Float64Array, count: number, out: Float64Array, outBase: number): number => {
    let failed = 0;
    for (let i = 0, j = 0; i < count; i++, j += 4) {
      const vos = figure(u, j);
      out[outBase + i] = vos;
      if (vos !== vos) failed++;
    }
    return failed;
  };

  // Linearised: dv_i/dz_beta,i = -1/g (g = n U_T gm/I_D), so dVos/dz_beta = -(I_D/gm) per device.
  const idOverGm = nut / normalisedGmOverId(op1.ic);
  const vtCoef = sign * (sVt - idOverGm * bR);
  const betaCoef = sign * (-idOverGm * bS);
  const sensitivities = Float64Array.of(vtCoef, betaCoef, -vtCoef, -betaCoef);

  return {
    thermalVoltage: ut,
    variables: [...deviceVariables('M1', 'input', c), ...deviceVariables('M2', 'input', c)],
    sensitivities,
    operatingPoint: [op1, op2],
    warnings: geometryWarnings('input', c),
    figure,
    figures,
  };
}

/** `topology: simple`: the input pair with ideal equal loads. */
export const SIMPLE_STAGE: StageDefinition = {
  topology: 'simple',
  summary: 'differential pair with ideal equal loads',
  fields: [TAIL_FIELD],
  blocks: [INPUT_PAIR],
  figure: OFFSET_FIGURE,
  compile: compileSimplePair,
};

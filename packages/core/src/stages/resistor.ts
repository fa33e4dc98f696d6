import type { Design } from '../design.js';
import { ekvInverseDifference, normalisedGmOverId } from '../ekv.js';
import {
  deviceBlock,
  deviceConstants,
  deviceOperatingPoint,
  deviceVariables,
  geometryWarnings,
  resistorBlock,
  resistorConstants,
  resistorOperatingPoint,
  resistorVariable,
  tailCurrent,
} from '../elements.js';
import { DESIGN_LIMITS } from '../limits.js';
import { thermalVoltage } from '../thermal.js';
import { INPUT_PAIR, OFFSET_FIGURE, TAIL_FIELD } from './common.js';
import type { BlockDefinition, StageDefinition, StageModel } from './definition.js';

/**
 * Resistor-loaded pair: M1/M2 with load resistors R1/R2 (R1 in M1's drain). The outputs are
 * equal when I1 R1 = I2 R2 with I1 + I2 = I_B, so I1 = I_B / (1 + R1/R2) in closed form; Vos then
 * follows from the pair as in the simple stage (EKV inverse of each side's current; Enz,
 * Krummenacher & Vittoz, AICSP 8, 1995). Each resistor is R_i = R exp(sigma_R u_i), log-normal
 * like the current factor, so that R_i > 0 for any draw; sigma_R = A_R / sqrt(2 W L) per resistor.
 * Sample layout: [M1 vt, M1 beta, M2 vt, M2 beta, R1 r, R2 r].
 */
function compileResistorPair(design: Design): StageModel {
  const ut = thermalVoltage(design.temperature);
  const c = deviceConstants(design, deviceBlock(design, 'input'), ut);
  const cr = resistorConstants(design, resistorBlock(design, 'load'));
  const tail = tailCurrent(design);
  const half = tail / 2;
  const op1 = deviceOperatingPoint('M1', 'input', c, half, ut);
  const op2 = deviceOperatingPoint('M2', 'input', c, half, ut);

  const sign = c.geometry.polarity === 'n' ? 1 : -1;
  const nut = c.process.slope * ut;
  const sVt = c.sigmaVt;
  const bR = c.betaFromVt;
  const bS = c.betaOwn;
  const sR = cr.sigmaR;
  const s0 = Math.sqrt(op1.ic);
  const LN2 = Math.LN2;

  const figure = (u: Float64Array, base: number): number => {
    const a = u[base]!;
    const c2 = u[base + 2]!;
    const z1 = bR * a + bS * u[base + 1]!;
    const z2 = bR * c2 + bS * u[base + 3]!;
    // d = ln(R1/R2); I1/(I_B/2) = 2/(1 + e^d), I2/(I_B/2) = 2 e^d/(1 + e^d), in log form
    // (softplus) so that no draw overflows.
    const d = sR * (u[base + 4]! - u[base + 5]!);
    const softplus = d > 0 ? d + Math.log1p(Math.exp(-d)) : Math.log1p(Math.exp(d));
    const l1 = LN2 - softplus; // ln(I1 / (I_B/2))
    const l2 = l1 + d; // ln(I2 / (I_B/2))
    const s1 = s0 * Math.exp(0.5 * (l1 - z1));
    const s2 = s0 * Math.exp(0.5 * (l2 - z2));
    const dv = ekvInverseDifference(s1, s2, 0.5 * (l1 - l2 - (z1 - z2)));
    const vos = sign * (sVt * (a - c2) + nut * dv);
    return vos - vos === 0 ? vos : Number.NaN;
  };

  const figures = (u: Float64Array, count: number, out: Float64Array, outBase: number): number => {
    let failed = 0;
    for (let i = 0, j = 0; i < count; i++, j += 6) {
      const vos = figure(u, j);
      out[outBase + i] = vos;
      if (vos !== vos) failed++;
    }
    return failed;
  };

  // Linearised: ln(I1/I2) = -ln(R1/R2), and Vos moves by (I_D/gm) ln(I1/I2) per unit of the
  // log current ratio, as for the current factor (Razavi, Design of Analog CMOS Integrated
  // Circuits, 2nd ed., 2017, offset of the resistively loaded pair).
  const idOverGm = nut / normalisedGmOverId(op1.ic);
  const vtCoef = sign * (sVt - idOverGm * bR);
  const betaCoef = sign * (-idOverGm * bS);
  const rCoef = sign * (-idOverGm * sR);
  const sensitivities = Float64Array.of(vtCoef, betaCoef, -vtCoef, -betaCoef, rCoef, -rCoef);

  const r1 = resistorOperatingPoint('R1', 'load', cr, half);
  const r2 = resistorOperatingPoint('R2', 'load', cr, half);
  const gain = cr.geometry.r === undefined ? {} : { voltageGain: op1.gm * cr.geometry.r };
  return {
    thermalVoltage: ut,
    variables: [
      ...deviceVariables('M1', 'input', c),
      ...deviceVariables('M2', 'input', c),
      resistorVariable('R1', 'load', cr),
      resistorVariable('R2', 'load', cr),
    ],
    sensitivities,
    operatingPoint: [op1, op2],
    resistors: [{ ...r1, ...gain }, { ...r2, ...gain }],
    warnings: geometryWarnings('input', c),
    figure,
    figures,
  };
}

/** The load resistors R1 (in M1's drain) / R2: body geometry sets the matching, `r` the gain. */
const RESISTOR_LOAD: BlockDefinition = {
  key: 'load',
  kind: 'resistor',
  elements: ['R1', 'R2'],
  label: 'load resistors',
  polarity: 'any',
  fields: [
    { key: 'r', dimension: 'resistance', what: 'resistance', example: 'r: 20 kohm', limits: DESIGN_LIMITS.resistance, unit: 'ohm', required: false },
  ],
  example: () => '{ w: 2 um, l: 10 um, r: 20 kohm }',
  sizable: true,
};

/** `topology: resistor`: the input pair with two load resistors. */
export const RESISTOR_STAGE: StageDefinition = {
  topology: 'resistor',
  summary: 'differential pair with resistor loads',
  fields: [TAIL_FIELD],
  blocks: [INPUT_PAIR, RESISTOR_LOAD],
  figure: OFFSET_FIGURE,
  compile: compileResistorPair,
};

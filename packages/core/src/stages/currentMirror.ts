import type { Design } from '../design.js';
import { ekvInverseOfRoot, normalisedGmOverId } from '../ekv.js';
import { deviceBlock, deviceConstants, deviceOperatingPoint, deviceVariables, geometryWarnings } from '../elements.js';
import { DESIGN_LIMITS } from '../limits.js';
import { thermalVoltage } from '../thermal.js';
import type { BlockDefinition, FieldDefinition, FigureDefinition, StageDefinition, StageModel } from './definition.js';

/**
 * The caution every report of this stage carries: the model gives the output the diode's V_DS.
 * (Channel-length modulation: the output current rises with V_DS; with no output conductance in
 * the model, a mirror whose output sits at another drain voltage has a systematic error on top.)
 */
export const CURRENT_MIRROR_CAUTION =
  "the output device is taken at the diode's drain voltage: where its V_DS differs, channel-length modulation adds a systematic current error that this model leaves out";

/**
 * Two-device current mirror: the diode-connected M1 carries `input.current`, M2 has the same
 * V_GS and copies it with the nominal ratio r = (W/L)_out / (W/L)_in (one process, so
 * I_S2 = r I_S1 nominally). The figure is the relative current error e = I_out / (r I_in) - 1.
 *
 * Exact on the EKV model (Enz, Krummenacher & Vittoz, AICSP 8, 1995), in closed form: the diode's
 * sqrt(IC1) = s1 = s0 e^{-z1/2} (s0 without mismatch, z the log current-factor deviates) fixes its
 * v1 = 2 ln(expm1(s1)); the output's v2 = v1 - (dV_T2 - dV_T1)/(n U_T), so
 * I_out / (r I_in) = e^{z2} L2^2 / s0^2 with L2 = ln(1 + e^{v2/2}), and e = expm1(z2 + 2 ln(L2/s0)).
 * Sample layout: [M1 vt, M1 beta, M2 vt, M2 beta].
 */
function compileCurrentMirror(design: Design): StageModel {
  const ut = thermalVoltage(design.temperature);
  const inBlock = deviceBlock(design, 'input');
  const ci = deviceConstants(design, inBlock, ut);
  const co = deviceConstants(design, deviceBlock(design, 'output'), ut);
  const reference = inBlock.current;
  if (reference === undefined) throw new Error('internal: input.current missing after validation');
  const ratio = co.specificCurrent / ci.specificCurrent;
  const op1 = deviceOperatingPoint('M1', 'input', ci, reference, ut);
  const op2 = deviceOperatingPoint('M2', 'output', co, ratio * reference, ut);

  const nut = ci.process.slope * ut;
  const s0 = Math.sqrt(op1.ic);
  const lnS0 = Math.log(s0);
  const hd1 = (0.5 * ci.sigmaVt) / nut;
  const hd2 = (0.5 * co.sigmaVt) / nut;
  const bR1 = ci.betaFromVt;
  const bS1 = ci.betaOwn;
  const bR2 = co.betaFromVt;
  const bS2 = co.betaOwn;

  const figure = (u: Float64Array, base: number): number => {
    const a = u[base]!;
    const c = u[base + 2]!;
    const z1 = bR1 * a + bS1 * u[base + 1]!;
    const z2 = bR2 * c + bS2 * u[base + 3]!;
    // v2/2 = v1/2 - (dV_T2 - dV_T1)/(2 n U_T); L2 = softplus(v2/2) in the form that neither
    // overflows nor loses the small values of weak inversion.
    const y = 0.5 * ekvInverseOfRoot(s0 * Math.exp(-0.5 * z1)) - (hd2 * c - hd1 * a);
    const l2 = y > 0 ? y + Math.log1p(Math.exp(-y)) : Math.log1p(Math.exp(y));
    const e = Math.expm1(z2 + 2 * (Math.log(l2) - lnS0));
    // A draw so far out that the output current under- or overflows has no finite error: NaN,
    // counted as not evaluated, never +-Infinity.
    return e - e === 0 ? e : Number.NaN;
  };

  const figures = (u: Float64Array, count: number, out: Float64Array, outBase: number): number => {
    let failed = 0;
    for (let i = 0, j = 0; i < count; i++, j += 4) {
      const e = figure(u, j);
      out[outBase + i] = e;
      if (e !== e) failed++;
    }
    return failed;
  };

  // Linearised (Pelgrom 1989; Kinget, IEEE JSSC 40(6), 2005): ln(I_out / (r I_in)) =
  // z2 - z1 - (gm/I_D)(dV_T2 - dV_T1), both devices at the same inversion coefficient.
  const gmId = normalisedGmOverId(op1.ic) / nut;
  const sensitivities = Float64Array.of(gmId * ci.sigmaVt - bR1, -bS1, bR2 - gmId * co.sigmaVt, bS2);

  return {
    thermalVoltage: ut,
    variables: [...deviceVariables('M1', 'input', ci), ...deviceVariables('M2', 'output', co)],
    sensitivities,
    operatingPoint: [op1, op2],
    warnings: [...geometryWarnings('input', ci), ...geometryWarnings('output', co), CURRENT_MIRROR_CAUTION],
    figure,
    figures,
  };
}

/** The reference current the diode carries. */
const REFERENCE_CURRENT: FieldDefinition = {
  key: 'current',
  dimension: 'current',
  what: 'reference current',
  example: 'current: 10 uA',
  limits: DESIGN_LIMITS.tail,
  unit: 'A',
  required: true,
};

/** M1, the diode-connected reference device. */
const MIRROR_INPUT: BlockDefinition = {
  key: 'input',
  kind: 'mos',
  elements: ['M1'],
  label: 'diode-connected input device',
  polarity: 'any',
  fields: [REFERENCE_CURRENT],
  example: () => '{ polarity: n, w: 4 um, l: 4 um, current: 10 uA }',
  sizable: true,
  terms: { vt: '(gm/I_D) A_VT/sqrt(2 WL_input)', beta: 'A_beta/sqrt(2 WL_input)' },
};

/** M2, the copying device (nominal ratio (W/L)_out / (W/L)_in). */
const MIRROR_OUTPUT: BlockDefinition = {
  key: 'output',
  kind: 'mos',
  elements: ['M2'],
  label: 'output device',
  polarity: 'same-as-input',
  fields: [],
  example: (input) => `{ polarity: ${input}, w: 8 um, l: 4 um }`,
  sizable: true,
  terms: { vt: '(gm/I_D) A_VT/sqrt(2 WL_output)', beta: 'A_beta/sqrt(2 WL_output)' },
};

/**
 * e = I_out / (r I_in) - 1, dimensionless (shown in %); the spec bounds |e|. Limits up to 100%
 * (this project's outer limit; a mirror that misses by more is not a mirror).
 */
const CURRENT_ERROR_FIGURE: FigureDefinition = {
  name: 'currentError',
  specKey: 'error',
  label: 'current error',
  symbol: 'e',
  unit: '',
  sided: 'two',
  dimension: 'dimensionless',
  limits: [0, 1],
  example: 'error: 0.5 %',
};

/** `topology: current-mirror`: the relative error of a two-device current mirror. */
export const CURRENT_MIRROR_STAGE: StageDefinition = {
  topology: 'current-mirror',
  summary: 'two-device current mirror: relative error of the copied current',
  fields: [],
  blocks: [MIRROR_INPUT, MIRROR_OUTPUT],
  figure: CURRENT_ERROR_FIGURE,
  compile: compileCurrentMirror,
};

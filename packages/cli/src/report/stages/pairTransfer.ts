/**
 * The transfer curve shared by the stages built on one differential pair (simple, mirror):
 * the pair's share at each differential input, and a stage-specific output current from it.
 */
import { linearisedSigma, type Stage } from '@twinfet/core';
import { deviceDraws, drawSlots, nominalInputAtShare, pairConstants, pairShare, type DeviceDraw } from './pair.js';
import type { FigureInfo, Quantity, StageTransfer } from './types.js';

/** The offset Vos = V_G1 - V_G2 that balances the stage: the figure of the pair stages. */
export const OFFSET_FIGURE: FigureInfo = { name: 'offset', symbol: 'Vos', unit: 'V', sides: 'both' };

/** Vid = V_G1 - V_G2, applied on top of the common-mode level. */
export const DIFFERENTIAL_INPUT: Quantity = { name: 'differential input', symbol: 'Vid', unit: 'V' };

/** d(output)/d(Vid) at the instance's own balance point. */
export const TRANSCONDUCTANCE: Quantity = { name: 'transconductance at balance', symbol: 'Gm', unit: 'A/V' };

/** The weak-inversion law applies below this inversion coefficient (the usual weak-inversion bound; common practice, no source). */
const WEAK_INVERSION_IC = 0.1;
/** The whole curve spans the nominal input at which the pair carries this share, times 1.15. */
const FULL_SHARE = 0.99;

/**
 * The stage's output from the pair's shares f = I1 / I_B and g = 1 - f of one instance
 * (`draws` holds every device's mismatch, input pair first).
 */
export type PairOutput = (f: number, g: number, draws: readonly DeviceDraw[]) => number;

/**
 * A StageTransfer for a pair stage whose output follows from the pair's share.
 * @param output the stage's output current from the shares
 * @param outputQuantity what that output is called
 */
export function pairTransfer(stage: Stage, outputQuantity: Quantity, output: PairOutput): StageTransfer {
  const c = pairConstants(stage);
  const slots = drawSlots(stage);
  const sigma = linearisedSigma(stage);
  const full = Math.max(1.15 * nominalInputAtShare(c, FULL_SHARE), 6 * sigma);
  const zoom = 4.5 * sigma;
  const i1 = stage.operatingPoint[0]!.specificCurrent;
  const evaluate = (u: Float64Array, base: number, xs: Float64Array, out: Float64Array): void => {
    deviceDraws(stage, u, base, slots);
    const m1 = slots[0]!;
    const m2 = slots[1]!;
    const a1 = (i1 * m1.specific) / c.tail;
    const a2 = (i1 * m2.specific) / c.tail;
    // Neighbouring inputs have neighbouring solutions: each solve starts from the last one.
    let start: number | undefined;
    for (let i = 0; i < xs.length; i++) {
      const t = (c.sign * xs[i]! - (m1.dVt - m2.dVt)) / c.nut;
      const [f, g, y] = pairShare(t, a1, a2, start);
      start = Number.isFinite(y) ? y : undefined;
      out[i] = Number.isFinite(f) ? output(f, g, slots) : Number.NaN;
    }
  };
  const law =
    c.ic < WEAK_INVERSION_IC
      ? {
          name: 'weak-inversion tanh law',
          formula: 'I_B tanh(Vid / (2 n U_T))',
          source: 'Mead, Analog VLSI and Neural Systems, 1989, ch. 5',
          at: (x: number): number => c.tail * Math.tanh((c.sign * x) / (2 * c.nut)),
        }
      : {
          none: `The weak-inversion tanh law is not drawn: the input pair works at IC ${Number(c.ic.toPrecision(3))} (${c.ic > 10 ? 'strong' : 'moderate'} inversion), and the law holds for IC below ${WEAK_INVERSION_IC}.`,
        };
  return {
    input: DIFFERENTIAL_INPUT,
    output: outputQuantity,
    slope: TRANSCONDUCTANCE,
    balance: 0,
    span: [-full, full],
    zoom: [-zoom, zoom],
    evaluate,
    law,
  };
}

/**
 * The transfer curve shared by the stages built on one differential pair (simple, mirror,
 * resistor): the pair's share at each differential input, and a stage-specific output from it.
 */
import { linearisedSigma, type Stage } from '@twinfet/core';
import { drawReader, nominalInputAtShare, pairConstants, pairShare, type ElementDraw } from './pair.js';
import type { Quantity, StageTransfer } from './types.js';

/** Vid = V_G1 - V_G2, applied on top of the common-mode level. */
export const DIFFERENTIAL_INPUT: Quantity = { name: 'differential input', symbol: 'Vid', unit: 'V' };

/** d(output)/d(Vid) at the instance's own balance point. */
export const TRANSCONDUCTANCE: Quantity = { name: 'transconductance at balance', symbol: 'Gm', unit: 'A/V' };

/** The weak-inversion law applies below this inversion coefficient (the usual weak-inversion bound; common practice, no source). */
const WEAK_INVERSION_IC = 0.1;
/** The whole curve spans the nominal input at which the pair carries this share, times 1.15. */
const FULL_SHARE = 0.99;

/**
 * The stage's output from the pair's shares f = I1 / I_B and g = 1 - f of one instance, whose
 * elements' mismatch is `draws`; made once per stage with `index`, which gives an element's
 * (`M3`, `R1`) position in `draws`.
 */
export type PairOutput = (index: (element: string) => number) => (f: number, g: number, draws: readonly ElementDraw[]) => number;

/**
 * A StageTransfer for a pair stage whose output follows from the pair's share.
 * @param output the stage's output from the shares
 * @param outputQuantity what that output is called
 */
export function pairTransfer(stage: Stage, outputQuantity: Quantity, makeOutput: PairOutput): StageTransfer {
  const c = pairConstants(stage);
  const reader = drawReader(stage);
  const output = makeOutput(reader.index);
  const m1 = reader.index('M1');
  const m2 = reader.index('M2');
  const sigma = linearisedSigma(stage);
  const full = Math.max(1.15 * nominalInputAtShare(c, FULL_SHARE), 6 * sigma);
  const zoom = 4.5 * sigma;
  const evaluate = (u: Float64Array, base: number, xs: Float64Array, out: Float64Array): void => {
    const draws = reader.read(u, base);
    const d1 = draws[m1]!;
    const d2 = draws[m2]!;
    const a1 = (c.specific * d1.specific) / c.tail;
    const a2 = (c.specific * d2.specific) / c.tail;
    // Neighbouring inputs have neighbouring solutions: each solve starts from the last one.
    let start: number | undefined;
    for (let i = 0; i < xs.length; i++) {
      const t = (c.sign * xs[i]! - (d1.dVt - d2.dVt)) / c.nut;
      const [f, g, y] = pairShare(t, a1, a2, start);
      start = Number.isFinite(y) ? y : undefined;
      out[i] = Number.isFinite(f) ? output(f, g, draws) : Number.NaN;
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
    balance: { output: 0, slope: TRANSCONDUCTANCE },
    span: [-full, full],
    zoom: [-zoom, zoom],
    evaluate,
    law,
  };
}

import { formatQuantity, specLimit, type Stage } from '@twinfet/core';
import type { ReportStage, StageTransfer } from './types.js';

/**
 * The N-input selector against the lead of cell 1: the winner's share of the tail current per
 * instance, from the stage's own response curve (the exact common-node solve at each lead). The
 * selector has no balance in the pair's sense (its figure is the lead at which cell 1 ties its
 * strongest competitor, not a zero of this output), so no slope at balance is drawn. In weak
 * inversion the nominal share follows the Boltzmann form exp(kappa L / U_T) / (exp(kappa L / U_T)
 * + N - 1) (from the exponential law, Mead, Analog VLSI and Neural Systems, 1989); it is drawn.
 */
function selectorTransfer(stage: Stage): StageTransfer {
  const curve = stage.response;
  if (curve === undefined) throw new Error('internal: selector without its response curve');
  const spec = specLimit(stage.design);
  const cells = stage.design['cells'] as number;
  const op = stage.operatingPoint[0];
  const proc = op === undefined ? undefined : stage.design.process[op.polarity];
  if (op === undefined || proc === undefined) throw new Error('internal: selector without its devices after validation');
  const kappaOverUt = 1 / (proc.slope * stage.thermalVoltage);
  const weak = stage.operatingPoint.every((o) => o.region === 'weak');
  return {
    input: { name: curve.input, symbol: 'L', unit: 'V' },
    output: { name: curve.label, symbol: 'I_1/I_B', unit: '%' },
    span: [-spec, 3 * spec],
    zoom: [-0.5 * spec, 1.5 * spec],
    evaluate: (u, base, xs, out) => {
      for (let i = 0; i < xs.length; i++) out[i] = curve.evaluate(u, base, xs[i]!);
    },
    law: weak
      ? {
          name: 'weak-inversion Boltzmann law',
          formula: 'exp(kappa L / U_T) / (exp(kappa L / U_T) + N - 1)',
          source: 'from the exponential law, Mead, Analog VLSI and Neural Systems, 1989',
          at: (x) => {
            const e = Math.exp(kappaOverUt * x);
            return e / (e + cells - 1);
          },
        }
      : { none: 'The Boltzmann form holds in weak inversion only; these cells are not all in weak inversion.' },
  };
}

/** `topology: selector`: N cells with joined sources, cell 1 the intended winner. */
export const selectorReportStage: ReportStage = {
  topology: 'selector',
  describe: (d) =>
    `N-input selector (winner-take-all): ${String(d['cells'])} ${d.input.polarity}-channel cells of ${formatQuantity(d.input.w, 'm', 4)} / ${formatQuantity(d.input.l, 'm', 4)} with their sources joined at one tail current; cell 1 is the intended winner, its gate a lead above the other cells', and the figure is the lead it needs to carry at least every other cell's current.`,
  transfer: selectorTransfer,
};

import { formatQuantity, type ResistorGeometry } from '@twinfet/core';
import { pairTransfer } from './pairTransfer.js';
import type { ReportStage } from './types.js';

/**
 * The resistor-loaded pair: the drains of M1/M2 carry R1/R2, and the outputs are equal when
 * I1 R1 = I2 R2. The output drawn is the differential output voltage over the nominal
 * resistance, (I1 R1 - I2 R2) / R = I_B (f R1/R - (1 - f) R2/R): a current, so it needs no
 * nominal R (the offset depends only on the resistor ratio), and it is I1 - I2 without mismatch.
 */
export const resistorReportStage: ReportStage = {
  topology: 'resistor',
  describe: (d) => {
    const load = d['load'] as ResistorGeometry | undefined;
    const r = load?.r === undefined ? '' : ` of ${formatQuantity(load.r, 'ohm', 4)}`;
    return `Differential pair with resistor loads: the ${d.input.polarity}-channel input pair M1/M2 shares a ${formatQuantity(d.tail ?? 0, 'A', 4)} tail current and drives the load resistors R1/R2${r}; the offset is the gate-voltage difference V_G1 \u2212 V_G2 at which I1 R1 = I2 R2.`;
  },
  transfer: (stage) =>
    pairTransfer(stage, { name: 'output imbalance', symbol: '(I1 R1 \u2212 I2 R2)/R', unit: 'A' }, (index) => {
      const r1 = index('R1');
      const r2 = index('R2');
      return (f, g, draws) => (stage.design.tail ?? Number.NaN) * (f * draws[r1]!.ratio - g * draws[r2]!.ratio);
    }),
};

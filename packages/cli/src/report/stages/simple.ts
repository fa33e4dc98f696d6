import { formatQuantity } from '@twinfet/core';
import { pairTransfer } from './pairTransfer.js';
import type { ReportStage } from './types.js';

/** The simple stage: ideal equal loads, so the output is the pair's current difference I1 - I2. */
export const simpleReportStage: ReportStage = {
  topology: 'simple',
  describe: (d) =>
    `Differential pair with ideal, equal loads: the ${d.input.polarity}-channel input pair M1/M2 shares a ${formatQuantity(d.tail ?? 0, 'A', 4)} tail current; the offset is the gate-voltage difference V_G1 \u2212 V_G2 at which I1 = I2 = I_B/2.`,
  transfer: (stage) =>
    pairTransfer(stage, { name: 'differential output current', symbol: 'I1 \u2212 I2', unit: 'A' }, () => (f, g) => (stage.design.tail ?? Number.NaN) * (f - g)),
};

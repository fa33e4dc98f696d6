import { ekvForward, ekvInverse, formatQuantity } from '@twinfet/core';
import { OFFSET_FIGURE, pairTransfer } from './pairTransfer.js';
import type { ReportStage } from './types.js';

/**
 * The five-transistor stage: M1 drives the diode M3, M4 copies it against M2, and the output
 * current is I4 - I2 with the output held at the balance voltage (no channel-length
 * modulation). M4 has M3's gate voltage, so I4 = I_S4 F(v3 - d) with v3 = v(I1 / I_S3) and
 * d = (dV_T4 - dV_T3) / (n_load U_T).
 */
export const mirrorReportStage: ReportStage = {
  topology: 'mirror',
  figure: OFFSET_FIGURE,
  describe: (d) =>
    `Five-transistor stage: the ${d.input.polarity}-channel input pair M1/M2 shares a ${formatQuantity(d.tail, 'A', 4)} tail current; M1 drives the diode M3 of the ${d.load?.polarity ?? '?'}-channel mirror load and M4 copies its current against M2. The offset is the gate-voltage difference V_G1 \u2212 V_G2 at which the output current I4 \u2212 I2 is zero.`,
  transfer: (stage) => {
    const d = stage.design;
    const load = d.load;
    const proc = load === undefined ? undefined : d.process[load.polarity];
    if (load === undefined || proc === undefined) throw new Error('internal: mirror stage without its load after validation');
    const nut = proc.slope * stage.thermalVoltage;
    const is3 = stage.operatingPoint[2]!.specificCurrent;
    const is4 = stage.operatingPoint[3]!.specificCurrent;
    return pairTransfer(stage, { name: 'output current', symbol: 'I4 \u2212 I2', unit: 'A' }, (f, g, draws) => {
      const m3 = draws[2]!;
      const m4 = draws[3]!;
      const v3 = ekvInverse((f * d.tail) / (is3 * m3.specific));
      const i4 = is4 * m4.specific * ekvForward(v3 - (m4.dVt - m3.dVt) / nut);
      return i4 - g * d.tail;
    });
  },
};

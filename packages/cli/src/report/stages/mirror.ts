import { ekvForward, ekvInverse, formatQuantity, type DeviceGeometry } from '@twinfet/core';
import { pairTransfer } from './pairTransfer.js';
import type { ReportStage } from './types.js';

/**
 * The five-transistor stage: M1 drives the diode M3, M4 copies it against M2, and the output
 * current is I4 - I2 with the output held at the balance voltage (no channel-length
 * modulation). M4 has M3's gate voltage, so I4 = I_S4 F(v3 - d) with v3 = v(I1 / I_S3) and
 * d = (dV_T4 - dV_T3) / (n_load U_T).
 */
export const mirrorReportStage: ReportStage = {
  topology: 'mirror',
  describe: (d) => {
    const load = d['load'] as DeviceGeometry | undefined;
    return `Five-transistor stage: the ${d.input.polarity}-channel input pair M1/M2 shares a ${formatQuantity(d.tail ?? 0, 'A', 4)} tail current; M1 drives the diode M3 of the ${load?.polarity ?? '?'}-channel mirror load and M4 copies its current against M2. The offset is the gate-voltage difference V_G1 \u2212 V_G2 at which the output current I4 \u2212 I2 is zero.`;
  },
  transfer: (stage) => {
    const d = stage.design;
    const m3 = stage.operatingPoint[2];
    const m4 = stage.operatingPoint[3];
    const proc = m3 === undefined ? undefined : d.process[m3.polarity];
    const tail = d.tail;
    if (m3 === undefined || m4 === undefined || proc === undefined || tail === undefined) throw new Error('internal: mirror stage without its load after validation');
    const nut = proc.slope * stage.thermalVoltage;
    return pairTransfer(stage, { name: 'output current', symbol: 'I4 \u2212 I2', unit: 'A' }, (index) => {
      const i3 = index('M3');
      const i4 = index('M4');
      return (f, g, draws) => {
        const d3 = draws[i3]!;
        const d4 = draws[i4]!;
        const v3 = ekvInverse((f * tail) / (m3.specificCurrent * d3.specific));
        const current4 = m4.specificCurrent * d4.specific * ekvForward(v3 - (d4.dVt - d3.dVt) / nut);
        return current4 - g * tail;
      };
    });
  },
};

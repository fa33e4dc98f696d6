import { ekvForward, ekvInverse, formatQuantity, type DeviceGeometry } from '@twinfet/core';
import { pairTransfer } from './pairTransfer.js';
import type { ReportStage } from './types.js';

/**
 * The folded-cascode input stage: the sources M5/M6 share one gate bias, so each carries
 * I_k = I_Sk F(v_F - dV_Tk / (n U_T)), v_F the EKV inverse of the nominal source current; the
 * diode M7 carries I5 - I1 and M8 copies it (same V_GS); the output current is
 * (I6 - I2) - I8, zero at balance, and I1 - I2 without mismatch. A draw whose folded branch would
 * carry no current (I5 <= I1) has no solution there (NaN).
 */
export const foldedReportStage: ReportStage = {
  topology: 'folded',
  describe: (d) => {
    const src = d['sources'] as DeviceGeometry | undefined;
    const load = d['load'] as DeviceGeometry | undefined;
    return `Folded-cascode input stage: the ${d.input.polarity}-channel input pair M1/M2 shares a ${formatQuantity(d.tail ?? 0, 'A', 4)} tail current; the ${src?.polarity ?? '?'}-channel folding sources M5/M6 (${formatQuantity(src?.current ?? 0, 'A', 4)} each) feed the folded branches, whose currents the ${load?.polarity ?? '?'}-channel mirror M7 (diode)/M8 compares. The offset is the gate-voltage difference V_G1 \u2212 V_G2 at which the output current (I6 \u2212 I2) \u2212 I8 is zero.`;
  },
  transfer: (stage) => {
    const d = stage.design;
    const [, , m5, m6, m7, m8] = stage.operatingPoint;
    const tail = d.tail;
    const srcProc = m5 === undefined ? undefined : d.process[m5.polarity];
    const loadProc = m7 === undefined ? undefined : d.process[m7.polarity];
    if (m5 === undefined || m6 === undefined || m7 === undefined || m8 === undefined || srcProc === undefined || loadProc === undefined || tail === undefined) {
      throw new Error('internal: folded stage without its sources or load after validation');
    }
    const nutSrc = srcProc.slope * stage.thermalVoltage;
    const nutLoad = loadProc.slope * stage.thermalVoltage;
    const vF = ekvInverse(m5.current / m5.specificCurrent);
    return pairTransfer(stage, { name: 'output current', symbol: '(I6 \u2212 I2) \u2212 I8', unit: 'A' }, (index) => {
      const [i5, i6, i7, i8] = ['M5', 'M6', 'M7', 'M8'].map(index) as [number, number, number, number];
      return (f, g, draws) => {
        const d5 = draws[i5]!;
        const d6 = draws[i6]!;
        const d7 = draws[i7]!;
        const d8 = draws[i8]!;
        const c5 = m5.specificCurrent * d5.specific * ekvForward(vF - d5.dVt / nutSrc);
        const c6 = m6.specificCurrent * d6.specific * ekvForward(vF - d6.dVt / nutSrc);
        const c7 = c5 - f * tail;
        if (!(c7 > 0)) return Number.NaN;
        const v7 = ekvInverse(c7 / (m7.specificCurrent * d7.specific));
        const c8 = m8.specificCurrent * d8.specific * ekvForward(v7 - (d8.dVt - d7.dVt) / nutLoad);
        return c6 - g * tail - c8;
      };
    });
  },
};

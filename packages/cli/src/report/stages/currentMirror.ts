import { ekvForward, ekvInverse, formatQuantity, type DeviceGeometry, type Stage } from '@twinfet/core';
import { drawReader } from './pair.js';
import type { ReportStage, StageTransfer } from './types.js';

/** The input current is swept from this fraction of the nominal to its inverse. */
const SPAN = 0.25;
/** The close-up: +-20% around the nominal input current. */
const ZOOM = 0.2;

/**
 * The two-device current mirror against its input current: the relative error
 * e = I_out / (r I_in) - 1 of each instance, from the EKV model as the stage computes it (M2 at
 * M1's gate voltage: v2 = v1 - (dV_T2 - dV_T1) / (n U_T), I_out = I_S2 F(v2)). A mirror has no
 * input that balances it, so there is no balance point or slope: the figure shows how the spread
 * of the error moves with the bias (wider towards weak inversion, where gm/I_D is larger).
 */
function mirrorTransfer(stage: Stage): StageTransfer {
  const [m1, m2] = stage.operatingPoint;
  const proc = m1 === undefined ? undefined : stage.design.process[m1.polarity];
  if (m1 === undefined || m2 === undefined || proc === undefined) throw new Error('internal: current mirror without its devices after validation');
  const nut = proc.slope * stage.thermalVoltage;
  const ratio = m2.specificCurrent / m1.specificCurrent;
  const reader = drawReader(stage);
  const k1 = reader.index('M1');
  const k2 = reader.index('M2');
  const nominal = m1.current;
  return {
    input: { name: 'input current', symbol: 'I_in', unit: 'A' },
    output: { name: 'relative current error', symbol: 'I_out/(r I_in) \u2212 1', unit: '%' },
    span: [SPAN * nominal, nominal / SPAN],
    zoom: [(1 - ZOOM) * nominal, (1 + ZOOM) * nominal],
    evaluate: (u, base, xs, out) => {
      const draws = reader.read(u, base);
      const d1 = draws[k1]!;
      const d2 = draws[k2]!;
      for (let i = 0; i < xs.length; i++) {
        const v1 = ekvInverse(xs[i]! / (m1.specificCurrent * d1.specific));
        const iOut = m2.specificCurrent * d2.specific * ekvForward(v1 - (d2.dVt - d1.dVt) / nut);
        const e = iOut / (ratio * xs[i]!) - 1;
        out[i] = Number.isFinite(e) ? e : Number.NaN;
      }
    },
    law: { none: 'No textbook law is drawn: the nominal mirror copies its input exactly in this model (no channel-length modulation), so the nominal error is zero at every input current.' },
  };
}

/** `topology: current-mirror`: a diode M1 and its copy M2 with the nominal ratio r. */
export const currentMirrorReportStage: ReportStage = {
  topology: 'current-mirror',
  describe: (d) => {
    const out = d['output'] as DeviceGeometry | undefined;
    return `Two-device current mirror: the ${d.input.polarity}-channel diode M1 carries ${formatQuantity(d.input.current ?? 0, 'A', 4)} and M2${out === undefined ? '' : ` (${formatQuantity(out.w, 'm', 4)} / ${formatQuantity(out.l, 'm', 4)})`} copies it at M1's gate voltage; the figure is the relative error of the copied current, I_out / (r I_in) \u2212 1.`;
  },
  transfer: mirrorTransfer,
};

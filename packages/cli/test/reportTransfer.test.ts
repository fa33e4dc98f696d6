import { fileURLToPath } from 'node:url';
import { compileStage, STAGES, type Design } from '@twinfet/core';
import { loadDesign } from '../src/designFile.js';
import { simulateWithSamples } from '@twinfet/montecarlo';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { mirrorDesign, simpleDesign, demoProcess } from '../../core/test/designs.js';
import { firstDraws, studyTransfer, type TransferStudy } from '../src/report/analyses/transfer.js';
import { pairShare } from '../src/report/stages/pair.js';
import { reportStageFor } from '../src/report/stages/registry.js';

const pMirror: Design = { ...mirrorDesign, name: 'p-input mirror (invented)', input: { polarity: 'p', w: 6e-6, l: 1e-6 }, load: { polarity: 'n', w: 2e-6, l: 2e-6 } };
const pSimple: Design = { ...simpleDesign, name: 'p-input simple (invented)', input: { polarity: 'p', w: 24e-6, l: 1.5e-6 } };
const resistorPair: Design = {
  ...simpleDesign,
  name: 'resistor pair (invented)',
  topology: 'resistor',
  load: { w: 1e-6, l: 5e-6, r: 20e3 },
  process: { ...demoProcess, resistor: { ar: 5e-9 } },
};
const designs = [simpleDesign, mirrorDesign, pSimple, pMirror, resistorPair];

/** The study, which must have found its instances' balance points. */
function studied(...args: Parameters<typeof studyTransfer>): TransferStudy {
  const s = studyTransfer(...args);
  if ('none' in s) throw new Error(s.none);
  return s;
}

function transferOf(d: Design) {
  const stage = compileStage(d);
  return { stage, t: reportStageFor(d.topology)!.transfer(stage) };
}

describe('the pair solve', () => {
  it('splits the tail equally at t = 0 between equal devices, and mirrors under exchange (identity)', () => {
    expect(pairShare(0, 0.3, 0.3)).toEqual([0.5, 0.5, 0]);
    fc.assert(
      fc.property(fc.double({ min: -40, max: 40, noNaN: true }), fc.double({ min: 1e-6, max: 1e3, noNaN: true }), fc.double({ min: 1e-6, max: 1e3, noNaN: true }), (t, a1, a2) => {
        const [f, g] = pairShare(t, a1, a2);
        const [g2, f2] = pairShare(-t, a2, a1);
        // Exchanging the devices and the input exchanges the shares: to 1e-12 (the solve's tolerance
        // on t, through df/dt <= 1/4 in weak inversion and smaller elsewhere).
        expect(Math.abs(f - f2)).toBeLessThan(1e-12);
        expect(Math.abs(g - g2)).toBeLessThan(1e-12);
        expect(f + g).toBeCloseTo(1, 15);
      }),
      { numRuns: 300, seed: 1515 },
    );
  });
});

describe('transfer curves of the pair stages', () => {
  it('each instance balances exactly where the exact model puts its offset (simple, mirror; n and p inputs)', () => {
    for (const d of designs) {
      const { stage, t } = transferOf(d);
      const study = studied(stage, t, 'transfer-check', 60);
      const draws = firstDraws('transfer-check', stage.dimension, 60);
      study.balances.forEach((x, k) => {
        // Both solves stop at ~1e-15 V; 1e-12 V is a thousand times that (offsets are ~mV).
        expect(x, `${d.name} instance ${k}`).not.toBeNull();
        expect(Math.abs(x! - stage.figure(draws, k * stage.dimension))).toBeLessThan(1e-12);
      });
    }
  });

  it('uses the run\'s first samples: the instances\' offsets are the first offsets of the Monte Carlo run', async () => {
    for (const d of [simpleDesign, mirrorDesign]) {
      const stage = compileStage(d);
      const run = await simulateWithSamples(d, { samples: 2000, seed: 'first', workers: 1, keepOffsets: true });
      const draws = firstDraws('first', stage.dimension, 400);
      // The same draws through the same evaluator: identical doubles.
      for (let k = 0; k < 400; k++) expect(stage.figure(draws, k * stage.dimension)).toBe(run.offsets![k]);
    }
  });

  it('has the slope of one input device at balance: Gm = gm (Razavi, Design of Analog CMOS Integrated Circuits, 2nd ed., 2017, ch. 4 and 5)', () => {
    for (const d of designs) {
      const { stage, t } = transferOf(d);
      const s = studied(stage, t, 'slope', 20).slope!;
      // Central difference at 1e-6 of the close-up's width: truncation and rounding below 1e-9 relative.
      expect(Math.abs(Math.abs(s.nominal) / stage.operatingPoint[0]!.gm - 1)).toBeLessThan(1e-6);
    }
  });

  it('follows the weak-inversion tanh law (Mead, Analog VLSI and Neural Systems, 1989, ch. 5) at IC = 1e-4', () => {
    // A tail of 2e-4 I_S puts each device at IC = 1e-4. The EKV slope at balance is below the
    // law's by the factor (1 - e^-sqrt(IC)) / sqrt(IC) = 0.99502 (Enz, Krummenacher, Vittoz 1995),
    // so the curve lies within 0.5% of the law near balance and closer where both saturate.
    const base = { ...simpleDesign, input: { polarity: 'n' as const, w: 10e-6, l: 1e-6 } };
    const is = compileStage(base).operatingPoint[0]!.specificCurrent;
    const d: Design = { ...base, tail: 2e-4 * is };
    const { stage, t } = transferOf(d);
    expect(stage.operatingPoint[0]!.ic).toBeCloseTo(1e-4, 12);
    expect('none' in t.law).toBe(false);
    const law = t.law as { at(x: number): number };
    const nut = demoProcess.n.slope * stage.thermalVoltage;
    const xs = Float64Array.from({ length: 81 }, (_, i) => ((i - 40) / 40) * 4 * nut);
    const out = new Float64Array(xs.length);
    t.evaluate(new Float64Array(stage.dimension), 0, xs, out);
    let worst = 0;
    xs.forEach((x, i) => {
      if (x !== 0) worst = Math.max(worst, Math.abs(out[i]! / law.at(x) - 1));
    });
    expect(worst).toBeLessThan(0.005);
    expect(worst).toBeGreaterThan(0.004); // the EKV curve is not the exponential law: it sits 0.4-0.5% below near balance
  });

  it('offers the tanh law only in weak inversion, and says why not elsewhere', () => {
    const { t } = transferOf(mirrorDesign);
    expect('none' in t.law && t.law.none).toMatch(/IC 4\.\d+ \(moderate inversion\).*below 0\.1/);
  });

  it('spans the whole transition: the nominal output reaches 98% of the tail at the ends', () => {
    for (const d of designs) {
      const { stage, t } = transferOf(d);
      const out = new Float64Array(2);
      t.evaluate(new Float64Array(stage.dimension), 0, Float64Array.of(t.span[0], t.span[1]), out);
      // By construction the span is 1.15x the input where the pair carries 99% / 1%, an output of 0.98 I_B.
      expect(Math.min(Math.abs(out[0]!), Math.abs(out[1]!)) / d.tail!).toBeGreaterThan(0.98);
      expect(Math.sign(out[0]!)).toBe(-Math.sign(out[1]!));
    }
  });

  it('says so, rather than drawing, when the instances reach no balance in the span', () => {
    const { stage, t } = transferOf(simpleDesign);
    const never = { ...t, evaluate: (_u: Float64Array, _b: number, xs: Float64Array, out: Float64Array) => out.fill(Number.NaN, 0, xs.length) };
    const s = studyTransfer(stage, never, 'none', 10);
    expect('none' in s && s.none).toBe('only 0 of 10 sampled instances (and not the nominal stage) reach balance within the drawn input range');
  });

  it('has a report definition for every stage type in the core registry', () => {
    for (const s of STAGES) {
      expect(reportStageFor(s.topology), `add a ReportStage for the ${s.topology} stage in packages/cli/src/report/stages/ (README: A new stage type in the report)`).toBeDefined();
    }
    expect(reportStageFor('no-such-stage')).toBeUndefined();
  });

  it('folded-cascode stage: each instance balances where the exact model puts its offset, with Gm = gm at balance', async () => {
    const d = await loadDesign(fileURLToPath(new URL('../../../examples/folded-cascode-ota.yaml', import.meta.url)));
    const { stage, t } = transferOf(d);
    const study = studied(stage, t, 'folded-check', 40);
    const draws = firstDraws('folded-check', stage.dimension, 40);
    // Both solves stop near 1e-15 V; 1e-12 V is a thousand times that.
    study.balances.forEach((x, k) => expect(Math.abs(x! - stage.figure(draws, k * stage.dimension))).toBeLessThan(1e-12));
    // Nominal: I8 = I5 - I1 and I5 = I6, so the output is I1 - I2 and its slope the input gm
    // (Razavi 2017, ch. 9, the folded cascode's Gm); central difference below 1e-9 relative.
    expect(Math.abs(study.slope!.nominal / stage.operatingPoint[0]!.gm - 1)).toBeLessThan(1e-6);
  });

  it('current mirror: at the nominal input each instance\'s error is the exact model\'s figure; no balance point', async () => {
    const d = await loadDesign(fileURLToPath(new URL('../../../examples/bias-mirror.yaml', import.meta.url)));
    const { stage, t } = transferOf(d);
    expect(t.balance).toBeUndefined();
    const draws = firstDraws('mirror-check', stage.dimension, 40);
    const at = Float64Array.of(stage.operatingPoint[0]!.current);
    const out = new Float64Array(1);
    for (let k = 0; k < 40; k++) {
      t.evaluate(draws, k * stage.dimension, at, out);
      // The same EKV expressions in another arrangement: rounding only (errors are ~1e-3).
      expect(Math.abs(out[0]! - stage.figure(draws, k * stage.dimension))).toBeLessThan(1e-12);
    }
    const s = studied(stage, t, 'mirror-check', 40);
    expect(s.slope).toBeNull();
    expect(s.balances).toEqual([]);
  });
});

/**
 * Accuracy figures for the closing notes (`pnpm figures`): the weak-inversion pair against the
 * tanh law (Mead 1989), importance sampling against 2 Phi(-k) and DOMAIN.md's relative variance
 * per sample, and the demo's Monte Carlo sigma against the linearised one. It prints; the same
 * checks, with tolerances, are in the test suite.
 */
import { compileStage, ekvForward, linearisedSigma, type Design } from '@twinfet/core';
import { createExecutor, estimateHighSigma, normalUpperTail, simulate, twoSidedTail } from '@twinfet/montecarlo';
import { fileURLToPath } from 'node:url';
import { loadDesign } from '../../cli/dist/designFile.js';

const root = fileURLToPath(new URL('../../../', import.meta.url));

/** (I1 - I2)/I_B of an EKV pair with x = dV/(n U_T), each device at `ic` at balance. */
function pairDifference(ic: number, x: number): number {
  const ib = 2 * ic;
  let lo = -2000;
  let hi = 2000;
  for (let k = 0; k < 200; k++) {
    const w = 0.5 * (lo + hi);
    if (ekvForward(x / 2 + w) + ekvForward(-x / 2 + w) < ib) lo = w;
    else hi = w;
  }
  const w = 0.5 * (lo + hi);
  return (ekvForward(x / 2 + w) - ekvForward(-x / 2 + w)) / ib;
}

let worst = 0;
for (let k = 1; k <= 80; k++) worst = Math.max(worst, Math.abs(pairDifference(1e-4, (k / 80) * 4) / Math.tanh((k / 80) * 2) - 1));
console.log(`weak-inversion pair vs I_B tanh(kappa dV / 2 U_T) at IC = 1e-4, 0 < |dV| <= 4 U_T/kappa: worst relative error ${(worst * 100).toFixed(3)}%`);

// An invented pair whose offset is linear in the draws (the current-factor term is negligible).
const linear: Design = {
  name: 'linear pair (invented)',
  temperature: 300,
  topology: 'simple',
  tail: 20e-6,
  input: { polarity: 'n', w: 20e-6, l: 2e-6 },
  process: { n: { vt0: 0.45, slope: 1.3, kp: 300e-6, avt: 5e-9, abeta: 1e-12, rho: 0 } },
  spec: { offset: 1e-3, instances: 1 },
};
const sigma = linearisedSigma(compileStage(linear));
const executor = createExecutor(1);
for (const k of [4, 5, 6, 7]) {
  const design = { ...linear, spec: { offset: k * sigma, instances: 1 } };
  const r = await estimateHighSigma(design, { seed: `is-${k}`, executor });
  const rv = await estimateHighSigma(design, { seed: `rv-${k}`, executor, samples: 200_000 });
  const formula = (Math.exp(k * k) * normalUpperTail(2 * k)) / normalUpperTail(k) ** 2 - 1;
  const truth = twoSidedTail(k);
  console.log(
    `importance sampling at ${k} sigma: ${r.failureProbability.toExponential(4)} 95% [${r.interval[0].toExponential(3)}, ${r.interval[1].toExponential(3)}], ` +
      `2 Phi(-k) = ${truth.toExponential(4)} (ratio ${(r.failureProbability / truth).toFixed(4)}), ${r.samples} samples; ` +
      `relative variance per sample ${rv.relativeVariancePerSample!.toFixed(3)} vs formula ${formula.toFixed(3)}`,
  );
}
await executor.close();

const demo = await loadDesign(`${root}examples/comparator-demo.yaml`);
const run = await simulate(demo, { samples: 1e6, seed: 11 });
const mv = (v: number): string => (v * 1e3).toFixed(4);
console.log(
  `comparator demo, 1e6 samples, seed 11: Monte Carlo sigma ${mv(run.offset.sigma)} mV 95% [${mv(run.offset.sigmaInterval[0])}, ${mv(run.offset.sigmaInterval[1])}], ` +
    `linearised ${mv(run.analytic.sigma)} mV (${run.analytic.agreement.standardErrors.toFixed(2)} standard errors)`,
);

/**
 * Accuracy figures for the closing notes (`pnpm figures`): the weak-inversion pair against the
 * tanh law (Mead 1989); importance sampling against 2 Phi(-k) and its relative variance per
 * sample against exp(b^2) Phi(-2b) / Phi(-b)^2 - 1 for a linear boundary (computed from the
 * mixture's second moment, test/fixtures/importance_variance.py); the demo's Monte Carlo sigma
 * against the linearised one; and the selector against Bechhofer's probability of a correct
 * selection (his Table I, Monte Carlo in weak inversion, importance sampling at 1e-6 and 1e-9).
 * It prints; the same checks, with tolerances, are in the test suite.
 */
import { compileStage, ekvForward, linearisedSigma, specificCurrent, thermalVoltage, type Design } from '@twinfet/core';
import { createExecutor, estimateHighSigma, normalUpperTail, selectionSeparation, simulate, twoSidedTail } from '@twinfet/montecarlo';
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

// Bechhofer 1954, Table I (values recalled from the table; test/fixtures/bechhofer_table.py confirms them).
const TABLE: [number, number[]][] = [[2, [1.8124, 2.3262, 3.29]], [3, [2.2302, 2.7101, 3.6173]], [4, [2.4516, 2.9162, 3.797]], [5, [2.5997, 3.0552, 3.9196]], [10, [2.9829, 3.4182, 4.2456]]];
let tableWorst = 0;
for (const [k, taus] of TABLE) [0.1, 0.05, 0.01].forEach((q, i) => (tableWorst = Math.max(tableWorst, Math.abs(selectionSeparation(k, q) - taus[i]!))));
console.log(`Bechhofer's Table I (k = 2, 3, 4, 5, 10; P = 0.90, 0.95, 0.99): worst |tau - table| ${tableWorst.toExponential(2)} (the table gives 4 decimals)`);

/** An invented selector: `cells` 4/4 um n cells at IC `ic` each at the tie. */
function selector(cells: number, ic: number, abeta: number): Design {
  const n = { vt0: 0.45, slope: 1.3, kp: 300e-6, avt: 5e-9, abeta, rho: 0 };
  return {
    name: 'selector (invented)', temperature: 300, topology: 'selector', cells,
    tail: cells * ic * specificCurrent(n.slope, n.kp, 4e-6, 4e-6, thermalVoltage(300)),
    input: { polarity: 'n', w: 4e-6, l: 4e-6 }, process: { n }, spec: { separation: 1e-3, instances: 1 },
  };
}
const selExecutor = createExecutor(2);
for (const [cells, failure] of [[4, 0.1], [16, 0.05], [64, 0.01]] as const) {
  const base = selector(cells, 1e-4, 1e-8);
  const d = { ...base, spec: { separation: linearisedSigma(compileStage(base)) * selectionSeparation(cells, failure), instances: 1 } };
  const r = await simulate(d, { samples: 200_000, seed: `sel-${cells}`, executor: selExecutor });
  console.log(`selector, ${cells} cells, weak inversion (IC 1e-4), 2e5 samples: P(correct) ${r.yield.estimate.toFixed(5)} 95% [${r.yield.interval[0].toFixed(5)}, ${r.yield.interval[1].toFixed(5)}] vs Bechhofer ${(1 - failure).toFixed(5)} (${r.analytic.yieldAgreement!.standardErrors.toFixed(2)} standard errors)`);
}
for (const cells of [16, 64]) {
  for (const failure of [1e-6, 1e-9]) {
    const base = selector(cells, 1, 1e-12);
    const d = { ...base, spec: { separation: linearisedSigma(compileStage(base)) * selectionSeparation(cells, failure), instances: 1 } };
    const r = await estimateHighSigma(d, { seed: `tail-${cells}`, executor: selExecutor, relError: 0.05 });
    console.log(`selector tail, ${cells} cells, V_T mismatch only: ${r.failureProbability.toExponential(4)} 95% [${r.interval[0].toExponential(3)}, ${r.interval[1].toExponential(3)}] vs Bechhofer ${failure.toExponential(1)} (ratio ${(r.failureProbability / failure).toFixed(4)}), ${r.samples} samples, ${r.seconds.toFixed(2)} s`);
  }
}
await selExecutor.close();

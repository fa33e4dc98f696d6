/**
 * Operating conditions on the same mismatch draws: the run at every condition, the
 * all-conditions yield, the drift, the union failure probability by importance sampling, and
 * sizing and sweeps that honour the conditions.
 */
import { BOLTZMANN, compileConditions, compileStage, ELEMENTARY_CHARGE, linearisedSigma, type Design, type OperatingCondition } from '@twinfet/core';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { estimateHighSigma } from '../src/analyses/highSigma.js';
import { simulate, simulateWithSamples, type RunReport } from '../src/analyses/simulate.js';
import { sweepDesigns } from '../src/analyses/sweep.js';
import { limitingStage } from '../src/analyses/worstCondition.js';
import { createExecutor } from '../src/engine/pool.js';
import { sizeDesign } from '../src/sizing/size.js';
import { testProcess } from './designs.js';

/** The statistics of a report without the timing and worker fields (which legitimately vary). */
function statistics(r: RunReport): string {
  const { seconds: _s, samplesPerSecond: _p, workers: _w, ...rest } = r;
  return JSON.stringify(rest);
}

/** The demo comparator front end (invented process), as in examples/comparator-demo.yaml at 300 K. */
const mirror: Design = {
  name: 'mirror over conditions (invented)',
  temperature: 300.15,
  topology: 'mirror',
  tail: 10e-6,
  input: { polarity: 'n', w: 2e-6, l: 1e-6 },
  load: { polarity: 'p', w: 4e-6, l: 2e-6 },
  process: testProcess,
  spec: { offset: 10e-3, instances: 1 },
};
const FOUR: OperatingCondition[] = [
  { name: 'cold', temperature: 233.15 },
  { name: 'room', temperature: 300.15 },
  { name: 'hot', temperature: 398.15 },
  { name: 'hot-slow', temperature: 398.15, tail: 8e-6, shift: { n: { kp: -0.1 }, p: { kp: -0.1 } } },
];
const withFour: Design = { ...mirror, conditions: FOUR };

describe('a run at every condition from the same draws', () => {
  const executor = createExecutor(1);

  it("one condition equal to the design's own gives exactly the plain run's figures, same seed (identity)", async () => {
    const plain = await simulate(mirror, { samples: 100_000, seed: 'id', executor });
    const one = await simulate({ ...mirror, conditions: [{ name: 'own' }] }, { samples: 100_000, seed: 'id', executor });
    const c = one.conditions![0]!;
    // Exact equality: the condition's stage and the design's see the same draws and the same steps.
    expect(c.offset.mean).toBe(plain.offset.mean);
    expect(c.offset.sigma).toBe(plain.offset.sigma);
    expect(c.offset.sigmaInterval).toEqual(plain.offset.sigmaInterval);
    expect(c.yield.estimate).toBe(plain.yield.estimate);
    expect(c.yield.interval).toEqual(plain.yield.interval);
    const { over, evaluated, worst, ...rest } = one.yield;
    expect(rest).toEqual(plain.yield);
    expect([over, evaluated, worst]).toEqual(['all conditions', 100_000, 'own']);
    expect(one.chip).toEqual(plain.chip);
    expect(one.offset).toEqual(plain.offset);
    expect(one.histogram).toEqual(plain.histogram);
  });

  it('the same seed gives byte-identical statistics with 1, 2 and 3 workers', async () => {
    const runs: string[] = [];
    for (const workers of [1, 2, 3]) runs.push(statistics(await simulate(withFour, { samples: 3 * 65_536 - 100, seed: 'workers', workers })));
    expect(runs[1]).toBe(runs[0]);
    expect(runs[2]).toBe(runs[0]);
  });

  it('per-condition, all-conditions and "which condition fails" counts match a recount from every kept figure (exact)', async () => {
    const o = await simulateWithSamples(withFour, { samples: 20_000, seed: 'recount', executor, keepDraws: true });
    const figs = o.conditionFigures!;
    const spec = o.report.yield.spec;
    const fail = (x: number): boolean => Math.abs(x) > spec;
    let all = 0;
    const failing = FOUR.map(() => 0);
    const only = FOUR.map(() => 0);
    for (let i = 0; i < 20_000; i++) {
      const f = figs.map((a) => fail(a[i]!));
      const k = f.filter(Boolean).length;
      if (k === 0) continue;
      all++;
      f.forEach((x, c) => {
        if (x) failing[c]! += 1;
        if (x && k === 1) only[c]! += 1;
      });
    }
    expect(o.report.yield.failures).toBe(all);
    o.report.conditions!.forEach((c, j) => {
      expect(c.yield.failures).toBe(figs[j]!.filter(fail).length);
      expect(c.failing).toBe(failing[j]);
      expect(c.onlyFailing).toBe(only[j]);
    });
    // Each condition's figure is its own stage's figure of the very draws kept (exact).
    const stages = compileConditions(withFour);
    for (const i of [0, 1, 9_999, 19_999]) {
      stages.forEach((s, j) => expect(figs[j]![i]).toBe(s.stage.figure(o.draws!, i * s.stage.dimension)));
    }
  });

  it('the all-conditions yield is never above the smallest per-condition yield (property, fast-check seed 21)', async () => {
    const condition = fc.record({
      temperature: fc.double({ min: 220, max: 420, noNaN: true }),
      tail: fc.double({ min: 5e-6, max: 20e-6, noNaN: true }),
      kp: fc.double({ min: -0.2, max: 0.2, noNaN: true }),
    });
    await fc.assert(
      fc.asyncProperty(fc.array(condition, { minLength: 1, maxLength: 4 }), fc.double({ min: 4e-3, max: 12e-3, noNaN: true }), async (cs, spec) => {
        const d: Design = {
          ...mirror,
          spec: { offset: spec, instances: 1 },
          conditions: cs.map((c, i) => ({ name: `c${i}`, temperature: c.temperature, tail: c.tail, shift: { n: { kp: c.kp } } })),
        };
        const r = await simulate(d, { samples: 4000, seed: 'prop', executor });
        const smallest = Math.min(...r.conditions!.map((c) => c.yield.estimate));
        expect(r.yield.estimate).toBeLessThanOrEqual(smallest);
        // And it is at least the Bonferroni bound 1 - sum of the per-condition failures.
        expect(r.yield.estimate).toBeGreaterThanOrEqual(1 - r.conditions!.reduce((a, c) => a + (1 - c.yield.estimate), 0) - 1e-12);
      }),
      { seed: 21, numRuns: 12 },
    );
  });

  it('swapping the order of the conditions changes nothing (property, fast-check seed 22)', async () => {
    const base = await simulate(withFour, { samples: 20_000, seed: 'order', executor });
    const byName = (r: RunReport): string => JSON.stringify([...r.conditions!].sort((a, b) => (a.name < b.name ? -1 : 1)));
    await fc.assert(
      fc.asyncProperty(fc.shuffledSubarray(FOUR, { minLength: 4, maxLength: 4 }), async (order) => {
        const r = await simulate({ ...mirror, conditions: order }, { samples: 20_000, seed: 'order', executor });
        expect(byName(r)).toBe(byName(base));
        expect(r.yield).toEqual(base.yield);
        expect(r.chip).toEqual(base.chip);
        expect(r.drift).toEqual(base.drift);
      }),
      { seed: 22, numRuns: 6 },
    );
  });

  it('with conditions the chip yield is the all-conditions yield to the power M (Y_chip = Y^M)', async () => {
    const r = await simulate({ ...withFour, spec: { offset: 10e-3, instances: 8 } }, { samples: 20_000, seed: 'chip', executor });
    expect(Math.abs(r.chip.estimate - r.yield.estimate ** 8)).toBeLessThan(1e-12);
  });
});

describe('drift between two conditions (weak inversion, exponential law)', () => {
  // Deep weak inversion: per sample Vos = A + n U_T B with A = dV_T1 - dV_T2, B = ln(beta2/beta1)
  // (Mead 1989), so the drift is n (k/q) B: sigma = n (k/q) A_beta / sqrt(W L) (Pelgrom 1989,
  // pair-difference sigma), mean 0, and its correlation with Vos(T_a) is
  // k_a s_B / sqrt(s_A^2 + k_a^2 s_B^2) with k_a = n U_T(T_a).
  const d: Design = {
    name: 'weak-inversion pair over temperature (invented)',
    temperature: 300,
    topology: 'simple',
    tail: 1e-16,
    input: { polarity: 'n', w: 2e-6, l: 2e-6 },
    process: { n: { ...testProcess.n, avt: 2e-9, abeta: 3e-8 } },
    spec: { offset: 10e-3, instances: 1 },
    conditions: [{ name: 'cold', temperature: 233.15 }, { name: 'room', temperature: 300 }, { name: 'hot', temperature: 398.15 }],
  };
  it('mean, sigma and correlation within 4 standard errors; the linearised drift sigma to 1e-6', async () => {
    const N = 200_000;
    const r = await simulate(d, { samples: N, seed: 'drift', workers: 1 });
    const dr = r.drift!;
    expect([dr.from, dr.to]).toEqual(['cold', 'hot']);
    const nk = (1.3 * BOLTZMANN) / ELEMENTARY_CHARGE;
    const sB = 3e-8 / 2e-6; // A_beta / sqrt(W L)
    const sA = 2e-9 / 2e-6;
    const sigma = nk * sB;
    expect(Math.abs(dr.sigma - sigma)).toBeLessThan((4 * sigma) / Math.sqrt(2 * (N - 1)));
    expect(Math.abs(dr.mean)).toBeLessThan((4 * sigma) / Math.sqrt(N));
    // The deviation of the EKV model from the exponential law is ~sqrt(IC)/2 ~ 1e-5 here.
    expect(Math.abs(dr.linearisedSigma / sigma - 1)).toBeLessThan(1e-5);
    const ka = nk * 233.15;
    const rho = (ka * sB) / Math.hypot(sA, ka * sB);
    // Large-sample standard error of Pearson's r: (1 - rho^2) / sqrt(N).
    expect(Math.abs(dr.correlation! - rho)).toBeLessThan((4 * (1 - rho * rho)) / Math.sqrt(N));
    // Quantiles of a Gaussian drift: the 99% point is 2.326 sigma (A&S 26.2) within 4 SE of a
    // quantile (sqrt(p(1-p)/N)/phi(z) sigma = 0.0105 sigma at N = 2e5).
    const q99 = dr.quantiles.find((q) => q.p === 0.99)!.value!;
    expect(Math.abs(q99 / sigma - 2.3263)).toBeLessThan(4 * 0.0105);
    expect(dr.quantileMethod).toBe('exact');
  });
});

describe('the failure probability over all conditions by importance sampling', () => {
  const executor = createExecutor(1);
  const weak = (avt: number, abeta: number, temps: number[], spec: number, kpExponent?: number): Design => ({
    name: 'weak-inversion union (invented)',
    temperature: 300,
    topology: 'simple',
    tail: 1e-16,
    input: { polarity: 'n', w: 2e-6, l: 2e-6 },
    process: { n: { ...testProcess.n, avt, abeta, ...(kpExponent === undefined ? {} : { kpExponent }) } },
    spec: { offset: spec, instances: 1 },
    conditions: temps.map((t, i) => ({ name: `t${i}`, temperature: t })),
  });

  it.each([
    // Values from test/fixtures/union_probability.py (exact union of the linear case).
    ['-40 C, 27 C, 125 C (hot dominates)', weak(3e-9, 5e-8, [233.15, 300.15, 398.15], 10e-3), 8.7818224321e-8, 8.7817012209e-8, 0.05],
    ['1 K and 1000 K (the union 6% above either)', weak(2e-9, 0.9e-8, [1, 1000], 4e-3, 0), 3.762586113e-4, 3.5452030147e-4, 0.01],
  ] as const)('linear case, %s: matches the exact union probability within 4 standard errors', async (_n, d, exact, largestSingle, relError) => {
    const r = await estimateHighSigma(d, { seed: 'union', executor, relError });
    expect(r.over).toBe('all conditions');
    expect(r.designPoints).toHaveLength(2 * d.conditions!.length);
    expect(Math.abs(r.failureProbability - exact)).toBeLessThan(4 * r.standardError);
    // The union is never below any one condition's own estimate from the same samples (the
    // same weights summed in another order: 1e-12 relative for rounding).
    for (const c of r.conditions!) expect(r.failureProbability).toBeGreaterThanOrEqual(c.failureProbability * (1 - 1e-12));
    if (relError === 0.01) {
      // Here the union and the larger single condition are told apart: > 4 SE between them.
      expect((exact - largestSingle) / r.standardError).toBeGreaterThan(4);
    }
  });

  it('at about 3.5 sigma it agrees with the union counted by plain Monte Carlo within 4 standard errors of the difference', async () => {
    // Simple stage in moderate inversion: offsets not linear, tail and KP differ between conditions.
    const d: Design = {
      name: 'moderate-inversion pair over conditions (invented)',
      temperature: 300,
      topology: 'simple',
      tail: 10e-6,
      input: { polarity: 'n', w: 2e-6, l: 1e-6 },
      process: testProcess,
      spec: { offset: 13e-3, instances: 1 },
      conditions: [
        { name: 'cold', temperature: 233.15, tail: 14e-6 },
        { name: 'hot', temperature: 398.15 },
        { name: 'hot-slow', temperature: 398.15, tail: 6e-6, shift: { n: { kp: -0.15 } } },
      ],
    };
    const is = await estimateHighSigma(d, { seed: 'u35', executor, relError: 0.03 });
    const mc = await simulate(d, { samples: 1_000_000, seed: 'u35', workers: 2, keepOffsets: false });
    const p = mc.yield.failure.estimate;
    expect(p).toBeGreaterThan(2e-4); // about 3.5 sigma two-sided
    expect(p).toBeLessThan(1e-3);
    const seMc = Math.sqrt((p * (1 - p)) / mc.yield.evaluated!);
    expect(Math.abs(is.failureProbability - p)).toBeLessThan(4 * Math.hypot(is.standardError, seMc));
    // Per condition too (marginals from the same weighted samples against each condition's count).
    is.conditions!.forEach((c, j) => {
      const q = 1 - mc.conditions![j]!.yield.estimate;
      expect(Math.abs(c.failureProbability - q)).toBeLessThan(4 * Math.hypot(c.standardError, Math.sqrt((q * (1 - q)) / 1e6)));
    });
  });
});

describe('size and sweep honour the conditions', () => {
  const executor = createExecutor(2);

  it('a sigma target is met at every condition; the report names the limiting one', async () => {
    const target = 2.5e-3;
    const r = await sizeDesign(withFour, { target: { kind: 'sigma', sigma: target }, vary: 'input.area', samples: 100_000, executor });
    // The largest linearised sigma over the conditions is at the hot ones (U_T and I_D/gm grow with T).
    const lim = limitingStage(r.design);
    expect(['hot', 'hot-slow']).toContain(lim.condition);
    expect(lim.sigma).toBeLessThanOrEqual(target);
    expect(r.confirmed.condition).not.toBeNull();
    expect(r.notes.some((n) => n.includes('4 conditions'))).toBe(true);
    // An independent run of the sized design: every condition within 4 SE of meeting the target.
    const check = await simulate(r.design, { samples: 100_000, seed: 'independent', executor });
    for (const c of check.conditions!) expect(c.offset.sigma).toBeLessThan(target * (1 + 4 / Math.sqrt(2 * 1e5)));
    // Without the conditions the same target needs less area: the conditions were honoured.
    const room = await sizeDesign(mirror, { target: { kind: 'sigma', sigma: target }, vary: 'input.area', samples: 100_000, executor });
    expect(room.result.variedArea).toBeLessThan(r.result.variedArea);
  });

  it('a sweep point reports the largest sigma over the conditions and the all-conditions yield (exactly those of a run)', async () => {
    const [p] = await sweepDesigns([withFour], { samples: 20_000, seed: 'sweep', executor });
    const run = await simulate(withFour, { samples: 20_000, seed: 'sweep', executor, keepOffsets: false });
    const largest = [...run.conditions!].sort((a, b) => b.offset.sigmaInterval[1] - a.offset.sigmaInterval[1])[0]!;
    expect(p!.monteCarlo.sigma).toBe(largest.offset.sigma);
    expect(p!.monteCarlo.yield).toBe(run.yield.estimate);
    expect(p!.limitingCondition).toEqual({ linearised: limitingStage(withFour).condition, sigma: largest.name, yield: run.yield.worst });
    expect(p!.analyticSigma).toBe(Math.max(...compileConditions(withFour).map((c) => linearisedSigma(c.stage))));
    expect(linearisedSigma(compileStage(mirror))).toBeLessThan(p!.analyticSigma);
  });
});

import { InputError, type Design } from '@twinfet/core';
import { afterAll, describe, expect, it } from 'vitest';
import { createExecutor } from '../src/engine/pool.js';
import { sweepDesigns } from '../src/analyses/sweep.js';
import { linearSimple, testProcess } from './designs.js';
import { twoSidedTail } from '../src/stats/normal.js';
import { linearisedSigma, compileStage } from '@twinfet/core';

const K_B = 1.380649e-23; // J/K, exact (2019 SI)
const Q = 1.602176634e-19; // C, exact (2019 SI)

/** Least-squares slope of y against x. */
function slope(x: readonly number[], y: readonly number[]): number {
  const n = x.length;
  const mx = x.reduce((a, b) => a + b, 0) / n;
  const my = y.reduce((a, b) => a + b, 0) / n;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < n; i++) {
    sxy += (x[i]! - mx) * (y[i]! - my);
    sxx += (x[i]! - mx) ** 2;
  }
  return sxy / sxx;
}

describe('sweepDesigns', () => {
  const executor = createExecutor(2);
  afterAll(() => executor.close());

  it('a width sweep of a V_T-dominated pair follows sigma ~ 1/sqrt(area): log-log slope -0.5 +- 0.02 (Pelgrom 1989)', async () => {
    const widths = [1e-6, 2e-6, 5e-6, 10e-6, 20e-6, 50e-6, 100e-6];
    const designs = widths.map((w): Design => ({ ...linearSimple, input: { ...linearSimple.input, w } }));
    const pts = await sweepDesigns(designs, { samples: 20_000, seed: 'width', executor });
    expect(pts.map((p) => p.index)).toEqual([0, 1, 2, 3, 4, 5, 6]);
    const lx = widths.map((w) => Math.log(w * linearSimple.input.l));
    // abeta = 1e-12 m: sigma is A_VT/sqrt(WL) to 1e-10 relative, so the analytic slope is -0.5
    // to rounding; the Monte Carlo slope carries sampling error of about 0.005 / 4.6 per point
    // (relative SE 1/sqrt(2N) over a 4.6-unit log range), far inside +-0.02.
    expect(Math.abs(slope(lx, pts.map((p) => Math.log(p.analyticSigma))) + 0.5)).toBeLessThan(1e-9);
    expect(Math.abs(slope(lx, pts.map((p) => Math.log(p.monteCarlo.sigma))) + 0.5)).toBeLessThan(0.02);
    for (const p of pts) {
      // Each Monte Carlo sigma within 4 standard errors sigma/sqrt(2(N-1)) of the linearised one.
      expect(Math.abs(p.monteCarlo.sigma - p.analyticSigma)).toBeLessThan((4 * p.monteCarlo.sigma) / Math.sqrt(2 * (p.monteCarlo.samples - 1)));
      expect(p.importance).toBeNull();
    }
  });

  it('in weak inversion sigma rises with temperature as sqrt(sVT^2 + (n U_T sB)^2) (Kinget 2005; Mead 1989 limit I_D/gm = n U_T)', async () => {
    // An invented deep-weak-inversion pair (IC 1e-6 to 4e-6 over 220-380 K): W/L = 100, 0.2 nA
    // tail, a large A_beta so the current-factor term is visible beside the threshold term.
    const base: Design = {
      ...linearSimple,
      tail: 2e-10,
      input: { polarity: 'n', w: 100e-6, l: 1e-6 },
      process: { n: { ...testProcess.n, avt: 1e-9, abeta: 5e-8 } },
      spec: { offset: 1e-3, instances: 1 },
    };
    const temps = [220, 260, 300, 340, 380];
    const pts = await sweepDesigns(temps.map((temperature) => ({ ...base, temperature })), { samples: 50_000, seed: 'temp', executor, importance: true });
    const wl = 100e-6 * 1e-6;
    const sVT = 1e-9 / Math.sqrt(wl); // pair-difference sigmas (Pelgrom 1989)
    const sB = 5e-8 / Math.sqrt(wl);
    pts.forEach((p, i) => {
      const t = temps[i]!;
      const hand = Math.hypot(sVT, testProcess.n.slope * ((K_B * t) / Q) * sB);
      // The exact EKV I_D/gm is n U_T sqrt(IC)/(1 - e^-sqrt IC), above n U_T by sqrt(IC)/2 < 1e-3
      // here; its effect on sigma is below that, so 0.2% bounds the weak-inversion formula's error.
      expect(Math.abs(p.analyticSigma / hand - 1)).toBeLessThan(2e-3);
      expect(p.importance).not.toBeNull();
      expect(p.importance!.interval[0]).toBeLessThanOrEqual(p.importance!.failure);
    });
    for (let i = 1; i < pts.length; i++) {
      expect(pts[i]!.analyticSigma).toBeGreaterThan(pts[i - 1]!.analyticSigma);
      // Same seed at every point (common random numbers): the Monte Carlo sigma rises too.
      expect(pts[i]!.monteCarlo.sigma).toBeGreaterThan(pts[i - 1]!.monteCarlo.sigma);
    }
  });

  it('with importance sampling every yield of a point comes from its importance-sampling failure', async () => {
    // A linear pair (offset Gaussian with the linearised sigma) at 4.6 sigma, 1024 instances per
    // chip: truth p = 2 Phi(-4.6) = 4.2263e-6 (A&S 26.2), chip yield (1 - p)^1024 = 0.995681.
    const sigma = linearisedSigma(compileStage(linearSimple));
    const design: Design = { ...linearSimple, spec: { offset: 4.6 * sigma, instances: 1024 } };
    const [withIs] = await sweepDesigns([design], { samples: 20_000, seed: 'is-yield', executor, importance: true });
    const [plain] = await sweepDesigns([design], { samples: 20_000, seed: 'is-yield', executor });
    const t = withIs!.importance!;
    const y = withIs!.yield;
    expect(y.method).toBe('importance-sampling');
    // Identities (exact): 1 - p, and the interval ends mapped through 1 - p and (1 - p)^M.
    expect(y.estimate).toBe(1 - t.failure);
    expect(y.interval).toEqual([1 - t.interval[1], 1 - t.interval[0]]);
    expect(y.chipYield).toBe(Math.exp(1024 * Math.log1p(-t.failure)));
    expect(y.chipYieldInterval).toEqual([Math.exp(1024 * Math.log1p(-t.interval[1])), Math.exp(1024 * Math.log1p(-t.interval[0]))]);
    // Against the truth: the chip-yield interval covers (1 - 2 Phi(-4.6))^1024 (the IS interval
    // is +-5% at 95%); the Monte Carlo count of 20000 samples (expected 0.08 failures) could not.
    const truth = Math.exp(1024 * Math.log1p(-twoSidedTail(4.6)));
    expect(y.chipYieldInterval[0]).toBeLessThanOrEqual(truth);
    expect(y.chipYieldInterval[1]).toBeGreaterThanOrEqual(truth);
    expect(Math.abs(y.chipYield - truth)).toBeLessThan(1024 * twoSidedTail(4.6) * 0.06);
    // Without importance sampling the yields are the Monte Carlo ones.
    expect(plain!.yield.method).toBe('monte-carlo');
    expect(plain!.yield.chipYield).toBe(plain!.monteCarlo.chipYield);
    expect(plain!.yield.interval).toEqual(plain!.monteCarlo.yieldInterval);
  });

  it('names the point of an invalid design', async () => {
    const bad = { ...linearSimple, tail: -1 };
    await expect(sweepDesigns([linearSimple, bad], { workers: 1 })).rejects.toThrow(InputError);
    await expect(sweepDesigns([linearSimple, bad], { workers: 1 })).rejects.toThrow(/^tail: .*at sweep point 2\)$/);
    await expect(sweepDesigns([], { workers: 1 })).rejects.toThrow(/at least one point/);
  });
});

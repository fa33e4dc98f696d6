import { compileStage, linearisedSigma, type Design } from '@twinfet/core';
import { describe, expect, it } from 'vitest';
import { findDesignPoint } from '../src/analyses/designPoint.js';
import { logNormalUpperTail, normalUpperTail, twoSidedTail } from '../src/stats/normal.js';
import { createExecutor } from '../src/engine/pool.js';
import { simulate } from '../src/analyses/simulate.js';
import { estimateHighSigma } from '../src/analyses/highSigma.js';
import { bigMirror, linearSimple } from './designs.js';

const sigmaLin = linearisedSigma(compileStage(linearSimple));
const at = (k: number): Design => ({ ...linearSimple, spec: { offset: k * sigmaLin, instances: 1 } });

describe('design points (FORM)', () => {
  it('for a linear offset the design point is at distance spec/sigma along the sensitivities', () => {
    const st = compileStage(at(5));
    for (const side of [1, -1]) {
      const p = findDesignPoint(st, st.failureComponents(5 * sigmaLin)[side > 0 ? 0 : 1]!);
      expect(p.method).toBe('hl-rf');
      // Linear boundary: beta = spec/sigma exactly (Hasofer & Lind 1974); solve tolerance 1e-9.
      expect(Math.abs(p.distance - 5)).toBeLessThan(1e-6);
      expect(Math.abs(p.offset - side * 5 * sigmaLin)).toBeLessThan(1e-9 * 5 * sigmaLin);
    }
  });
  it('on the mirror stage the point lies on the exact boundary and FORM is near the Gaussian', () => {
    const st = compileStage(bigMirror);
    const spec = 5 * linearisedSigma(st);
    const p = findDesignPoint(st, st.failureComponents(spec)[0]!);
    expect(Math.abs(p.offset - spec)).toBeLessThan(1e-9 * spec);
    // Small mismatch: the boundary is close to linear, so the distance is within 2% of 5.
    expect(Math.abs(p.distance - 5)).toBeLessThan(0.1);
  });
});

describe('importance sampling against the Gaussian closed form (2 Phi(-k) for a linear offset, A&S 26.2)', () => {
  const executor = createExecutor(1);
  it.each([4, 5, 6, 7])('at %i sigma the estimate matches 2 Phi(-k) within its 99.9 percent interval', async (k) => {
    const r = await estimateHighSigma(at(k), { seed: `is-${k}`, executor, confidence: 0.999, relError: 0.05 });
    const truth = twoSidedTail(k);
    expect(truth).toBeGreaterThanOrEqual(r.interval[0]);
    expect(truth).toBeLessThanOrEqual(r.interval[1]);
    expect(r.relativeHalfWidth!).toBeLessThanOrEqual(0.05);
    expect(r.designPoints.map((d) => d.side)).toEqual(['+spec', '-spec']);
    // Two sides of a symmetric boundary: FORM gives 2 Phi(-k) exactly for a linear offset.
    expect(Math.abs(r.form.failureProbability / truth - 1)).toBeLessThan(1e-5);
    expect(Math.abs(r.sigmaLevel! - k)).toBeLessThan(0.05);
  });

  it.each([4, 5, 6, 7])('relative variance per sample at %i sigma matches exp(b^2) Phi(-2b)/Phi(-b)^2 - 1 within 4 standard errors', async (k) => {
    const r = await estimateHighSigma(at(k), { seed: `rv-${k}`, executor, samples: 200_000 });
    const want = (Math.exp(k * k) * normalUpperTail(2 * k)) / normalUpperTail(k) ** 2 - 1;
    // The formula is that of one shifted normal and one tail; for the two-sided mixture it holds
    // to 1e-14, and its values are 4.5111087, 5.6772861, 6.8684799, 8.0755192 (quadrature in
    // test/fixtures/importance_variance.py, mpmath at 40 digits): checked to 5e-8.
    expect(Math.abs(want - { 4: 4.5111087, 5: 5.6772861, 6: 6.8684799, 7: 8.0755192 }[k]!)).toBeLessThan(5e-8);
    // The estimate from 200000 samples has a relative standard error of 0.46%, 0.50%, 0.54% and
    // 0.57% at 4..7 sigma (delta method on the weights' first four moments, same script).
    const se = { 4: 0.00462, 5: 0.00499, 6: 0.00536, 7: 0.00571 }[k]!;
    expect(Math.abs(r.relativeVariancePerSample! / want - 1)).toBeLessThan(4 * se);
  });

  it('at about 3.5 sigma it agrees with plain Monte Carlo within the two intervals', async () => {
    const design = { ...bigMirror, spec: { offset: 3.5 * linearisedSigma(compileStage(bigMirror)), instances: 1 } };
    const is = await estimateHighSigma(design, { seed: 'x', executor, relError: 0.03 });
    const mc = await simulate(design, { samples: 2_000_000, seed: 'x', executor, keepOffsets: false });
    const [a, b] = is.interval;
    const [c, d] = mc.yield.failure.interval;
    expect(Math.max(a, c)).toBeLessThanOrEqual(Math.min(b, d)); // the intervals overlap
    await executor.close();
  });

  it.each([26, 30, 37])('at %i sigma (weights near 1e-150 to 1e-300) it still matches 2 Phi(-k) with a non-zero standard error', async (k) => {
    const r = await estimateHighSigma(at(k), { seed: `deep-${k}`, executor, confidence: 0.999 });
    // Truth from the log tail (A&S 26.2.12 beyond 37 sigma): 2 Phi(-k).
    const truth = 2 * Math.exp(logNormalUpperTail(k));
    expect(r.standardError).toBeGreaterThan(0);
    expect(r.belowDoubleRange).toBe(false);
    expect(truth).toBeGreaterThanOrEqual(r.interval[0]);
    expect(truth).toBeLessThanOrEqual(r.interval[1]);
    expect(r.relativeHalfWidth!).toBeLessThanOrEqual(0.05);
  });

  it('beyond the range of doubles (45 sigma) it draws nothing and says so, with the FORM sigma level', async () => {
    const r = await estimateHighSigma(at(45), { seed: 'beyond', executor });
    expect(r.belowDoubleRange).toBe(true);
    expect(r.stopRule).toBe('below-double-range');
    expect(r.samples).toBe(0);
    expect(r.failureProbability).toBe(0);
    // Linear boundary at 45 sigma on each side: the two-sided level is 45 (solve tolerance 1e-6).
    expect(Math.abs(r.sigmaLevel! - 45)).toBeLessThan(1e-6);
  });

  it('chip failure for M instances is 1 - (1 - p)^M', async () => {
    const d = { ...at(6), spec: { offset: 6 * sigmaLin, instances: 1000 } };
    const r = await estimateHighSigma(d, { seed: 'chip', workers: 1 });
    // Identity to rounding (expm1/log1p forms): 1e-12 relative.
    expect(Math.abs(r.chip.failure / -Math.expm1(1000 * Math.log1p(-r.failureProbability)) - 1)).toBeLessThan(1e-12);
  });

  it.each([
    ['1e-3 sigma (a 1 uV-style slip)', 1e-3],
    ['1.2 sigma', 1.2],
  ])('a spec inside the bulk (%s) is estimated by plain Monte Carlo with a Clopper-Pearson interval that covers 2 Phi(-k)', async (_label, k) => {
    const r = await estimateHighSigma(at(k), { seed: `bulk-${k}`, workers: 1 });
    expect(r.method).toBe('monte-carlo');
    expect(r.methodReason).toMatch(/inside the bulk/);
    // Truth for the linear pair: 2 Phi(-k) (A&S 26.2): 0.999202 at k = 1e-3, 0.230139 at 1.2.
    const truth = twoSidedTail(k);
    expect(r.interval[0]).toBeLessThanOrEqual(truth);
    expect(r.interval[1]).toBeGreaterThanOrEqual(truth);
    // Never a degenerate interval: both ends differ from the estimate's and from each other.
    expect(r.interval[0]).toBeLessThan(r.failureProbability);
    expect(r.interval[1]).toBeGreaterThan(r.failureProbability);
    expect(r.interval[1]).toBeLessThan(1);
    expect(r.relativeHalfWidth!).toBeGreaterThan(0);
    expect(r.relativeHalfWidth!).toBeLessThanOrEqual(0.05);
    expect(r.equivalentPlainSamples).toBeNull();
    // Same streams as simulate: the same seed and sample count see the same failures (exact).
    const mc = await simulate(at(k), { samples: r.samples, seed: `bulk-${k}`, workers: 1, keepOffsets: false });
    expect(r.hits).toBe(mc.yield.failures);
    expect(r.interval).toEqual(mc.yield.failure.interval);
  });

  it('a spec just beyond the bulk distance (1.7 sigma, p = 0.089) stays with importance sampling', async () => {
    const r = await estimateHighSigma(at(1.7), { seed: 'edge', workers: 1 });
    expect(r.method).toBe('importance-sampling');
    expect(r.methodReason).toBeNull();
    // 2 Phi(-1.7) = 0.089131 (A&S 26.2) inside the interval.
    expect(r.interval[0]).toBeLessThanOrEqual(twoSidedTail(1.7));
    expect(r.interval[1]).toBeGreaterThanOrEqual(twoSidedTail(1.7));
  });

  it('the chip yield (1 - p)^M is kept directly, so a chip yield of 1e-52 is not lost as 1 - failure', async () => {
    const d = { ...at(1.6), spec: { offset: 1.6 * sigmaLin, instances: 1024 } };
    const r = await estimateHighSigma(d, { seed: 'chip-yield', workers: 1 });
    // Identity (exp/log1p forms): 1e-12 relative; 1 - chip.failure would be exactly 0 here.
    expect(Math.abs(r.chip.yield / Math.exp(1024 * Math.log1p(-r.failureProbability)) - 1)).toBeLessThan(1e-12);
    expect(r.chip.yield).toBeGreaterThan(0);
    expect(1 - r.chip.failure).toBe(0);
    expect(r.chip.yieldInterval[0]).toBeLessThan(r.chip.yield);
    expect(r.chip.yieldInterval[1]).toBeGreaterThan(r.chip.yield);
  });

  it('refuses bad options naming the field', async () => {
    await expect(estimateHighSigma(at(5), { relError: 0 })).rejects.toThrow(/^relError: /);
    await expect(estimateHighSigma(at(5), { samples: 5 })).rejects.toThrow(/^samples: /);
    await expect(estimateHighSigma(at(5), { spec: -1 })).rejects.toThrow(/^spec: /);
  });
});

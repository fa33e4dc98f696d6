/**
 * The selector stage through the Monte Carlo, high-sigma and sizing analyses, against
 * Bechhofer's probability of a correct selection (Bechhofer, Ann. Math. Statist. 25(1), 1954).
 */
import { compileConditions, compileStage, linearisedSigma, specificCurrent, thermalVoltage, type Design } from '@twinfet/core';
import { describe, expect, it } from 'vitest';
import { bruteLead } from '../../core/test/selectorBrute.js';
import { findDesignPoint } from '../src/analyses/designPoint.js';
import { estimateHighSigma } from '../src/analyses/highSigma.js';
import { linearisedSummary, type SelectionSummary } from '../src/analyses/linearisedSummary.js';
import { findMirroredDesignPoint } from '../src/analyses/mirroredDesignPoint.js';
import { simulate, simulateWithSamples } from '../src/analyses/simulate.js';
import { createExecutor } from '../src/engine/pool.js';
import { runChunk } from '../src/engine/chunk.js';
import type { ImportanceResult } from '../src/engine/messages.js';
import { sizeDesign } from '../src/sizing/size.js';
import { maxOfNormals, selectionSeparation, wrongSelection } from '../src/stats/bechhofer.js';
import { normalUpperTail } from '../src/stats/normal.js';
import { testProcess } from './designs.js';

const n = testProcess.n;
const ut = thermalVoltage(300);

/** A selector of `cells` n cells at inversion coefficient `ic` each at the tie (invented demo process). */
function selector(cells: number, ic: number, separation: number, opts: { w?: number; l?: number; abeta?: number; instances?: number } = {}): Design {
  const w = opts.w ?? 4e-6;
  const l = opts.l ?? 4e-6;
  return {
    name: 'test selector (invented)',
    temperature: 300,
    topology: 'selector',
    cells,
    tail: cells * ic * specificCurrent(n.slope, n.kp, w, l, ut),
    input: { polarity: 'n', w, l },
    process: { n: { ...n, abeta: opts.abeta ?? n.abeta } },
    spec: { separation, instances: opts.instances ?? 1 },
  };
}

/** The separation at which Bechhofer's form gives `failure` for a design's sigma_c. */
const separationFor = (d: Design, failure: number): number => linearisedSigma(compileStage(d)) * selectionSeparation(d['cells'] as number, failure);

describe('linearised summary (the selection law)', () => {
  it('N = 2 is the pair: sigma = sqrt(2) sigma_c and 1 - P = Phi(-D / (sqrt2 sigma_c)) (Bechhofer 1954 for k = 2), 1e-13', () => {
    const d = selector(2, 1e-4, 5e-3);
    const a = linearisedSummary(compileStage(d)) as SelectionSummary;
    expect(Math.abs(a.sigma / (Math.SQRT2 * a.cellSigma) - 1)).toBeLessThan(1e-13);
    expect(Math.abs(a.mean)).toBe(0);
    expect(Math.abs(a.yield.failure / normalUpperTail(5e-3 / a.sigma) - 1)).toBeLessThan(1e-13);
  });

  it('N = 16: mean and sigma of the lead are sigma_c E[M] and sigma_c sqrt(1 + var M), M the largest of 15 normals; leadFor inverts the form', () => {
    const d = selector(16, 1e-4, 3e-3);
    const a = linearisedSummary(compileStage(d)) as SelectionSummary;
    const m = maxOfNormals(15);
    expect(Math.abs(a.mean / (a.cellSigma * m.mean) - 1)).toBeLessThan(1e-13);
    expect(Math.abs(a.sigma / (a.cellSigma * Math.sqrt(1 + m.variance)) - 1)).toBeLessThan(1e-13);
    for (const { probability, lead } of a.leadFor) expect(Math.abs(wrongSelection(16, lead / a.cellSigma) / (1 - probability) - 1)).toBeLessThan(1e-9);
  });
});

describe('Monte Carlo of the exact model', () => {
  const executor = createExecutor(2);

  it.each([
    [4, 0.1],
    [16, 0.05],
  ])('weak inversion (IC 1e-4), N = %i: the probability of a correct selection agrees with Bechhofer within 4 standard errors, and the lead sigma with the law', async (cells, failure) => {
    const base = selector(cells, 1e-4, 1e-3);
    const d = { ...base, spec: { separation: separationFor(base, failure), instances: 1 } };
    const r = await simulate(d, { samples: 100_000, seed: `weak-${cells}`, executor });
    // Binomial standard error of the estimate at the law's P.
    const se = Math.sqrt((failure * (1 - failure)) / r.evaluated);
    expect(Math.abs(r.yield.estimate - (1 - failure))).toBeLessThan(4 * se);
    expect(r.analytic.yieldAgreement?.consistent).toBe(true);
    // Sigma: chi-square standard error sigma / sqrt(2 (N - 1)) (the lead is not Gaussian, but close
    // enough in kurtosis here for 4 of them to cover it); the mean: sigma / sqrt(N).
    expect(Math.abs(r.offset.sigma - r.analytic.sigma)).toBeLessThan((4 * r.offset.sigma) / Math.sqrt(2 * (r.evaluated - 1)));
    const a = r.analytic as SelectionSummary & typeof r.analytic;
    expect(Math.abs(r.offset.mean - a.mean)).toBeLessThan((4 * r.offset.sigma) / Math.sqrt(r.evaluated));
    expect(r.figure.name).toBe('lead');
    expect(r.nonConverged).toBe(0);
    // The winner's share at the separation, nominal: the exponential law e^{D/nU_T}/(e^{D/nU_T} + N - 1)
    // (Mead 1989), within 0.5% at IC 1e-4.
    const e = Math.exp(d.spec.separation / (n.slope * ut));
    expect(Math.abs(r.response!.nominal / (e / (e + cells - 1)) - 1)).toBeLessThan(0.005);
  });

  it('moderate and strong inversion: every kept lead equals an independent brute-force solve (1e-10 V), so the yield counts agree too', async () => {
    for (const ic of [3, 40]) {
      const d = selector(5, ic, 4e-3, { w: 2e-6, l: 2e-6, abeta: 3e-8 });
      const out = await simulateWithSamples(d, { samples: 60, seed: `brute-${ic}`, workers: 1, keepDraws: true });
      let failures = 0;
      for (let i = 0; i < 60; i++) {
        const brute = bruteLead(d, out.draws!, i * out.dimension);
        expect(Math.abs(out.offsets![i]! - brute)).toBeLessThan(1e-10);
        if (brute > 4e-3) failures++;
      }
      expect(out.report.yield.failures).toBe(failures);
    }
  });

  it('the mirror-image design point equals the full-space HL-RF search (N = 5, moderate inversion: the other competitors move too), 1e-6', () => {
    const d = selector(5, 3, 8e-3, { w: 2e-6, l: 2e-6, abeta: 3e-8 });
    const st = compileStage(d);
    const region = st.failureComponents(8e-3)[0]!;
    const full = findDesignPoint(st, region);
    const mirrored = findMirroredDesignPoint(st, region, 2);
    expect(full.method).toBe('hl-rf');
    expect(Math.abs(mirrored.point.distance - full.distance)).toBeLessThan(1e-6);
    mirrored.point.u.forEach((x, j) => expect(Math.abs(x - full.u[j]!)).toBeLessThan(1e-5));
    expect(Math.abs(mirrored.rest[1]!)).toBeGreaterThan(1e-4); // the shared group is not trivially zero
  });

  it('the O(dimension) mirror-image mixture gives the same weights as the explicit N - 1 centre mixture (identity, 1e-12 relative)', () => {
    const cells = 7;
    const d = selector(cells, 3, 8e-3, { w: 2e-6, l: 2e-6, abeta: 3e-8 });
    const st = compileStage(d);
    const m = findMirroredDesignPoint(st, st.failureComponents(8e-3)[0]!, 2);
    const images: number[][] = [];
    for (let c = 1; c < cells; c++) {
      const u = new Array<number>(2 * cells);
      for (let g = 0; g < cells; g++) for (let i = 0; i < 2; i++) u[2 * g + i] = (g === 0 ? m.fixed : g === c ? m.own : m.rest)[i]!;
      images.push(u);
    }
    const task = { kind: 'importance' as const, design: d, seed: 'mix', chunk: 0, count: 3000, spec: 8e-3, logScale: 0.5 * m.point.distance ** 2 };
    const explicit = runChunk({ ...task, shifts: images }) as ImportanceResult;
    const mirrored = runChunk({ ...task, shifts: [], mirrored: { groupSize: 2, groups: cells, fixed: m.fixed, own: m.own, rest: m.rest } }) as ImportanceResult;
    expect(explicit.hits).toBe(mirrored.hits);
    expect(explicit.hits).toBeGreaterThan(500);
    expect(Math.abs(mirrored.sum / explicit.sum - 1)).toBeLessThan(1e-12);
    expect(Math.abs(mirrored.sumSquares / explicit.sumSquares - 1)).toBeLessThan(1e-12);
  });

  it('with conditions, the mixture of each condition\'s mirror-image mixture estimates the same union failure as the explicit mixture over all their centres (same density; 4 standard errors of the difference)', () => {
    // Two conditions far enough apart (tail current 0.5x and 2x) that their failure points differ.
    const cells = 5;
    const base = selector(cells, 3, 8e-3, { w: 2e-6, l: 2e-6, abeta: 3e-8 });
    const tail = base['tail'] as number;
    const d: Design = { ...base, conditions: [{ name: 'low', tail: 0.5 * tail }, { name: 'high', tail: 2 * tail }] };
    const sets = compileConditions(d).map((c) => findMirroredDesignPoint(c.stage, c.stage.failureComponents(8e-3)[0]!, 2));
    const centres = sets.flatMap((m) => {
      const out: number[][] = [];
      for (let c = 1; c < cells; c++) {
        const u = new Array<number>(2 * cells);
        for (let g = 0; g < cells; g++) for (let i = 0; i < 2; i++) u[2 * g + i] = (g === 0 ? m.fixed : g === c ? m.own : m.rest)[i]!;
        out.push(u);
      }
      return out;
    });
    expect(Math.abs(sets[0]!.point.distance - sets[1]!.point.distance)).toBeGreaterThan(0.05);
    const logScale = 0.5 * Math.min(...sets.map((m) => m.point.distance)) ** 2;
    const task = { kind: 'importance' as const, design: d, seed: 'sets', chunk: 0, count: 20000, spec: 8e-3, logScale, union: true };
    const explicit = runChunk({ ...task, shifts: centres }) as ImportanceResult;
    const mixed = runChunk({ ...task, shifts: [], mirroredSets: sets.map((m) => ({ groupSize: 2, groups: cells, fixed: m.fixed, own: m.own, rest: m.rest })) }) as ImportanceResult;
    const est = (r: ImportanceResult) => {
      const p = r.sum / r.count;
      return { p, se: Math.sqrt(Math.max(0, r.sumSquares / r.count - p * p) / r.count) };
    };
    const a = est(explicit);
    const b = est(mixed);
    expect(mixed.hits).toBeGreaterThan(2000);
    // Each condition's own failures are gathered too.
    expect(mixed.byCondition).toHaveLength(2);
    // Different draws (the set mixture picks a set, then a centre), so the two agree in distribution only.
    expect(Math.abs(a.p - b.p)).toBeLessThan(4 * Math.hypot(a.se, b.se));
    expect(b.se / b.p).toBeLessThan(0.05);
  });

  it.each([
    [16, 1e-6],
    [16, 1e-9],
    [64, 1e-6],
    [64, 1e-9],
  ])('high sigma, N = %i, wrong selection %s: importance sampling agrees with Bechhofer within its 95 percent interval (V_T mismatch only: the lead is exactly linear)', async (cells, failure) => {
    // With A_beta ~ 0 the lead is max_j (dV_T1 - dV_Tj) in any inversion, so Bechhofer's form is exact.
    const base = selector(cells, 1, 1e-3, { abeta: 1e-12 });
    const d = { ...base, spec: { separation: separationFor(base, failure), instances: 1 } };
    const r = await estimateHighSigma(d, { seed: `tail-${cells}`, executor, relError: 0.05 });
    expect(r.interval[0]).toBeLessThanOrEqual(failure);
    expect(r.interval[1]).toBeGreaterThanOrEqual(failure);
    expect(r.mirrorRegions).toBe(cells - 1);
    expect(r.designPoints).toHaveLength(1);
    // Linear boundary dV_T1 - dV_T2 = D: distance D / (sqrt2 sigma_c) (Hasofer & Lind 1974), solve tolerance 1e-9.
    const sc = linearisedSigma(compileStage(d));
    expect(Math.abs(r.designPoints[0]!.distance - d.spec.separation / (Math.SQRT2 * sc))).toBeLessThan(1e-6);
    expect(r.nonConverged).toBe(0);
  });

  it('size in weak inversion, V_T-dominated: the linearised solution is W L = A_VT^2 / (2 sigma_c^2) with sigma_c = D / tau (Pelgrom 1989 per device; Bechhofer 1954), to the 4-digit rounding', async () => {
    const d = selector(16, 1e-4, 6e-3, { w: 1e-6, l: 1e-6, abeta: 1e-12 });
    const failure = 1e-5;
    const r = await sizeDesign(d, { target: { kind: 'yield', yield: 1 - failure }, vary: 'input.area', seed: 'size', executor });
    const sc = 6e-3 / selectionSeparation(16, failure);
    const closed = n.avt ** 2 / (2 * sc * sc);
    const lin = r.linearised.pairs[0]!;
    // W and L are each rounded up to 4 significant digits: the area moves up by at most (1 + 1e-3)^2.
    expect(lin.gateArea / closed).toBeGreaterThanOrEqual(1 - 1e-9);
    expect(lin.gateArea / closed).toBeLessThanOrEqual((1 + 1e-3) ** 2);
    // The confirmation (importance sampling, exact model) may scale up by a few times its half-width.
    expect(r.confirmed.met).toBe(true);
    expect(r.result.pairs[0]!.gateArea / closed).toBeLessThan(1.15);
    expect(r.confirmed.method).toBe('importance-sampling');
  });
});

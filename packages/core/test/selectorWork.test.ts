/**
 * The cost of the N-input selector's node solve: residual evaluations (passes over the cells)
 * per sample, counted by the solve itself (takeSelectorEvaluations). Every answer is gated by
 * the residual test |t - 1| <= 1e-12 and refined by a last Newton step, so a worse start or a
 * Newton step of the wrong length changes how many passes the solve takes, not the required
 * lead (selectorReference.test.ts holds the answers). This file holds the work.
 *
 * Why a few passes: the solve starts at the node without mismatch and takes Newton steps on
 * ln(t), whose slope is 2 in weak inversion and 2 / sqrt(IC) in strong: from a start whose error
 * is first order in the mismatch it converges quadratically, in three to four passes. The
 * bounds are cost budgets (common practice, no source), set above the passes measured here on
 * the same fixed draws.
 */
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import { takeSelectorEvaluations } from '../src/stages/selector.js';
import { selectorDesign } from './designs.js';
import { draws } from './testDraws.js';

const COUNT = 4096;

/** Passes per sample over COUNT fixed draws, and the cells' inversion coefficient. */
function passesPerSample(cells: number, tail: number, seed: number): { passes: number; ic: number; nan: number } {
  const st = compileStage(selectorDesign(cells, tail));
  const dim = st.dimension;
  const rows = draws(dim, COUNT, seed);
  const u = new Float64Array(dim * COUNT);
  rows.forEach((r, j) => u.set(r, dim * j));
  const out = new Float64Array(COUNT);
  takeSelectorEvaluations();
  const nan = st.figures(u, COUNT, out, 0);
  return { passes: takeSelectorEvaluations() / COUNT, ic: st.operatingPoint[0]!.ic, nan };
}

describe('selector: node-solve passes per sample (cost budget)', () => {
  // Measured on these draws (seed 5): 3.000 passes per sample in weak inversion (IC 4.8e-4,
  // where ln(t) is linear in the node voltage and Newton lands on the node), 3.566 in moderate
  // (IC 0.48), 3.034 in strong (IC 480), 3.090 for 16 cells (IC 0.12), 3.736 for 2 cells
  // (IC 0.96: one competitor, so the figure's tying term is the only term and its slope is the
  // whole sum's; a Newton guard on their difference would refuse every step and cost 44 passes).
  // The budgets leave 5-7% of room; a converged solve takes at least one pass.
  it.each([
    [4, 1e-9, 1e-4, 1e-3, 3.15],
    [4, 1e-6, 0.1, 1, 3.8],
    [4, 1e-3, 100, 1000, 3.2],
    [16, 1e-6, 0.05, 0.5, 3.3],
    [2, 1e-6, 0.5, 2, 3.95],
  ])('%s cells, tail %s A: IC in [%s, %s], at most %s passes per sample', (cells, tail, icLo, icHi, budget) => {
    const r = passesPerSample(cells, tail, 5);
    expect(r.ic).toBeGreaterThan(icLo);
    expect(r.ic).toBeLessThan(icHi);
    expect(r.nan).toBe(0);
    expect(r.passes).toBeGreaterThanOrEqual(1);
    expect(r.passes).toBeLessThanOrEqual(budget);
  });

  it('counts every pass of every call and resets when read', () => {
    const st = compileStage(selectorDesign(4, 1e-6));
    takeSelectorEvaluations();
    st.figures(new Float64Array(st.dimension), 1, new Float64Array(1), 0);
    const one = takeSelectorEvaluations();
    // The same sample twice in one call costs twice the passes of one; the second read is 0.
    st.figures(new Float64Array(2 * st.dimension), 2, new Float64Array(2), 0);
    expect(one).toBeGreaterThanOrEqual(1);
    expect(takeSelectorEvaluations()).toBe(2 * one);
    expect(takeSelectorEvaluations()).toBe(0);
  });
});

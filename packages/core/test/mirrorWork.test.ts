/**
 * The cost of the five-transistor stage's balance solve: Newton rounds per sample, counted by the
 * solve itself (takeMirrorRounds). Every answer of the solve is gated by its residual test, so a
 * worse first guess, a refused Taylor step or a wrong slope changes how many rounds it takes,
 * not the offset (the reference tests in mirrorSolve.test.ts hold the answers). This file holds
 * the work, which the speed of a run rests on: each sample pays one round of expm1/log1p calls
 * and its Newton step, and a second round only when the step from the first guess is too long
 * for the Taylor update of the load's root (mirror.ts, newtonStep).
 *
 * Why about one round: the first guess solves the balance with the load's root linearised in
 * d/2, L4 ~ s - gamma d/2, so its error is second order in the mismatch; one Newton step from
 * there leaves an error of the order of the square of that, which the Taylor update accepts.
 * The bounds are cost budgets (common practice, no source), set above the rounds measured here
 * on the same fixed draws: a mutant that spoils the guess or refuses the Taylor step sends most
 * samples to a second round and fails them.
 */
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { takeMirrorRounds } from '../src/stages/mirror.js';
import { mirrorDesign } from './designs.js';
import { draws } from './testDraws.js';

const COUNT = 8192;
const BLOCK = 1024;

/** Rounds per sample over COUNT fixed draws, in blocks as a run computes them. */
function roundsPerSample(design: Design, seed: number): { rounds: number; ic3: number; nan: number } {
  const st = compileStage(design);
  const rows = draws(8, COUNT, seed);
  const u = new Float64Array(8 * BLOCK);
  const out = new Float64Array(BLOCK);
  takeMirrorRounds();
  let nan = 0;
  for (let start = 0; start < COUNT; start += BLOCK) {
    for (let j = 0; j < BLOCK; j++) u.set(rows[start + j]!, 8 * j);
    nan += st.figures(u, BLOCK, out, 0);
  }
  return { rounds: takeMirrorRounds() / COUNT, ic3: st.operatingPoint[2]!.ic, nan };
}

describe('mirror stage: Newton rounds per sample (cost budget)', () => {
  // Measured on these draws (seed 7): 1.842 rounds per sample in weak inversion (IC3 = 0.015,
  // where d/2 of a few tenths makes the linearised root's second-order error large enough that
  // 84% of samples take a second round), 1.019 in moderate inversion (IC3 = 15, 2% take a
  // second round), 1.000 in strong inversion (IC3 = 3079). The budgets leave 6%, 8% and 2% of
  // room; a sample can never take fewer than one round.
  it.each([
    ['weak inversion', 1e-8, 0.01, 0.1, 1.95],
    ['moderate inversion', 10e-6, 10, 20, 1.1],
    ['strong inversion', 2e-3, 1000, 5000, 1.02],
  ])('%s (tail %s A): IC3 in [%s, %s], at most %s rounds per sample', (_n, tail, icLo, icHi, budget) => {
    const r = roundsPerSample({ ...mirrorDesign, tail } as Design, 7);
    expect(r.ic3).toBeGreaterThan(icLo);
    expect(r.ic3).toBeLessThan(icHi);
    expect(r.nan).toBe(0);
    expect(r.rounds).toBeGreaterThanOrEqual(1);
    expect(r.rounds).toBeLessThanOrEqual(budget);
  });

  it('counts the rounds of every call, block by block, and resets when read', () => {
    // One block of one sample at the design's own point (all draws 0): the first guess is the
    // balance without mismatch, so one round; read twice, the second read is 0.
    const st = compileStage(mirrorDesign);
    takeMirrorRounds();
    st.figures(new Float64Array(8), 1, new Float64Array(1), 0);
    st.figures(new Float64Array(16), 2, new Float64Array(2), 0);
    expect(takeMirrorRounds()).toBe(3);
    expect(takeMirrorRounds()).toBe(0);
  });
});

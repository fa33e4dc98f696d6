/**
 * The five-transistor stage's balance solve at extreme invented designs and draws (random
 * geometries, draws up to 200 sigma), against an independent 60-digit solve of the model's
 * definition: test/fixtures/mirror_solve_reference.py (bisection in ln s of
 * a3 s^2 + a4 L4(s)^2 = 1, EKV 1995 laws) and its output test/fixtures/mirror-solve-reference.json.
 * The cases reach the solver's rare paths: a load M4 carrying from 1e-22 of the tail to all of
 * it, M3 at sqrt(IC3) from 1e-127 to 190 (the log-domain step above 30, with M4's overdrive
 * either side of zero), pairs far from balance in strong inversion (|sqrt IC1 - sqrt IC2| up
 * to 6300, beyond the range of expm1) and in moderate inversion; one batch of twelve.
 *
 * Tolerance, per draw: the solve stops at |a3 s^2 + a4 L4^2 - 1| <= 1e-12, which leaves each
 * side's root sqrt(IC_k) within about 1e-12 / (its share of the tail) of itself where that
 * side carries the balance, and L4 within its own evaluation (1e-14) where it does not; 1e-11
 * of each root covers both with a factor 10. Through the EKV inverse (s v'(s) = 2 s e^s /
 * (e^s - 1) <= 2 (1 + s)) that moves Vos by at most n U_T * 2 (2 + s1 + s2) * 1e-11, plus
 * the rounding of Vos itself (1e-14 of it, from a dozen operations). Seen: 2e-13 of Vos at most.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';

interface Solved {
  vos: number;
  s: number;
  s1: number;
  s2: number;
  i4: number;
  y: number;
}
interface Row {
  case: string;
  design: Pick<Design, 'tail' | 'input' | 'process'> & { load: { polarity: 'n' | 'p'; w: number; l: number } };
  draws: number[][];
  solved: Solved[];
}
const fixture = new URL('../../../test/fixtures/mirror-solve-reference.json', import.meta.url);
const { rows } = JSON.parse(readFileSync(fixture, 'utf8')) as { rows: Row[] };
const byCase = (name: string): Row => rows.find((r) => r.case === name)!;

const stageOf = (r: Row) =>
  compileStage({ name: `${r.case} (invented)`, temperature: 300, topology: 'mirror', spec: { offset: 1e-2, instances: 1 }, ...r.design } as Design);

/** The bound derived above, V. */
function bound(st: ReturnType<typeof stageOf>, x: Solved): number {
  const nut = st.design.process[st.design.input.polarity]!.slope * st.thermalVoltage;
  return nut * 2 * (2 + x.s1 + x.s2) * 1e-11 + 1e-14 * Math.abs(x.vos);
}

/** Every draw of a case, one at a time and as one batch. */
function check(r: Row): { single: number[]; batch: number[] } {
  const st = stageOf(r);
  const n = r.draws.length;
  const u = Float64Array.from(r.draws.flat());
  const batch = new Float64Array(n);
  st.figures(u, n, batch, 0);
  const single = r.draws.map((_, i) => st.figure(u, 8 * i));
  for (let i = 0; i < n; i++) {
    const x = r.solved[i]!;
    for (const got of [single[i]!, batch[i]!]) expect(Math.abs(got - x.vos)).toBeLessThanOrEqual(bound(st, x));
  }
  return { single, batch: Array.from(batch) };
}

describe('mirror balance at extreme designs and draws (reference: 60-digit solve of the definition)', () => {
  it('a batch of twelve in weak inversion with M4 carrying 0.4% to 99% of the tail, alone and batched', () => {
    const r = byCase('case2');
    expect(Math.min(...r.solved.map((x) => x.i4))).toBeLessThan(0.01);
    expect(Math.max(...r.solved.map((x) => x.i4))).toBeGreaterThan(0.98);
    check(r);
  });

  it('M4 carrying 1e-22 to 2e-6 of the tail: L4 is not held by the balance residual', () => {
    const r = byCase('case3');
    expect(Math.max(...r.solved.map((x) => x.i4))).toBeLessThan(1e-5);
    check(r);
  });

  it('the load in the log domain (sqrt IC3 > 30), M4 below zero overdrive at the root (the softplus of y <= 0)', () => {
    const r = byCase('case103');
    expect(r.solved.every((x) => x.s > 30 && x.y < 0)).toBe(true);
    check(r);
  });

  it('pairs far from balance: sqrt IC1 - sqrt IC2 beyond expm1 (> 709) and below -200', () => {
    const far = byCase('case14');
    expect(far.solved[0]!.s1 - far.solved[0]!.s2).toBeGreaterThan(709);
    check(far);
    const moderate = byCase('case6');
    expect(Math.min(moderate.solved[1]!.s1, moderate.solved[1]!.s2)).toBeGreaterThan(1);
    expect(moderate.solved[1]!.s1 - moderate.solved[1]!.s2).toBeLessThan(-200);
    check(moderate);
  });

  it('near balance in strong inversion with the load in moderate inversion', () => {
    check(byCase('case86'));
  });

  it('M3 at sqrt IC3 = 1e-53 .. 1e-127 (M4 carries all of the tail): the value or NaN, never a wrong number', () => {
    const r = byCase('case39');
    const st = stageOf(r);
    const u = Float64Array.from(r.draws.flat());
    // Draw 1 (sqrt IC3 = 1.2e-53): bisection alone would need log2(hi / s) = 175 halvings to
    // reach the root before any digit of it, Newton's steps from the first guess none; it must converge.
    expect(r.solved[1]!.s).toBeLessThan(1e-50);
    const x = r.solved[1]!;
    expect(Math.abs(st.figure(u, 8) - x.vos)).toBeLessThanOrEqual(bound(st, x));
    // Draws 0 and 2 (sqrt IC3 = 5.5e-127, 2.1e-86): a solve that stops at the round cap must
    // report NaN (non-converged), never the unconverged value.
    for (const i of [0, 2]) {
      const got = st.figure(u, 8 * i);
      const y = r.solved[i]!;
      if (!Number.isNaN(got)) expect(Math.abs(got - y.vos)).toBeLessThanOrEqual(bound(st, y));
    }
  });
});

/**
 * The selector (winner-take-all) stage against an independent high-precision solve of the same
 * model: test/fixtures/selector-reference.py (mpmath, 60 digits) writes, for invented designs and
 * fixed draws, each cell's current at given gates (the common source found by plain bisection of
 * sum_j I_Sj F((V_Gj - V_Tj - n V_S) / (n U_T)) = I_B, F the EKV forward current of Enz,
 * Krummenacher & Vittoz, AICSP 8, 1995) and the required lead (bisected on the sign of
 * I_1 - max_j I_j, the figure's definition) with, for four cells, the pairwise leads. The script
 * shares no code with the library: no change of variable, no Newton step, no tie formula. Re-run
 * it to regenerate test/fixtures/selector-reference.json.
 *
 * The stage's solve stops at a relative residual of 1e-12 and then takes one more Newton step
 * without a new evaluation, so its root is claimed exact to the rounding of the sums; these
 * tolerances are rounding bounds, far below the 1e-12 of the stopping test.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { cellCurrents } from '../src/stages/selector.js';
import { demoProcess } from './designs.js';

interface CurrentCase {
  name: string;
  cells: number;
  tail: number;
  w: number;
  l: number;
  samples: { gates: number[]; u: number[]; currents: number[] }[];
}
interface LeadCase {
  name: string;
  cells: number;
  tail: number;
  w: number;
  l: number;
  abeta: number;
  samples: { u: number[]; lead: number; pairwise?: number[] }[];
}
const ref = JSON.parse(readFileSync(new URL('../../../test/fixtures/selector-reference.json', import.meta.url), 'utf8')) as {
  process: { slope: number; kp: number; avt: number; abeta: number };
  temperature: number;
  currents: CurrentCase[];
  leads: LeadCase[];
};

function selector(c: { cells: number; tail: number; w: number; l: number }, abeta: number = demoProcess.n.abeta): Design {
  return {
    name: 'test selector (invented)',
    temperature: ref.temperature,
    topology: 'selector',
    cells: c.cells,
    tail: c.tail,
    input: { polarity: 'n', w: c.w, l: c.l },
    process: { n: { ...demoProcess.n, abeta } },
    spec: { separation: 10e-3, instances: 1 },
  };
}

const byName = <T extends { name: string }>(rows: T[], prefix: string): T => {
  const row = rows.find((r) => r.name.startsWith(prefix));
  if (row === undefined) throw new Error(`fixture case ${prefix} missing`);
  return row;
};

it('the fixture was computed for the demo n process of these tests at 300 K', () => {
  const { slope, kp, avt, abeta } = demoProcess.n;
  expect(ref.process).toEqual({ slope, kp, avt, abeta });
  expect(ref.temperature).toBe(300);
});

describe('cellCurrents against the 60-digit bisection of the node', () => {
  // A current is I_Sj l^2 with l = softplus(x), x = y - h_j the cell's drive in half-units of
  // n U_T, so dI/I = 2 (logistic(x) / softplus(x)) dx <= 2 dx. x is the difference of two
  // doubles of magnitude |y|, |h_j| <= 16 here (|y| is about 11.5 in the weakest case, and above
  // 1 the ratio logistic/softplus falls as 1/x, e.g. 1/775 in the strongest), each within 1 ulp
  // of its exact value: dx <= 2 ulp(16) = 7.1e-15, so 1.5e-14 of the current; 2e-14 with the
  // roundings of I_Sj and of the sum (seen: 2.7e-15). An unrefined root (residual up to 1e-12)
  // moves the currents by up to 1e-12.
  it.each([['weak: IC 1e-10'], ['weak-moderate'], ['moderate'], ['strong'], ['very strong']])('%s: every current within 2e-14 relative', (prefix) => {
    const c = byName(ref.currents, prefix);
    const d = selector(c);
    for (const s of c.samples) {
      const got = cellCurrents(d, s.gates, Float64Array.from(s.u));
      s.currents.forEach((want, j) => expect(Math.abs(got[j]! / want - 1)).toBeLessThanOrEqual(2e-14));
    }
  });

  // The currents depend only on the gates' differences (the common source follows a common
  // shift by 1/n of it), but a shift of 100 V puts y and h_j near 1490 (100 V / (2 n U_T)),
  // where 2 ulp(2048) = 4.5e-13: 1e-12 of the current by the bound above (seen: 3.1e-13). From
  // its start at the balance point the solve must walk the whole 1490 in y to find the node.
  it.each([['gates 100 V below'], ['gates 100 V above']])('%s the reference: every current within 1e-12 relative', (prefix) => {
    const c = byName(ref.currents, prefix);
    const d = selector(c);
    for (const s of c.samples) {
      const got = cellCurrents(d, s.gates, Float64Array.from(s.u));
      s.currents.forEach((want, j) => expect(Math.abs(got[j]! / want - 1)).toBeLessThanOrEqual(1e-12));
    }
  });

  // 1000 V above: y and h_j near 14900, 2 ulp(16384) = 7.3e-12, so 1.5e-11 of the current; 2e-11.
  // The node lies 930 steps of the open bracket search below the start: only the Newton steps
  // (which jump to it in a few iterations) reach it within the 200-iteration cap.
  it('gates 1000 V above the reference: every current within 2e-11 relative', () => {
    const c = byName(ref.currents, 'gates 1000 V above');
    const d = selector(c);
    for (const s of c.samples) {
      const got = cellCurrents(d, s.gates, Float64Array.from(s.u));
      s.currents.forEach((want, j) => expect(Math.abs(got[j]! / want - 1)).toBeLessThanOrEqual(2e-11));
    }
  });
});

describe('the required lead against the bisection of I_1 - max_j I_j', () => {
  // L = sigma_VT (u_1 - u_k) + n U_T [v(s_1^2) - v(s_k^2)], v the EKV inverse: the first term is
  // exact to 1e-18 V (|L| < 0.1 V); each v carries a few ulp of itself. In weak inversion the
  // difference is formed as 2 ln(s_1/s_k) + a series, exact to about 1e-17 of v1 - v2 ~ 0.05;
  // at IC 2 each v is about 2 (2 ulp: 9e-16), at IC 900 about 60 (2 ulp(64) = 2.8e-14), two of
  // them times n U_T = 33.6 mV: 1e-17 V, 1e-16 V and 2e-15 V (seen: 4e-19, 1.8e-17, 2.3e-16 V).
  // The lead moves with the tying cell's root s_k as n U_T (phi(s_1) - phi(s_k)) ds_k / s_k,
  // phi(s) = 2 s e^s / (e^s - 1), about 0.1 V per unit relative change at IC 900 with 5%
  // current-factor mismatch: an unrefined root (relative error up to 5e-13) shows as 5e-14 V.
  it.each([
    ['weak', 1e-17],
    ['moderate', 1e-16],
    ['strong', 2e-15],
    // N = 2, the simple pair's case (the tie current is I_B / 2): the same bound as for three cells.
    ['two cells, strong', 2e-15],
  ])('%s: the lead within %s V', (prefix, tol) => {
    const c = byName(ref.leads, prefix);
    const st = compileStage(selector(c, c.abeta));
    for (const s of c.samples) expect(Math.abs(st.figure(Float64Array.from(s.u), 0) - s.lead)).toBeLessThanOrEqual(tol);
  });

  it('moderate, four cells: the lead at which M1 ties with M2, M3, M4 alone, each within 1e-16 V (same bound)', () => {
    const c = byName(ref.leads, 'moderate');
    const st = compileStage(selector(c, c.abeta));
    const parts = st.failureComponents(10e-3);
    for (const s of c.samples) {
      const u = Float64Array.from(s.u);
      s.pairwise!.forEach((want, k) => expect(Math.abs(parts[k]!.evaluate(u, 0) - want)).toBeLessThanOrEqual(1e-16));
    }
  });
});

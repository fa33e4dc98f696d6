/**
 * The selector (winner-take-all) stage at the edges its lead tests do not reach: names and roles,
 * the first-order coefficients with correlated draws, the symmetry and law it declares, the
 * response it offers, figure() at an offset into the draws, the NaN of an underflowed cell,
 * cellCurrents' argument check, and the cell currents themselves in strong inversion against the
 * EKV law. References, by hand: at the common source every cell sees the same V_S, so with no
 * mismatch v_j - v_k = (V_Gj - V_Gk)/(n U_T) for the EKV inverse v = 2 ln(e^{sqrt IC} - 1)
 * (Enz, Krummenacher & Vittoz, AICSP 8, 1995), and the currents sum to I_B; the first-order
 * coefficient of cell 1 is dV_T1 - (I_D/gm) dbeta_1/beta_1 at I_B/N per cell, with
 * z = rho u_vt + sqrt(1 - rho^2) u_beta and per-device sigmas A / sqrt(2 W L) (Pelgrom 1989).
 * Designs are invented.
 */
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { ekvInverse, specificCurrent } from '../src/ekv.js';
import { cellCurrents, SELECTOR_STAGE } from '../src/stages/selector.js';
import { bruteLead } from './selectorBrute.js';
import { demoProcess, selectorDesign } from './designs.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const thermal = (t: number): number => (1.380649e-23 * t) / 1.602176634e-19;

/** The selector tests' design (test/designs.ts), with the n devices' V_T-current-factor correlation rho. */
function selector(cells: number, tail: number, rho = 0): Design {
  return { ...selectorDesign(cells, tail), process: { n: { ...demoProcess.n, rho } } };
}

describe('selector: what it reports', () => {
  it('two cells: M1 and M2; sixteen: M1 and M2..M16, all of role input', () => {
    const two = compileStage(selector(2, 10e-6));
    const many = compileStage(selector(16, 10e-6));
    expect(two.operatingPoint.map((o) => `${o.device}/${o.role}`)).toEqual(['M1/input', 'M2/input']);
    expect(many.operatingPoint.map((o) => `${o.device}/${o.role}`)).toEqual(['M1/input', 'M2..M16/input']);
    expect(many.variables.map((v) => v.device)).toEqual(Array.from({ length: 16 }, (_, j) => [`M${j + 1}`, `M${j + 1}`]).flat());
    expect(new Set(many.variables.map((v) => v.role))).toEqual(new Set(['input']));
    // Each cell carries I_B / N at the tie.
    expect(rel(many.operatingPoint[0]!.current, 10e-6 / 16)).toBeLessThan(1e-15);
  });
  it('rho = 0.6: d(lead)/du_vt1 = sigma_VT - (I_D/gm) 0.6 sigma_beta, d/du_beta1 = -(I_D/gm) 0.8 sigma_beta (1e-12: rounding)', () => {
    const st = compileStage(selector(8, 8e-6, 0.6));
    const area = 16e-12;
    const sVt = 5e-9 / Math.sqrt(2 * area);
    const sBeta = 1e-8 / Math.sqrt(2 * area);
    const idOverGm = 1 / st.operatingPoint[0]!.gmOverId;
    expect(rel(st.sensitivities[0]!, sVt - idOverGm * 0.6 * sBeta)).toBeLessThan(1e-12);
    expect(rel(st.sensitivities[1]!, -idOverGm * 0.8 * sBeta)).toBeLessThan(1e-12);
    expect(Array.from(st.sensitivities.subarray(2))).toEqual(new Array(14).fill(0));
  });
  it('declares the selection law over its cells, failure symmetry in groups of two draws, and the winner\'s share against the lead', () => {
    const st = compileStage(selector(8, 8e-6));
    expect(st.linearisedLaw).toEqual({ kind: 'selection', populations: 8 });
    expect(st.failureSymmetry).toEqual({ groupSize: 2 });
    expect([st.response!.label, st.response!.input]).toEqual(["winner's share of the tail", 'lead']);
    // No mismatch, no lead: every cell carries I_B / 8.
    expect(rel(st.response!.evaluate(new Float64Array(16), 0, 0), 1 / 8)).toBeLessThan(1e-11);
  });
  it('a geometry warning names the cells by their field, input (the rule: within 2x of the drawn minimum, common practice, no source)', () => {
    const d: Design = { ...selector(4, 4e-6), input: { polarity: 'n', w: 1.5e-6, l: 4e-6 }, process: { n: { ...demoProcess.n, minW: 1e-6, minL: 1e-6 } } };
    expect(compileStage(d).warnings.filter((x) => x.includes('within 2x'))).toEqual([
      'input.w is within 2x of the process minimum width: the area law may underestimate mismatch of narrow devices',
    ]);
  });
});

describe('selector: evaluation edges', () => {
  const st = compileStage(selector(4, 4e-6));
  it('figure(u, base) reads the sample at base, as figures() does', () => {
    const a = Float64Array.of(1, 0, 0, 0, 0, 0, 0, 0);
    const b = Float64Array.of(0, 0, 2, 0, 0, 0, 0, 0);
    const both = new Float64Array(16);
    both.set(a, 0);
    both.set(b, 8);
    expect(st.figure(both, 8)).toBe(st.figure(b, 0));
    expect(st.figure(both, 0)).toBe(st.figure(a, 0));
    expect(st.figure(both, 8)).not.toBe(st.figure(both, 0));
  });
  it('cell 1 with a current factor so small that its sqrt(IC) underflows has no finite lead: NaN', () => {
    const u = new Float64Array(8);
    u[1] = 1600 / st.operatingPoint[0]!.sigmaBeta;
    expect(st.figure(u, 0)).toBeNaN();
  });
  it('cellCurrents refuses a wrong number of gates or draws, naming both counts', () => {
    const d = selector(4, 4e-6);
    expect(() => cellCurrents(d, [0, 0, 0])).toThrow(/^cellCurrents: need 4 gate voltages and 8 draws$/);
    expect(() => cellCurrents(d, [0, 0, 0, 0], new Float64Array(7))).toThrow(/^cellCurrents: need 4 gate voltages and 8 draws$/);
    expect(() => cellCurrents(d, [0, 0, 0, 0], new Float64Array(8))).not.toThrow();
  });
  it('a design that skipped validation without cells is an internal error, named', () => {
    const d = { ...selector(4, 4e-6), cells: undefined } as unknown as Design;
    expect(() => SELECTOR_STAGE.compile(d)).toThrow(/^internal: cells missing after validation$/);
  });
});

describe('selector: cell currents against the EKV law (no mismatch)', () => {
  // 2 mA over three 4/4 um cells: the leading cells in strong inversion (IC in the thousands),
  // the last 5 V below the first, deep in weak inversion (v about 150 lower).
  const d = selector(3, 2e-3);
  const gates = [0.2, 0, -5];
  const i = cellCurrents(d, gates);
  const p = demoProcess.n;
  const ut = thermal(300);
  const is = 2 * p.slope * p.kp * 1 * ut * ut;
  it('they sum to the tail (1e-11: the solve stops at a relative residual of 1e-12)', () => {
    expect(rel(i[0]! + i[1]! + i[2]!, 2e-3)).toBeLessThan(1e-11);
    expect(i[0]! / is).toBeGreaterThan(100);
    expect(i[2]! / is).toBeLessThan(1e-3);
  });
  it.each([1, 2])('v_1 - v_%i = (V_G1 - V_Gj)/(n U_T) (1e-9 absolute in v: the 1e-12 residual and the logs of small IC)', (j) => {
    expect(Math.abs(ekvInverse(i[0]! / is) - ekvInverse(i[j]! / is) - (gates[0]! - gates[j]!) / (p.slope * ut))).toBeLessThan(1e-9);
  });
});

describe('selector: bias points at the edges of the node solve', () => {
  const ut = thermal(300);
  const p = demoProcess.n;
  const is = specificCurrent(p.slope, p.kp, 4e-6, 4e-6, ut);

  it('every cell at the pinch-off point V_P = V_S (IC = ln^2 2 per cell, v = 0: F(0) = ln^2 2, Enz et al. 1995): I_B/N each, lead 0, and the brute-force lead with mismatch', () => {
    const cells = 4;
    const d = selector(cells, cells * is * Math.LN2 * Math.LN2);
    const st = compileStage(d);
    // No mismatch: each cell at I_B/N by symmetry; 1e-15 is a few roundings of the sum.
    for (const c of cellCurrents(d, [0, 0, 0, 0])) expect(rel(c, d.tail! / cells)).toBeLessThan(1e-15);
    expect(st.figure(new Float64Array(2 * cells), 0)).toBe(0);
    // With mismatch: the brute force of selectorBrute.ts bisects V_S and the lead to ~1e-14 V;
    // 1e-10 V as in selector.test.ts.
    const u = Float64Array.of(0.7, -1.2, -0.4, 0.3, 1.5, -0.8, -1.1, 2.0);
    expect(Math.abs(st.figure(u, 0) - bruteLead(d, u))).toBeLessThan(1e-10);
  });

  it('a cell with a current factor near the largest double (e^682.7, so 2 a_j overflows) but its gate 60 V below the rest carries nothing: the others share the tail as the three cells alone', () => {
    // Its current is at most I_S e^{682.7} F(-1800) = I_S e^{682.7 - 1800}, about e^{-1130} A:
    // nothing. The tail of 1e-18 A (the smallest accepted) puts a_j = I_Sj / I_B at 1.6e308
    // (the overflow of 2 a_j makes the solve's slope NaN, so the solve bisects alone), and
    // the three live gates 20 mV above the reference put the node below the solve's start (the
    // balance of four cells at 0 V), so the bracket search first steps down.
    const tail = 1e-18;
    const sB = 1e-8 / Math.sqrt(2 * 16e-12);
    const far = 682.7 / sB;
    const u4 = Float64Array.of(0.3, 0.5, -0.6, -0.2, 1.1, 0.4, 0, far);
    const four = cellCurrents(selector(4, tail), [0.02, 0.021, 0.019, -60], u4);
    const three = cellCurrents(selector(3, tail), [0.02, 0.021, 0.019], u4.subarray(0, 6));
    expect(four[3]).toBe(0);
    // Each solve stops within a relative residual of 1e-12, the bisection without the final
    // Newton refinement (its slope is NaN): in weak inversion a current moves as the residual,
    // so 1e-12 each; 2e-12 for the two solves.
    for (let j = 0; j < 3; j++) expect(rel(four[j]!, three[j]!)).toBeLessThan(2e-12);
  });
});

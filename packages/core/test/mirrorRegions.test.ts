/**
 * The five-transistor stage where the input pair's two sides sit in different formula regions
 * of v1 - v2: one side above sqrt(IC) = 1 and one below, and both far in strong inversion with a
 * split |sqrt(IC1) - sqrt(IC2)| beyond the small-split polynomial. Reference: an independent
 * bisection of the balance from its definition (M3, the diode, carries I1; M4 at the same V_GS
 * carries I4 = I_S4 F(v(I1/I_S3) - (V_T4 - V_T3)/(n U_T)); I1 + I4 = I_B; EKV 1995, Enz,
 * Krummenacher & Vittoz, AICSP 8), then Vos = (V_T1 - V_T2) + n U_T (v(I1/I_S1) - v(I2/I_S2)).
 * Tolerance 1e-11 V: both solves stop at about 1e-12 of the current, which moves Vos by
 * n U_T * 2e-12 < 1e-13 V; 1e-11 leaves room for the rounding of the logs. Designs are invented.
 */
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { EXPM1_SMALL_LIMIT } from '../src/expSmall.js';
import { mirrorBisection } from './mirrorBisection.js';
import { mirrorDesign } from './designs.js';

/** Vos by bisection, and the pair's sqrt(IC1), sqrt(IC2) at the balance (mirrorBisection.ts). */
const reference = mirrorBisection;

// sigma(dbeta/beta) of the input pair: 1 %um / sqrt(2 * 2 um^2) = 0.5 % per unit draw.
const draw = (uBeta1: number, uBeta2: number, uVt1 = 0.5): Float64Array => Float64Array.of(uVt1, uBeta1, 0, uBeta2, 0.3, 0.2, -0.4, 0.1);

describe('mirror stage, the pair across formula regions (reference: bisection of the balance, 1e-11 V)', () => {
  it.each([
    ['sqrt(IC1) about 3, sqrt(IC2) below 1', -450, 0, (s1: number, s2: number) => s1 > 2.5 && s2 <= 1],
    ['sqrt(IC1) below 1, sqrt(IC2) about 3', 0, -450, (s1: number, s2: number) => s1 <= 1 && s2 > 2.5],
  ])('moderate inversion (sqrt(IC) about 1 without mismatch), %s', (_n, b1, b2, region) => {
    const st = compileStage({ ...mirrorDesign, tail: 2e-6 } as Design);
    const u = draw(b1, b2);
    const ref = reference(st, u);
    expect(region(ref.s1, ref.s2)).toBe(true);
    expect(Math.abs(st.figure(u, 0) - ref.vos)).toBeLessThan(1e-11);
  });
  it.each([
    ['sqrt(IC1) - sqrt(IC2) about -3', 40, 0, -1],
    ['sqrt(IC1) - sqrt(IC2) about +3', 0, 40, 1],
  ])('strong inversion (sqrt(IC) about 31), %s: beyond the small-split range', (_n, b1, b2, sideSign) => {
    const st = compileStage({ ...mirrorDesign, tail: 2e-3 } as Design);
    const u = draw(b1, b2);
    const ref = reference(st, u);
    expect(Math.min(ref.s1, ref.s2)).toBeGreaterThan(25);
    expect(Math.sign(ref.s1 - ref.s2)).toBe(sideSign);
    expect(Math.abs(ref.s1 - ref.s2)).toBeGreaterThan(4 * EXPM1_SMALL_LIMIT);
    expect(Math.abs(st.figure(u, 0) - ref.vos)).toBeLessThan(1e-11);
  });
  it('figures() fills exactly `count` results and counts only their NaNs', () => {
    const st = compileStage(mirrorDesign);
    const u = new Float64Array(16);
    u.set(draw(1, -1), 0);
    u.set(draw(-1, 1), 8);
    const out = new Float64Array(4).fill(7);
    expect(st.figures(u, 2, out, 1)).toBe(0);
    expect(Math.abs(out[1]! - reference(st, u.subarray(0, 8)).vos)).toBeLessThan(1e-11);
    expect(Math.abs(out[2]! - reference(st, u.subarray(8, 16)).vos)).toBeLessThan(1e-11);
    expect([out[0], out[3]]).toEqual([7, 7]);
  });
});

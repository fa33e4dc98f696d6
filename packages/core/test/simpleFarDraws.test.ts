/**
 * The simple stage at current-factor draws far outside the near-balance series (|x_i| > 1/32,
 * x_i = -z_beta,i / 2), where the stage must take the closed form. Reference, computed here from
 * the EKV inverse (Enz, Krummenacher & Vittoz, AICSP 8:83-114, 1995) applied to each side at
 * I_B/2: IC_i = IC_0 e^{-z_i}, v(IC) = 2 ln(e^{sqrt IC} - 1), and
 * Vos = sigma_VT (u_vt1 - u_vt2) + n U_T (v(IC_1) - v(IC_2)), per-device sigma_VT = A_VT / sqrt(2 W L)
 * (Pelgrom, Duinmaijer & Welbers, IEEE JSSC 24(5), 1989, one draw per device). The design is
 * invented, in weak-to-moderate inversion (IC_0 about 0.24, sqrt(IC_0) about 0.49), where the
 * near-balance series is defined; at |x| = 2 that series, cut at degree 10, is off by about 5e-4
 * of v1 - v2, so a stage that used it there would fail the 1e-12 tolerance below.
 */
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { demoProcess, simpleDesign } from './designs.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const thermal = (t: number): number => (1.380649e-23 * t) / 1.602176634e-19;

const weakDesign: Design = { ...simpleDesign, name: 'test simple, weak inversion (invented)', tail: 0.5e-6 };

function reference(u: readonly number[]): number {
  const p = demoProcess.n;
  const { w, l } = weakDesign.input;
  const ut = thermal(weakDesign.temperature);
  const is = 2 * p.slope * p.kp * (w / l) * ut * ut;
  const ic0 = weakDesign.tail! / 2 / is;
  const sVt = p.avt / Math.sqrt(2 * w * l);
  const sBeta = p.abeta / Math.sqrt(2 * w * l); // rho = 0: z = sigma_beta u_beta
  const v = (ic: number): number => 2 * Math.log(Math.expm1(Math.sqrt(ic)));
  const ic1 = ic0 * Math.exp(-sBeta * u[1]!);
  const ic2 = ic0 * Math.exp(-sBeta * u[3]!);
  return sVt * (u[0]! - u[2]!) + p.slope * ut * (v(ic1) - v(ic2));
}

describe('simple stage, far current-factor draws: the closed form (1e-12 relative: rounding of a few logs of O(1) values)', () => {
  const st = compileStage(weakDesign);
  // sigma_beta = 1 %um / sqrt(2 * 2 um^2) = 0.5 %: u_beta = 800 is z = 4, x = -2.
  const cases: [string, number[]][] = [
    ['x1 = -2 (M1 in strong inversion), x2 = 0', [1, 800, -0.5, 0]],
    ['x1 = +2 (M1 deep in weak inversion), x2 = 0', [1, -800, -0.5, 0]],
    ['x1 = 0, x2 = -2', [1, 0, -0.5, 800]],
    ['x1 = 0, x2 = +2', [1, 0, -0.5, -800]],
    // Both sides at sqrt(IC) <= 1 but outside the series: the log of s1/s2 enters.
    ['x1 = +0.5, x2 = -0.3', [1, -200, -0.5, 120]],
  ];
  it.each(cases)('%s', (_name, u) => {
    const want = reference(u);
    expect(rel(st.figure(Float64Array.from(u), 0), want)).toBeLessThan(1e-12);
    const out = new Float64Array(1);
    expect(st.figures(Float64Array.from(u), 1, out, 0)).toBe(0);
    expect(rel(out[0]!, want)).toBeLessThan(1e-12);
  });
  it('a p pair (magnitudes) has the opposite sign', () => {
    const pDesign: Design = { ...weakDesign, input: { ...weakDesign.input, polarity: 'p' }, process: { p: demoProcess.n } };
    const u = [1, 800, -0.5, 0];
    expect(rel(compileStage(pDesign).figure(Float64Array.from(u), 0), -reference(u))).toBeLessThan(1e-12);
  });
});

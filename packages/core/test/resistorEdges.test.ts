/**
 * The resistor-loaded pair at the edges the balance tests do not reach: device names and the
 * voltage gain in its report, the batch form, the correlated (rho != 0) first-order coefficient,
 * and resistor draws so far out that e^{ln(R1/R2)} leaves the range of doubles. Reference, by
 * hand: I1 = I_B / (1 + R1/R2) (I1 R1 = I2 R2), so with d = ln(R1/R2) = sigma_R (u_R1 - u_R2),
 * ln(I1 / (I_B/2)) = ln 2 - ln(1 + e^d) = ln 2 - d - ln(1 + e^-d) and ln(I2/(I_B/2)) = that + d;
 * each side's EKV inverse (Enz, Krummenacher & Vittoz, AICSP 8, 1995) v = 2 ln(e^{sqrt IC} - 1);
 * Vos = n U_T (v1 - v2) at equal thresholds. Gain A_v = gm R (Razavi, Design of Analog CMOS
 * Integrated Circuits, 2nd ed., 2017, the resistively loaded pair). Designs are invented.
 */
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { demoProcess, resistorDesign } from './designs.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const thermal = (t: number): number => (1.380649e-23 * t) / 1.602176634e-19;

const sigmaR = 1e-8 / Math.sqrt(2 * 1e-6 * 5e-6);

/** Vos for a resistor split d = ln(R1/R2) alone (no device mismatch), by the formulas above. */
function splitOffset(d: number): number {
  const p = demoProcess.n;
  const ut = thermal(300);
  const is = 2 * p.slope * p.kp * 8 * ut * ut;
  const s0 = Math.sqrt(20e-6 / is);
  const softplus = d > 0 ? d + Math.log1p(Math.exp(-d)) : Math.log1p(Math.exp(d)); // ln(1 + e^d)
  const s1 = s0 * Math.exp(0.5 * (Math.LN2 - softplus));
  const s2 = s0 * Math.exp(0.5 * (Math.LN2 - softplus + d));
  // v = 2 ln(e^s - 1) = 2 (s + ln(1 - e^-s)) (the second form for large s).
  const v = (s: number): number => (s > 1 ? 2 * (s + Math.log1p(-Math.exp(-s))) : 2 * Math.log(Math.expm1(s)));
  return p.slope * ut * (v(s1) - v(s2));
}

describe('resistor-loaded pair: report fields', () => {
  const st = compileStage(resistorDesign);
  it('the input devices are M1 and M2 (role input); the load resistors R1, R2 (role load)', () => {
    expect(st.operatingPoint.map((o) => `${o.device}/${o.role}`)).toEqual(['M1/input', 'M2/input']);
    expect(st.variables.map((v) => `${v.device}/${v.role}`)).toEqual(['M1/input', 'M1/input', 'M2/input', 'M2/input', 'R1/load', 'R2/load']);
  });
  it('voltage gain gm R on each resistor (1e-15: one product), absent without r', () => {
    const gm = st.operatingPoint[0]!.gm;
    for (const r of st.resistors!) expect(rel(r.voltageGain!, gm * 20e3)).toBeLessThan(1e-15);
    for (const r of compileStage({ ...resistorDesign, load: { w: 1e-6, l: 5e-6 } }).resistors!) expect('voltageGain' in r).toBe(false);
  });
  it('rho != 0: dVos/du_vt1 = sigma_VT - (I_D/gm) sigma_beta rho (the V_T draw also moves beta; 1e-12: rounding)', () => {
    const c = compileStage({ ...resistorDesign, process: { n: { ...demoProcess.n, rho: 0.5 }, resistor: { ar: 1e-8 } } });
    const area = 8e-6 * 1e-6;
    const sVt = 5e-9 / Math.sqrt(2 * area);
    const sBeta = 1e-8 / Math.sqrt(2 * area);
    const idOverGm = 1 / c.operatingPoint[0]!.gmOverId;
    expect(rel(c.sensitivities[0]!, sVt - idOverGm * sBeta * 0.5)).toBeLessThan(1e-12);
    expect(rel(c.sensitivities[1]!, -idOverGm * sBeta * Math.sqrt(0.75))).toBeLessThan(1e-12);
    expect(rel(c.sensitivities[4]!, -idOverGm * sigmaR)).toBeLessThan(1e-12);
  });
});

describe('resistor-loaded pair: resistor splits beyond exp\'s range (log form; 1e-12 relative: rounding of a few logs)', () => {
  const st = compileStage(resistorDesign);
  it.each([
    ['d = +1000: all the tail in M2', 1000],
    ['d = -1000: all the tail in M1', -1000],
    ['d = +3: an ordinary split', 3],
    ['d = -3', -3],
  ])('%s', (_n, d) => {
    const u = Float64Array.of(0, 0, 0, 0, d / sigmaR, 0);
    const want = splitOffset(d);
    expect(Number.isFinite(want)).toBe(true);
    expect(rel(st.figure(u, 0), want)).toBeLessThan(1e-12);
  });
  it('d = +-3000: the starved side\'s sqrt(IC) underflows to 0, so there is no finite balance: NaN, counted by figures()', () => {
    const u = Float64Array.of(0, 0, 0, 0, 3000 / sigmaR, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, -3000 / sigmaR, 0);
    expect(Number.isNaN(st.figure(u, 0))).toBe(true);
    expect(Number.isNaN(st.figure(u, 12))).toBe(true);
    const out = new Float64Array(5).fill(7);
    // Three samples into out[1..3]: NaN, 0 (no mismatch), NaN; out[0] and out[4] untouched.
    expect(st.figures(u, 3, out, 1)).toBe(2);
    expect(Number.isNaN(out[1]!)).toBe(true);
    expect(out[2]).toBe(0);
    expect(Number.isNaN(out[3]!)).toBe(true);
    expect([out[0], out[4]]).toEqual([7, 7]);
  });
});

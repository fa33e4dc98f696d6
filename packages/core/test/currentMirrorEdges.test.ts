/**
 * The two-device current mirror at the edges its exact-error tests do not reach: device names and
 * roles, the batch form, threshold draws that push the output's v/2 beyond exp's range (where
 * L2 = ln(1 + e^{v2/2}) must be taken as v2/2 + ln(1 + e^{-v2/2})), an error too large for doubles,
 * the caution text, and the guard behind validation. Reference, by hand from the stage's closed
 * form (EKV 1995, Enz, Krummenacher & Vittoz, AICSP 8): with no current-factor mismatch,
 * v1 = 2 ln(e^{s0} - 1), v2/2 = v1/2 - (dV_T2 - dV_T1)/(2 n U_T), L2 = ln(1 + e^{v2/2}) and
 * e = (L2 / s0)^2 - 1. The design is invented.
 */
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { CURRENT_MIRROR_CAUTION, CURRENT_MIRROR_STAGE } from '../src/stages/currentMirror.js';
import { currentMirrorDesign as mirror, demoProcess } from './designs.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const thermal = (t: number): number => (1.380649e-23 * t) / 1.602176634e-19;

const p = demoProcess.n;
const ut = thermal(300);
const nut = p.slope * ut;
const s0 = Math.sqrt(10e-6 / (2 * p.slope * p.kp * 1 * ut * ut));
const sVtOut = p.avt / Math.sqrt(2 * 8e-6 * 4e-6);

/** u_vt2 that puts the output's v2/2 at y (no other draw). */
const uFor = (y: number): number => -(y - Math.log(Math.expm1(s0))) / ((0.5 * sVtOut) / nut);

describe('current mirror: edges', () => {
  const st = compileStage(mirror);
  it('M1 is the input (diode), M2 the output, in the operating point and the variables', () => {
    expect(st.operatingPoint.map((o) => `${o.device}/${o.role}`)).toEqual(['M1/input', 'M2/output']);
    expect(st.variables.map((v) => `${v.device}.${v.parameter}/${v.role}`)).toEqual(['M1.vt/input', 'M1.beta/input', 'M2.vt/output', 'M2.beta/output']);
  });
  it('v2/2 = 800 (beyond exp\'s range): L2 = 800 + ln(1 + e^-800) = 800, e = (800/s0)^2 - 1 (1e-12: rounding)', () => {
    const e = st.figure(Float64Array.of(0, 0, uFor(800), 0), 0);
    expect(rel(e, (800 / s0) ** 2 - 1)).toBeLessThan(1e-12);
  });
  it('v2/2 = 2: L2 = ln(1 + e^2) (1e-12)', () => {
    const e = st.figure(Float64Array.of(0, 0, uFor(2), 0), 0);
    expect(rel(e, (Math.log1p(Math.exp(2)) / s0) ** 2 - 1)).toBeLessThan(1e-12);
  });
  it('v2/2 = 1e160: the output current overflows doubles ((L2/s0)^2 > 1e308): NaN, counted by figures()', () => {
    const u = Float64Array.of(0, 0, uFor(1e160), 0, 0, 0, 0, 0, 0, 0, uFor(1e160), 0);
    expect(Number.isNaN(st.figure(u, 0))).toBe(true);
    const out = new Float64Array(5).fill(7);
    expect(st.figures(u, 3, out, 1)).toBe(2);
    expect(Number.isNaN(out[1]!)).toBe(true);
    // No mismatch: the output copies r I_in exactly (e = 0 to rounding of exp(2 (ln s0 - ln s0))).
    expect(Math.abs(out[2]!)).toBeLessThan(1e-15);
    expect(Number.isNaN(out[3]!)).toBe(true);
    expect([out[0], out[4]]).toEqual([7, 7]);
  });
  it('the caution names channel-length modulation and the drain voltage, and is the last warning', () => {
    expect(CURRENT_MIRROR_CAUTION).toMatch(/^the output device is taken at the diode's drain voltage: .*channel-length modulation adds a systematic current error/);
    expect(st.warnings[st.warnings.length - 1]).toBe(CURRENT_MIRROR_CAUTION);
  });
  it('a design that skipped validation without input.current is an internal error, named', () => {
    const noCurrent = { ...mirror, input: { polarity: 'n', w: 4e-6, l: 4e-6 } } as Design;
    expect(() => CURRENT_MIRROR_STAGE.compile(noCurrent)).toThrow(/^internal: input\.current missing after validation$/);
  });
});

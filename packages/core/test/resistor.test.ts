/**
 * The resistor-loaded pair (topology: resistor): its exact balance against an independent
 * bisection, its linearised sigma against the closed form, and the identity with the simple stage
 * when the resistors match. All designs are invented.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { ekvInverse, specificCurrent } from '../src/ekv.js';
import { linearisedSigma } from '../src/linearised.js';
import { pairSigma } from '../src/pelgrom.js';
import { parseDesign } from '../src/parse/parseDesign.js';
import { thermalVoltage } from '../src/thermal.js';
import { demoProcess, resistorDesign, simpleDesign } from './designs.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

const pInput: Design = { ...resistorDesign, input: { polarity: 'p', w: 8e-6, l: 1e-6 }, process: { p: demoProcess.p, resistor: { ar: 1e-8 } } };
const weak: Design = { ...resistorDesign, tail: 20e-9, input: { polarity: 'n', w: 20e-6, l: 2e-6 } };

/**
 * Vos by an independent route: bisect I1 R1 = (I_B - I1) R2 for I1, then each side's EKV inverse
 * v(I/I_S) (Enz, Krummenacher & Vittoz, AICSP 8, 1995), Vos = (V_T1 - V_T2) + n U_T (v1 - v2),
 * negated for a p pair (magnitudes). Draws as the stage documents them: log-normal beta and R.
 */
function bisectionOffset(d: Design, u: readonly number[]): number {
  const pol = d.input.polarity;
  const p = d.process[pol]!;
  const ut = thermalVoltage(d.temperature);
  const load = d['load'] as { w: number; l: number };
  const sVt = p.avt / Math.sqrt(2 * d.input.w * d.input.l);
  const sB = p.abeta / Math.sqrt(2 * d.input.w * d.input.l);
  const sR = d.process.resistor!.ar / Math.sqrt(2 * load.w * load.l);
  const is0 = specificCurrent(p.slope, p.kp, d.input.w, d.input.l, ut);
  const r1 = Math.exp(sR * u[4]!);
  const r2 = Math.exp(sR * u[5]!);
  const tail = d.tail!;
  let lo = 0;
  let hi = tail;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (mid * r1 - (tail - mid) * r2 < 0) lo = mid;
    else hi = mid;
  }
  const i1 = 0.5 * (lo + hi);
  const i2 = tail - i1;
  const v1 = ekvInverse(i1 / (is0 * Math.exp(sB * u[1]!)));
  const v2 = ekvInverse(i2 / (is0 * Math.exp(sB * u[3]!)));
  const vos = sVt * (u[0]! - u[2]!) + p.slope * ut * (v1 - v2);
  return pol === 'n' ? vos : -vos;
}

describe('resistor-loaded pair: exact balance (reference: independent bisection)', () => {
  const draw = fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 6, maxLength: 6 });
  it.each([
    ['n input, moderate inversion', resistorDesign],
    ['p input', pInput],
    ['weak inversion', weak],
  ])('%s: agrees with bisection on I1 R1 = I2 R2 to 1e-9 of the offset scale', (_n, d) => {
    const st = compileStage(d);
    const scale = linearisedSigma(st);
    fc.assert(
      fc.property(draw, (u) => {
        const got = st.figure(Float64Array.from(u), 0);
        // 200 bisection halvings of I1 leave ~1e-16 relative in I1, far below the 1e-9 asked
        // (1e-9 of sigma covers rounding of ln and exp in the two routes).
        expect(Math.abs(got - bisectionOffset(d, u))).toBeLessThan(1e-9 * scale);
      }),
      { numRuns: 300, seed: 9001 },
    );
  });

  it('a one-sigma high R1 lowers V_G1 at balance (sign from I1 R1 = I2 R2: less current is needed in M1)', () => {
    const st = compileStage(resistorDesign);
    const u = new Float64Array(6);
    u[4] = 1;
    expect(st.figure(u, 0)).toBeLessThan(0);
    u[4] = 0;
    u[5] = 1;
    expect(st.figure(u, 0)).toBeGreaterThan(0);
  });

  it('with matched resistors the offset is the simple stage\'s for the same input draws (identity, 1e-15 V)', () => {
    const simple = compileStage({ ...simpleDesign, tail: resistorDesign.tail!, input: resistorDesign.input });
    const st = compileStage(resistorDesign);
    fc.assert(
      fc.property(fc.array(fc.double({ min: -6, max: 6, noNaN: true }), { minLength: 4, maxLength: 4 }), (u) => {
        const a = st.figure(Float64Array.of(...u, 0, 0), 0);
        const b = simple.figure(Float64Array.from(u), 0);
        // The two stages take different routes through the log of the current ratio: rounding only.
        expect(Math.abs(a - b)).toBeLessThan(1e-15 + 1e-12 * Math.abs(b));
      }),
      { numRuns: 300, seed: 9002 },
    );
  });
});

describe('resistor-loaded pair: linearised sigma (reference: Razavi, Design of Analog CMOS Integrated Circuits, 2nd ed., 2017)', () => {
  it.each([
    ['n input', resistorDesign],
    ['p input', pInput],
    ['weak inversion', weak],
  ])('%s: sigma^2 = s_VT^2 + (I_D/gm)^2 (s_beta^2 + s_R^2) with pair sigmas A/sqrt(WL), to 1e-12', (_n, d) => {
    const st = compileStage(d);
    const p = d.process[d.input.polarity]!;
    const load = d['load'] as { w: number; l: number };
    const idOverGm = 1 / st.operatingPoint[0]!.gmOverId;
    const expected = Math.sqrt(
      pairSigma(p.avt, d.input.w, d.input.l) ** 2 +
        idOverGm ** 2 * (pairSigma(p.abeta, d.input.w, d.input.l) ** 2 + pairSigma(d.process.resistor!.ar, load.w, load.l) ** 2),
    );
    // Same formula by two routes (sensitivities vs pair sigmas): rounding only.
    expect(rel(linearisedSigma(st), expected)).toBeLessThan(1e-12);
  });

  it('the sensitivities equal central differences of the exact model (1e-6 relative: O(h^2) with h = 1e-4)', () => {
    const st = compileStage(resistorDesign);
    const h = 1e-4;
    for (let j = 0; j < st.dimension; j++) {
      const up = new Float64Array(st.dimension);
      const dn = new Float64Array(st.dimension);
      up[j] = h;
      dn[j] = -h;
      const fd = (st.figure(up, 0) - st.figure(dn, 0)) / (2 * h);
      expect(Math.abs(fd - st.sensitivities[j]!)).toBeLessThan(1e-6 * Math.abs(st.sensitivities[j]!));
    }
  });

  it('names its six variables M1.dVT, M1.dbeta, M2.dVT, M2.dbeta, R1.dR, R2.dR', () => {
    expect(compileStage(resistorDesign).variables.map((v) => v.name)).toEqual(['M1.dVT', 'M1.dbeta', 'M2.dVT', 'M2.dbeta', 'R1.dR', 'R2.dR']);
  });
});

describe('resistor-loaded pair: design file', () => {
  const text = [
    'temperature: 27 C',
    'topology: resistor',
    'tail: 40 uA',
    'input: { polarity: n, w: 8 um, l: 1 um }',
    'load: { w: 1 um, l: 5 um, r: 20 kohm }',
    'process:',
    '  n: { vt0: 0.45 V, slope: 1.3, kp: 300 uA/V^2, avt: 5 mV*um, abeta: 1 %*um }',
    '  resistor: { ar: 1 %*um }',
    'spec: { offset: 5 mV }',
  ].join('\n');
  it('reads r in ohms (kohm prefix) and A_R in %*um as fraction*m', () => {
    const d = parseDesign(text, { source: 'r.yaml' });
    expect((d['load'] as { r: number }).r).toBe(20e3);
    expect(d.process.resistor!.ar).toBe(1e-8);
  });
  it.each([
    ['process.resistor', text.replace('  resistor: { ar: 1 %*um }\n', ''), 'process.resistor: missing'],
    ['load.polarity', text.replace('load: { w:', 'load: { polarity: p, w:'), 'load.polarity: unknown key'],
    ['load.r', text.replace('20 kohm', '20 kA'), 'load.r: '],
    ['process.resistor.ar', text.replace('ar: 1 %*um', 'ar: 0 %*um'), 'process.resistor.ar: must be greater than 0'],
  ])('%s: refused with one line naming the field', (_f, t, fragment) => {
    expect(() => parseDesign(t, { source: 'r.yaml' })).toThrow(fragment);
  });
  it('the library refuses what the reader refuses: a design object without process.resistor', () => {
    expect(() => compileStage({ ...resistorDesign, process: { n: demoProcess.n } })).toThrow(/^process\.resistor: missing/);
  });
});

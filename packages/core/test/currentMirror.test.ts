/**
 * The two-device current mirror (topology: current-mirror): its closed-form current error against
 * an independent route through the EKV functions, the linearised sigma against Pelgrom's and
 * Kinget's form, the weak-inversion limit, and the design-file rules. All designs are invented.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design, DeviceGeometry } from '../src/design.js';
import { ekvForward, ekvInverse, specificCurrent } from '../src/ekv.js';
import { isInputError } from '../src/errors.js';
import { groupedBudget, linearisedSigma } from '../src/linearised.js';
import { parseDesign } from '../src/parse/parseDesign.js';
import { writeDesign } from '../src/parse/writeDesign.js';
import { CURRENT_MIRROR_CAUTION } from '../src/stages/currentMirror.js';
import { thermalVoltage } from '../src/thermal.js';
import { currentMirrorDesign as mirror, demoProcess } from './designs.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

const pMirror: Design = { ...mirror, input: { polarity: 'p', w: 10e-6, l: 2e-6, current: 5e-6 }, output: { polarity: 'p', w: 10e-6, l: 2e-6 }, process: { p: demoProcess.p } };
const strong: Design = { ...mirror, input: { polarity: 'n', w: 2e-6, l: 20e-6, current: 50e-6 }, output: { polarity: 'n', w: 6e-6, l: 20e-6 } };
const weak: Design = { ...mirror, input: { polarity: 'n', w: 40e-6, l: 1e-6, current: 1e-9 } };
const correlated: Design = { ...mirror, process: { n: { ...demoProcess.n, rho: 0.6 } } };
const designs: [string, Design][] = [
  ['n mirror, ratio 2, strong inversion (IC 19)', mirror],
  ['p mirror, ratio 1, moderate inversion', pMirror],
  ['ratio 3, deep strong inversion (IC 770)', strong],
  ['weak inversion (IC 2e-5)', weak],
  ['rho != 0', correlated],
];

const dev = (d: Design, key: string): DeviceGeometry => (key === 'input' ? d.input : (d[key] as DeviceGeometry));

/**
 * e by a second route: the diode's V_GS from the EKV inverse of I_in at its own I_S, the output's
 * current from the forward law at that V_GS shifted by its V_T difference (Enz, Krummenacher &
 * Vittoz, AICSP 8, 1995), then e = I_out / (ratio I_in) - 1 with ratio = (W/L)_out / (W/L)_in.
 */
function directError(d: Design, u: readonly number[]): number {
  const p = d.process[d.input.polarity]!;
  const ut = thermalVoltage(d.temperature);
  const rho = p.rho ?? 0;
  const one = (key: string, k: number): { is: number; dvt: number } => {
    const g = dev(d, key);
    const s = 1 / Math.sqrt(2 * g.w * g.l);
    const z = rho * u[2 * k]! + Math.sqrt(1 - rho * rho) * u[2 * k + 1]!;
    return { is: specificCurrent(p.slope, p.kp, g.w, g.l, ut) * Math.exp(p.abeta * s * z), dvt: p.avt * s * u[2 * k]! };
  };
  const m1 = one('input', 0);
  const m2 = one('output', 1);
  const iin = d.input.current!;
  const out = m2.is * ekvForward(ekvInverse(iin / m1.is) - (m2.dvt - m1.dvt) / (p.slope * ut));
  const ratio = (dev(d, 'output').w / dev(d, 'output').l) / (d.input.w / d.input.l);
  return out / (ratio * iin) - 1;
}

describe('current mirror: exact current error (reference: the EKV forward and inverse laws, applied directly)', () => {
  it.each(designs)('%s: agrees with the direct route to 1e-13', (_n, d) => {
    const st = compileStage(d);
    fc.assert(
      fc.property(fc.array(fc.double({ min: -6, max: 6, noNaN: true }), { minLength: 4, maxLength: 4 }), (u) => {
        // The direct route divides two currents of about 1: rounding of a few ulp of 1 (2e-16 each),
        // and the EKV inverse's own rounding at small IC; 1e-13 absolute (and 1e-11 of e) covers it.
        const got = st.figure(Float64Array.from(u), 0);
        const ref = directError(d, u);
        expect(Math.abs(got - ref)).toBeLessThan(1e-13 + 1e-11 * Math.abs(ref));
      }),
      { numRuns: 300, seed: 13001 },
    );
  });

  it('a shift common to both devices (the same dV_T, the same current-factor deviate) leaves no error (identity, 1e-15)', () => {
    const st = compileStage(mirror);
    const sVt1 = st.variables[0]!.sigma;
    const sVt2 = st.variables[2]!.sigma;
    const sB1 = st.variables[1]!.sigma;
    const sB2 = st.variables[3]!.sigma;
    fc.assert(
      fc.property(fc.double({ min: -20e-3, max: 20e-3, noNaN: true }), fc.double({ min: -0.05, max: 0.05, noNaN: true }), (dvt, z) => {
        // Per-device draws that give both devices the same dV_T and the same ln(beta_i/beta).
        const u = Float64Array.of(dvt / sVt1, z / sB1, dvt / sVt2, z / sB2);
        // e = expm1(z2 + 2 ln(L2/s0)) with L2 = s1 exactly when the shifts cancel: rounding only.
        expect(Math.abs(st.figure(u, 0))).toBeLessThan(1e-15);
      }),
      { numRuns: 200, seed: 13002 },
    );
  });

  it('a one-sigma high output V_T lowers the copied current, a high output current factor raises it (signs)', () => {
    const st = compileStage(mirror);
    expect(st.figure(Float64Array.of(0, 0, 1, 0), 0)).toBeLessThan(0);
    expect(st.figure(Float64Array.of(0, 0, 0, 1), 0)).toBeGreaterThan(0);
    expect(st.figure(Float64Array.of(1, 0, 0, 0), 0)).toBeGreaterThan(0); // the diode needs more V_GS
  });
});

describe('current mirror: linearised sigma (Pelgrom, Duinmaijer & Welbers, IEEE JSSC 24(5), 1989; Kinget, IEEE JSSC 40(6), 2005)', () => {
  it.each(designs.filter(([, d]) => (d.process[d.input.polarity]!.rho ?? 0) === 0))(
    '%s: sigma^2(e) = sigma^2(dbeta/beta, pair) + (gm/I_D)^2 sigma^2(dV_T, pair), to 1e-12',
    (_n, d) => {
      const st = compileStage(d);
      const p = d.process[d.input.polarity]!;
      const a1 = d.input.w * d.input.l;
      const a2 = dev(d, 'output').w * dev(d, 'output').l;
      // The "pair" sigmas of two devices of different areas: sqrt(A^2/(2 a1) + A^2/(2 a2)),
      // which is Pelgrom's A/sqrt(WL) when the areas are equal.
      const pair = (a: number): number => a * Math.sqrt(1 / (2 * a1) + 1 / (2 * a2));
      const gmId = st.operatingPoint[0]!.gmOverId;
      expect(st.operatingPoint[1]!.gmOverId).toBeCloseTo(gmId, 12); // the same inversion coefficient
      const expected = Math.hypot(pair(p.abeta), gmId * pair(p.avt));
      expect(rel(linearisedSigma(st), expected)).toBeLessThan(1e-12);
    },
  );

  it.each(designs)('%s: the sensitivities equal central differences of the exact model (1e-6 relative)', (_n, d) => {
    const st = compileStage(d);
    const h = 1e-4;
    for (let j = 0; j < st.dimension; j++) {
      const up = new Float64Array(st.dimension);
      const dn = new Float64Array(st.dimension);
      up[j] = h;
      dn[j] = -h;
      const fd = (st.figure(up, 0) - st.figure(dn, 0)) / (2 * h);
      // h^2 e'''/6 is ~1e-9 relative for per-mille sigmas; rounding 1e-16 / 1e-4 = 1e-12 absolute.
      expect(Math.abs(fd - st.sensitivities[j]!)).toBeLessThan(1e-6 * Math.abs(st.sensitivities[j]!) + 1e-12);
    }
  });

  it('weak-inversion limit: the V_T term tends to sigma(dV_T, pair) / (n U_T) (computed from the exponential law I ~ e^{V_GS/(n U_T)})', () => {
    // IC = 1e-8: gm/I_D = (1 - e^{-sqrt IC})/(sqrt(IC) n U_T) differs from 1/(n U_T) by sqrt(IC)/2 = 5e-5.
    const d: Design = { ...weak, input: { polarity: 'n', w: 40e-6, l: 1e-6, current: 1e-9 * (1e-8 / compileStage(weak).operatingPoint[0]!.ic) } };
    const st = compileStage(d);
    const ic = st.operatingPoint[0]!.ic;
    expect(rel(ic, 1e-8)).toBeLessThan(1e-9);
    const p = d.process.n!;
    const a1 = d.input.w * d.input.l;
    const a2 = dev(d, 'output').w * dev(d, 'output').l;
    const sigmaVtPair = p.avt * Math.sqrt(1 / (2 * a1) + 1 / (2 * a2));
    const limit = sigmaVtPair / (p.slope * thermalVoltage(d.temperature));
    const vtTerm = Math.sqrt(groupedBudget(st).filter((g) => g.parameter === 'vt').reduce((a, g) => a + g.variance, 0));
    expect(rel(vtTerm, limit)).toBeLessThan(Math.sqrt(ic)); // 1e-4 > sqrt(IC)/2
    expect(vtTerm).toBeLessThan(limit); // approached from below: gm/I_D < 1/(n U_T)
  });

  it('weak inversion: the exact error follows the exponential law e = exp(z2 - z1 - (dV_T2 - dV_T1)/(n U_T)) - 1 to O(sqrt IC)', () => {
    const st = compileStage(weak);
    const ic = st.operatingPoint[0]!.ic;
    const nut = demoProcess.n.slope * thermalVoltage(weak.temperature);
    const [v1, b1, v2, b2] = st.variables;
    fc.assert(
      fc.property(fc.array(fc.double({ min: -4, max: 4, noNaN: true }), { minLength: 4, maxLength: 4 }), (u) => {
        const law = Math.expm1(b2!.sigma * u[3]! - b1!.sigma * u[1]! - (v2!.sigma * u[2]! - v1!.sigma * u[0]!) / nut);
        // F(v) = ln^2(1 + e^{v/2}) = e^v (1 - e^{v/2} + ...): the relative correction to each current is
        // about sqrt(IC) times the shift of v; bound: 2 sqrt(IC) |e| + 1e-15.
        expect(Math.abs(st.figure(Float64Array.from(u), 0) - law)).toBeLessThan(2 * Math.sqrt(ic) * Math.abs(law) + 1e-15);
      }),
      { numRuns: 200, seed: 13003 },
    );
  });

  it('names its variables M1 (input) and M2 (output); M2 carries ratio x I_in; every report carries the channel-length caution', () => {
    const st = compileStage(mirror);
    expect(st.variables.map((v) => v.name)).toEqual(['M1.dVT', 'M1.dbeta', 'M2.dVT', 'M2.dbeta']);
    expect(st.variables.map((v) => v.role)).toEqual(['input', 'input', 'output', 'output']);
    expect(rel(st.operatingPoint[1]!.current, 20e-6)).toBeLessThan(1e-15);
    expect(st.warnings).toContain(CURRENT_MIRROR_CAUTION);
    expect(st.definition.figure).toMatchObject({ name: 'currentError', specKey: 'error', unit: '', sided: 'two' });
  });
});

describe('current mirror: design file', () => {
  const text = [
    'temperature: 27 C',
    'topology: current-mirror',
    'input:  { polarity: n, w: 4 um, l: 4 um, current: 10 uA }',
    'output: { polarity: n, w: 8 um, l: 4 um }',
    'process:',
    '  n: { vt0: 0.45 V, slope: 1.3, kp: 300 uA/V^2, avt: 5 mV*um, abeta: 1 %*um }',
    'spec: { error: 0.5 %, instances: 64 }',
  ].join('\n');

  it('reads spec.error as a fraction (0.5 % = 0.005) and input.current in amperes; writes back to the same doubles', () => {
    const d = parseDesign(text, { source: 'm.yaml' });
    expect(d.spec['error']).toBe(0.005);
    expect(d.input.current).toBe(10e-6);
    expect(d.tail).toBeUndefined();
    const written = writeDesign(d);
    expect(written).toContain('error: 0.5 %');
    expect(parseDesign(written, { source: 'm.yaml' })).toEqual(d);
  });

  it.each([
    ['output', text.replace(/^output:.*\n/m, ''), 'output: missing, but topology is current-mirror; add output: { polarity: n'],
    ['input.current (missing)', text.replace(', current: 10 uA', ''), 'input.current: missing; add current: 10 uA'],
    ['input.current (not a current)', text.replace('current: 10 uA', 'current: 10 uV'), 'input.current: expected a current such as "10 uA", got "10 uV"'],
    ['spec.offset', text.replace('error: 0.5 %', 'offset: 5 mV'), 'spec.offset: a current-mirror stage is specified by its current error (error: 0.5 %); did you mean "error"?'],
    ['spec.error (a voltage)', text.replace('error: 0.5 %', 'error: 5 mV'), 'spec.error: expected a current error limit as a percentage or a fraction, e.g. error: 0.5 %, got "5 mV"'],
    ['spec.error (above 100%)', text.replace('error: 0.5 %', 'error: 150 %'), 'spec.error: expected a current error limit above 0 % up to 100 %, got 150 %'],
    ['tail', `${text}\ntail: 10 uA`, 'tail: a current-mirror stage has no tail'],
    ['output.polarity', text.replace('output: { polarity: n', 'output: { polarity: p'), 'output.polarity: the output device is the same polarity as the input devices (input is n), so expected n, got "p"'],
  ])('%s: refused with one line naming the field', (_f, t, fragment) => {
    let err: unknown;
    try {
      parseDesign(t, { source: 'm.yaml' });
    } catch (e) {
      err = e;
    }
    expect(isInputError(err)).toBe(true);
    expect((err as Error).message).toContain(fragment);
    expect((err as Error).message).not.toContain('\n');
  });

  it('the library refuses what the reader refuses: a design object with spec.offset', () => {
    expect(() => compileStage({ ...mirror, spec: { offset: 5e-3, instances: 1 } })).toThrow(/^spec\.offset: a current-mirror stage is specified by its current error/);
  });
});

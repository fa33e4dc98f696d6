import type { DeviceGeometry } from '../src/design.js';
/**
 * The per-device quantities a compiled stage reports (operating point, sigmas, warnings), the
 * report form of the current-factor rule, and the edges of the EKV helpers, each against a
 * computation written out here from the published formulas: EKV 1995 (Enz, Krummenacher &
 * Vittoz, AICSP 8:83-114), Pelgrom, Duinmaijer & Welbers (IEEE JSSC 24(5), 1989) with one draw
 * per device, U_T = kT/q with the exact 2019 SI constants.
 */
import { describe, expect, it } from 'vitest';
import { processFor } from '../src/elements.js';
import { compileStage, currentFactorDeviation, ekvInverseDifference, normalisedGmOverId, type Design } from '../src/index.js';
import { demoProcess, mirrorDesign, simpleDesign } from './designs.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const thermal = (t: number): number => (1.380649e-23 * t) / 1.602176634e-19;

describe('operating point of each device, computed by hand (EKV 1995)', () => {
  const design: Design = {
    ...mirrorDesign,
    process: { n: { ...demoProcess.n, cox: 8.6e-3 }, p: demoProcess.p },
  };
  const st = compileStage(design);
  const ut = thermal(design.temperature);
  const cases = [
    ['M1', 0, demoProcess.n, design.input, 'input', 8.6e-3],
    ['M2', 1, demoProcess.n, design.input, 'input', 8.6e-3],
    ['M3', 2, demoProcess.p, (design['load'] as DeviceGeometry | undefined)!, 'load', undefined],
    ['M4', 3, demoProcess.p, (design['load'] as DeviceGeometry | undefined)!, 'load', undefined],
  ] as const;
  it.each(cases)('%s: I_S, IC, region, gm/I_D, gm, overdrive, area, capacitance, sigmas (1e-12: rounding)', (name, index, p, g, role, cox) => {
    const op = st.operatingPoint[index]!;
    const id = design.tail! / 2;
    const is = 2 * p.slope * p.kp * (g.w / g.l) * ut * ut;
    const ic = id / is;
    const s = Math.sqrt(ic);
    const gmId = (1 - Math.exp(-s)) / (s * p.slope * ut);
    expect(op.device).toBe(name);
    expect(op.role).toBe(role);
    expect(op.polarity).toBe(g.polarity);
    expect([op.w, op.l, op.current]).toEqual([g.w, g.l, id]);
    expect(rel(op.specificCurrent, is)).toBeLessThan(1e-12);
    expect(rel(op.ic, ic)).toBeLessThan(1e-12);
    expect(rel(op.gmOverId, gmId)).toBeLessThan(1e-12);
    expect(rel(op.gm, gmId * id)).toBeLessThan(1e-12);
    // V_G - V_T0 = n U_T v with v = 2 ln(e^{sqrt IC} - 1), the EKV inverse.
    expect(rel(op.overdrive, p.slope * ut * 2 * Math.log(Math.expm1(s)))).toBeLessThan(1e-12);
    expect(rel(op.gateArea, g.w * g.l)).toBeLessThan(1e-15);
    // IC: 4.8 (moderate) for the n input, 15.4 (strong) for the p load (common-practice bounds 0.1, 10).
    expect(op.region).toBe(ic < 0.1 ? 'weak' : ic > 10 ? 'strong' : 'moderate');
    expect(op.region).toBe(role === 'input' ? 'moderate' : 'strong');
    if (cox === undefined) expect(op.gateCapacitance).toBeUndefined();
    else expect(rel(op.gateCapacitance!, cox * g.w * g.l)).toBeLessThan(1e-12);
    // Per-device sigmas A / sqrt(2 W L).
    expect(rel(op.sigmaVt, p.avt / Math.sqrt(2 * g.w * g.l))).toBeLessThan(1e-12);
    expect(rel(op.sigmaBeta, p.abeta / Math.sqrt(2 * g.w * g.l))).toBeLessThan(1e-12);
  });

  it('the variables: two per device, in device order, with the per-device sigmas and rho', () => {
    const d: Design = { ...mirrorDesign, process: { n: { ...demoProcess.n, rho: 0.25 }, p: { ...demoProcess.p, rho: -0.5 } } };
    const v = compileStage(d).variables;
    expect(v.map((x) => `${x.device}.${x.parameter}`)).toEqual(['M1.vt', 'M1.beta', 'M2.vt', 'M2.beta', 'M3.vt', 'M3.beta', 'M4.vt', 'M4.beta']);
    expect(v.map((x) => x.rho)).toEqual([0.25, 0.25, 0.25, 0.25, -0.5, -0.5, -0.5, -0.5]);
    expect(v.map((x) => x.role)).toEqual(['input', 'input', 'input', 'input', 'load', 'load', 'load', 'load']);
    expect(rel(v[0]!.sigma, 5e-9 / Math.sqrt(2 * 2e-12))).toBeLessThan(1e-12);
    expect(rel(v[1]!.sigma, 1e-8 / Math.sqrt(2 * 2e-12))).toBeLessThan(1e-12);
    expect(rel(v[6]!.sigma, 6.5e-9 / Math.sqrt(2 * 8e-12))).toBeLessThan(1e-12);
    expect(rel(v[7]!.sigma, 1.2e-8 / Math.sqrt(2 * 8e-12))).toBeLessThan(1e-12);
  });
});

describe('small-device warnings (area law near the process minimum: Drennan & McAndrew, IEEE JSSC 38(3), 2003)', () => {
  // The rule: a warning when W < 2 W_min or L < 2 L_min (this project's threshold, common
  // practice, no source); exactly 2x is not "within 2x".
  const withMin = (minW: number, minL: number): Design => ({
    ...mirrorDesign,
    process: { n: { ...demoProcess.n, minW, minL }, p: { ...demoProcess.p, minW, minL } },
  });
  it('W and L at exactly twice the minimum: no warning', () => {
    // Input 2 um x 1 um, load 4 um x 2 um: minimum 1 um / 0.5 um gives 2x for the input.
    expect(compileStage(withMin(1e-6, 0.5e-6)).warnings).toEqual([]);
  });
  it('W or L below twice the minimum: one warning naming the field, for each pair', () => {
    const w = compileStage(withMin(1.01e-6, 0.1e-6)).warnings;
    expect(w).toHaveLength(1);
    expect(w[0]).toMatch(/^input\.w is within 2x of the process minimum width/);
    const l = compileStage(withMin(0.1e-6, 0.51e-6)).warnings;
    expect(l).toHaveLength(1);
    expect(l[0]).toMatch(/^input\.l is within 2x of the process minimum length/);
    const both = compileStage(withMin(2.01e-6, 1.01e-6)).warnings;
    expect(both).toEqual([
      expect.stringMatching(/^input\.w /),
      expect.stringMatching(/^input\.l /),
      expect.stringMatching(/^load\.w /),
      expect.stringMatching(/^load\.l /),
    ]);
  });
  it('a device below the minimum is said to be below it, naming both values (not "within 2x")', () => {
    // Input W = 2 um against a smallest drawn width of 3 um; the load (4 um) is within 2x.
    const w = compileStage(withMin(3e-6, 0.1e-6)).warnings;
    expect(w[0]).toBe("input.w = 2 um is below the process's smallest drawn width process.n.min_w = 3 um: such a device cannot be drawn, and the area law does not hold for it");
    expect(w[1]).toMatch(/^load\.w is within 2x of the process minimum width/);
  });
  it('the simple stage warns for its input pair the same way', () => {
    const d: Design = { ...simpleDesign, process: { n: { ...demoProcess.n, minW: 1.5e-6 } } };
    expect(compileStage(d).warnings).toEqual([expect.stringMatching(/^input\.w is within 2x/)]);
  });
});

describe('current-factor rule in report form: dbeta/beta = exp(sigma (rho u_vt + sqrt(1 - rho^2) u_beta)) - 1', () => {
  it('rho = 0.6: the weights of u_vt and u_beta are 0.6 and sqrt(1 - 0.36) = 0.8 (1e-15: rounding)', () => {
    expect(rel(currentFactorDeviation(0.01, 0.6, 1, 0), Math.expm1(0.006))).toBeLessThan(1e-15);
    expect(rel(currentFactorDeviation(0.01, 0.6, 0, 1), Math.expm1(0.008))).toBeLessThan(1e-15);
    expect(rel(currentFactorDeviation(0.01, -0.6, 1, 1), Math.expm1(0.002))).toBeLessThan(1e-13);
    // Log-normal: one sigma of 1% is e^{0.01} - 1 = 1.005017% (first order: 1%).
    expect(rel(currentFactorDeviation(0.01, 0, 0, 1), 0.010050167084168)).toBeLessThan(1e-12);
  });
});

describe('edges of the EKV helpers', () => {
  it('n U_T gm/I_D below IC = 1e-16 is the series 1 - sqrt(IC)/2 (error sqrt(IC)^2/6 < 2e-21)', () => {
    // (1 - e^{-s})/s = 1 - s/2 + s^2/6 - ...: at s = 1e-10 the series to first order is exact
    // to double precision.
    expect(Math.abs(normalisedGmOverId(1e-20) - (1 - 0.5e-10))).toBeLessThan(1e-16);
    expect(Math.abs(normalisedGmOverId(1e-17) - (1 - 0.5 * Math.sqrt(1e-17)))).toBeLessThan(1e-16);
    expect(normalisedGmOverId(0)).toBe(1);
  });
});

describe('v(s1^2) - v(s2^2) deep in weak inversion, close sides: the series form keeps the digits', () => {
  it('s2 = 2^-17, s1 = s2 (1 + 2^-20), both exact doubles: 1e-13 relative', () => {
    // ln(expm1(s)/s) = s/2 + s^2/24 - s^4/2880 + ... (Bernoulli series), so
    // v1 - v2 = 2 ln(s1/s2) + (s1 - s2) + (s1^2 - s2^2)/12 + O(s^3 (s1 - s2)) (the rest < 1e-30 here).
    // ln(s1/s2) = log1p(2^-20) exactly to one ulp; s1 - s2 is exact (Sterbenz). 1e-13 allows a few
    // hundred ulp of rounding in the series form. Written as 2 ln(expm1(s1)) - 2 ln(expm1(s2)),
    // the two logs of about -23 (ulp 3.6e-15) lose digits against a difference of 1.9e-6: 5e-12 off.
    const s2 = 2 ** -17;
    const s1 = s2 * (1 + 2 ** -20);
    const lnRatio = Math.log1p(2 ** -20);
    const want = 2 * lnRatio + (s1 - s2) + (s1 * s1 - s2 * s2) / 12;
    expect(rel(ekvInverseDifference(s1, s2, lnRatio), want)).toBeLessThan(1e-13);
  });
});

describe('simple stage: a current factor beyond the range of doubles gives NaN, never +-Infinity', () => {
  it('a draw that underflows I_S of one device is not evaluated (NaN) and counted by offsets()', () => {
    // sigma(dbeta/beta) = 30%: u_beta = 5000 gives I_S1 = I_S e^{1500}: beyond doubles, and
    // sqrt(IC1) = sqrt(IC) e^{-750} underflows to 0.
    const side = Math.sqrt((1e-8 / 0.3) ** 2 / 2);
    const st = compileStage({ ...simpleDesign, input: { polarity: 'n', w: side, l: side } });
    expect(Number.isNaN(st.figure(Float64Array.of(0, 5000, 0, 0), 0))).toBe(true);
    expect(Number.isNaN(st.figure(Float64Array.of(0, 0, 0, -5000), 0))).toBe(true);
    const out = new Float64Array(3);
    const failed = st.figures(Float64Array.of(0, 5000, 0, 0, 1, 0, 0, 0, 0, 0, 0, -5000), 3, out, 0);
    expect(failed).toBe(2);
    // The finite one is M1's V_T one sigma high: exactly sigma(dV_T) (stageReference.test.ts).
    expect(rel(out[1]!, 5e-9 / Math.sqrt(2 * side * side))).toBeLessThan(1e-12);
  });
});

describe('v(s1^2) - v(s2^2), the form the hot loops use, against its Taylor expansion', () => {
  // v(IC) = 2 ln(e^s - 1), s = sqrt(IC). For close s1, s2 the difference is, to second order in
  // d = s1 - s2, v' d + v'' d^2 / 2 with v'(s) = 2 e^s / (e^s - 1) and v''(s) = -2 e^s / (e^s - 1)^2
  // (differentiate); the third-order term is below d^3 |v'''| / 6 < 1e-30 at d = 1e-9.
  it('s = 30 and 30 - 1e-9 (strong inversion): equal to 1e-12 relative', () => {
    const s1 = 30;
    const s2 = 30 - 1e-9;
    const d = s1 - s2;
    const e = Math.exp(s2);
    const em = Math.expm1(s2);
    const want = (2 * e * d) / em - (e * d * d) / (em * em);
    expect(rel(ekvInverseDifference(s1, s2, Number.NaN), want)).toBeLessThan(1e-12);
  });
});

describe('what a compiled stage says about itself', () => {
  it('the simple stage names its devices M1 and M2, both input, in its operating point and variables', () => {
    const st = compileStage(simpleDesign);
    expect(st.operatingPoint.map((o) => `${o.device}/${o.role}`)).toEqual(['M1/input', 'M2/input']);
    expect(st.variables.map((v) => `${v.device}.${v.parameter}/${v.role}`)).toEqual(['M1.vt/input', 'M1.beta/input', 'M2.vt/input', 'M2.beta/input']);
  });
  it('topology, dimension and U_T of each stage', () => {
    const s = compileStage(simpleDesign);
    const m = compileStage(mirrorDesign);
    expect([s.topology, s.dimension, m.topology, m.dimension]).toEqual(['simple', 4, 'mirror', 8]);
    expect(rel(s.thermalVoltage, thermal(300))).toBeLessThan(1e-15);
  });
  it('a temperature outside 200-450 K is kept in the warnings of both stages (this project\'s range, no source)', () => {
    for (const d of [simpleDesign, mirrorDesign]) {
      const w = compileStage({ ...d, temperature: 150 }).warnings;
      expect(w).toEqual([expect.stringMatching(/^temperature 150\.0 K is outside 200-450 K/)]);
      expect(compileStage({ ...d, temperature: 300 }).warnings).toEqual([]);
    }
  });
  it('an unvalidated design with a polarity but no process entry is an internal error, named', () => {
    // validateDesign refuses it first; processFor's own guard is the last line (deviceConstants.ts).
    expect(() => processFor({ ...simpleDesign, process: {} }, 'n')).toThrow(/^internal: process\.n missing after validation$/);
  });
});

/**
 * The folded stage at the numerical edges of its balance solve: a load so deep in strong
 * inversion that e^sqrt(IC7) overflows a double, one deep in weak inversion, an M8 so far off
 * that its softplus underflows, folded branches that carry almost nothing, and input devices
 * exactly at s = sqrt(IC) = 1, where the EKV inverse difference changes form. References: the
 * independent bisection on the balance (test/foldedBisection.ts) and, for M8 off, the closed
 * form of the balance. All designs are invented.
 */
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { ekvForward, ekvInverse, specificCurrent } from '../src/ekv.js';
import { linearisedSigma } from '../src/linearised.js';
import { thermalVoltage } from '../src/thermal.js';
import { foldedDesign } from './designs.js';
import { bisectionOffset } from './foldedBisection.js';

/** n pair 8/1 um, p sources 4/2 um, n load 4/2 um, 300 K (the check design of folded.test.ts). */
const base: Design = foldedDesign;
/** 2 mA tail, sources at 1.5 mA: each folded branch carries 0.5 mA. */
const strong: Design = { ...base, tail: 2e-3, sources: { polarity: 'p', w: 40e-6, l: 2e-6, current: 1.5e-3 } };

/** A fixed spread of draws over +-6 on the chosen indices (deterministic, no random source). */
function spread(count: number, indices: readonly number[], phase: number): Float64Array[] {
  return Array.from({ length: count }, (_, i) => {
    const u = new Float64Array(12);
    for (const j of indices) u[j] = 6 * Math.sin(1.7 * (12 * i + j) + phase);
    return u;
  });
}
const ALL = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11];

describe('folded stage: load beyond the overflow of e^sqrt(IC) (reference: bisection)', () => {
  // Load 1/800 um: I_S7 = 2 n KP (W/L) U_T^2 = 0.65 nA, so 0.5 mA puts M7 at IC ~ 7.7e5 and
  // sqrt(IC7) ~ 876, past ln(DBL_MAX) = 709.8: expm1(q) and e^{v8/2} are Infinity there.
  const huge: Design = { ...strong, load: { polarity: 'n', w: 1e-6, l: 800e-6 } };
  it('sqrt(IC7) > 710, and 40 draws over +-6 sigma agree with bisection to 1e-8 relative', () => {
    const st = compileStage(huge);
    expect(Math.sqrt(st.operatingPoint[4]!.ic)).toBeGreaterThan(710);
    for (const u of spread(40, ALL, 0.3)) {
      const ref = bisectionOffset(huge, Array.from(u));
      // Both routes solve the same balance; the stage to a residual of 1e-12 of the folded
      // current, which moves Vos by about 1e-12 (I_src/gm_in) (~1e-12 V here), the bisection to
      // rounding. 1e-8 relative covers that and the two routes' roundings (Vos is ~1 mV or more
      // for these draws: 1e-8 of it is 1e-11 V).
      expect(Math.abs(st.figure(u, 0) - ref)).toBeLessThan(1e-8 * Math.abs(ref));
    }
  });
});

describe('folded stage: M8 so far off that it carries nothing (reference: closed form I2 = I6)', () => {
  // With I8 = 0 the balance I8 = I6 - I2 gives I2 = I6 exactly and I1 = I_B - I6 (derived by
  // hand from the balance of the stage's documentation); Vos = dV_T,12 + n U_T (v(I1/I_S1) -
  // v(I2/I_S2)) with the EKV inverse (Enz, Krummenacher & Vittoz, AICSP 8, 1995).
  const closedForm = (d: Design, u: Float64Array): number => {
    const ut = thermalVoltage(d.temperature);
    const pn = d.process.n!;
    const pp = d.process.p!;
    const g = d.input;
    const src = d['sources'] as { w: number; l: number; current: number };
    const sIn = 1 / Math.sqrt(2 * g.w * g.l);
    const sSrc = 1 / Math.sqrt(2 * src.w * src.l);
    const is6 = specificCurrent(pp.slope, pp.kp, src.w, src.l, ut) * Math.exp(pp.abeta * sSrc * u[7]!);
    const vF = ekvInverse(src.current / specificCurrent(pp.slope, pp.kp, src.w, src.l, ut));
    const i2 = is6 * ekvForward(vF - (pp.avt * sSrc * u[6]!) / (pp.slope * ut));
    const i1 = d.tail! - i2;
    const is1 = specificCurrent(pn.slope, pn.kp, g.w, g.l, ut) * Math.exp(pn.abeta * sIn * u[1]!);
    const is2 = specificCurrent(pn.slope, pn.kp, g.w, g.l, ut) * Math.exp(pn.abeta * sIn * u[3]!);
    return pn.avt * sIn * (u[0]! - u[2]!) + pn.slope * ut * (ekvInverse(i1 / is1) - ekvInverse(i2 / is2));
  };
  it.each<[string, Design]>([
    ['strong design, load 1/4 um (M7 carries all of T: sqrt(IC7) ~ 88, the log domain of the solve)', { ...strong, load: { polarity: 'n', w: 1e-6, l: 4e-6 } }],
    ['the check design with 15 uA sources (I6 < I_B, so I2 = I6 has a balance; sqrt(IC7) ~ 3.1: the direct branch)', { ...base, sources: { polarity: 'p', w: 4e-6, l: 2e-6, current: 15e-6 } }],
  ])('%s: M8 V_T 1.5e5 sigma high, v8 < -1400 (e^{v8/2} underflows)', (_n, d) => {
    const st = compileStage(d);
    const nut = d.process.n!.slope * st.thermalVoltage;
    // u10 such that (V_T8 - V_T7) / (n U_T) = 1.5e5 * sigma_VT / (n U_T) > 2 (sqrt(IC7) + 710).
    const u10 = 1.5e5;
    expect((u10 * st.operatingPoint[4]!.sigmaVt) / nut).toBeGreaterThan(2 * (Math.sqrt(st.operatingPoint[4]!.ic) + 710));
    for (const draw of spread(6, [0, 1, 2, 3, 6, 7, 8, 9], 1.1)) {
      const u = Float64Array.from(draw);
      u[10] = u10;
      const ref = closedForm(d, u);
      // The same I1 by two routes (no solve in the closed form; the stage's solve residual is
      // 1e-12 of T, moving Vos by ~1e-12 (I_src/gm_in) <= 1e-12 V): 1e-9 relative of a Vos of
      // 1 mV or more covers it and the roundings of the EKV inverses (~1e-15 relative each).
      expect(Math.abs(st.figure(u, 0) - ref)).toBeLessThan(1e-9 * Math.abs(ref));
      // And the bisection, which sees I8 = 0 through ekvForward's underflow, agrees.
      expect(Math.abs(bisectionOffset(d, Array.from(u)) - ref)).toBeLessThan(1e-9 * Math.abs(ref));
    }
  });
});

describe('folded stage: M8 at the knee of F, v8 = 0 at balance (reference: bisection)', () => {
  // Load 1/4 um (sqrt(IC7) ~ 62 nominal, ~88 here where M7 carries nearly all of T: the solve's
  // log domain). M8's V_T is placed so that at balance
  // v8/2 = y* for y* near 0, where I8 = I_S8 ln^2(1 + e^{y*}) ~ (ln 2)^2 I_S8 is tiny next to I7:
  // with I8 in units of I_B, I7 = T - I8, sqrt(IC7) = sqrt(I7 / a7), and
  // (V_T8 - V_T7) / (n U_T) = 2 (ln(expm1(sqrt(IC7))) - y*) (the balance of the stage's
  // documentation solved for the V_T difference; EKV inverse, Enz, Krummenacher & Vittoz 1995).
  const d: Design = { ...strong, load: { polarity: 'n', w: 1e-6, l: 4e-6 } };
  it.each([-1e-4, -1e-6, 0, 1e-6, 1e-4])('y* = %f: agrees with bisection to 1e-8 relative', (yStar) => {
    const st = compileStage(d);
    const ut = thermalVoltage(d.temperature);
    const pn = d.process.n!;
    const { w, l } = d['load'] as { w: number; l: number };
    const a = specificCurrent(pn.slope, pn.kp, w, l, ut) / d.tail!;
    const total = (2 * (d['sources'] as { current: number }).current - d.tail!) / d.tail!;
    const q = Math.sqrt((total - a * Math.log1p(Math.exp(yStar)) ** 2) / a);
    expect(q).toBeGreaterThan(30);
    const sigmaVt = pn.avt / Math.sqrt(2 * w * l);
    const u = new Float64Array(12);
    u[10] = (2 * (q + Math.log1p(-Math.exp(-q)) - yStar) * pn.slope * ut) / sigmaVt;
    const ref = bisectionOffset(d, Array.from(u));
    // As above: the stage's solve residual (1e-12 of T) and the roundings of two routes, for a
    // Vos of about 0.5 V here (M8 off by 3300 sigma leaves I2 = I6 - I8, far from balance).
    expect(Math.abs(st.figure(u, 0) - ref)).toBeLessThan(1e-8 * Math.abs(ref));
  });
});

describe('folded stage: M8 far stronger than M7 (reference: bisection)', () => {
  // M8's V_T 42 to 400 sigma (50 to 500 mV) below M7's: M8 copies many times M7's current, so
  // I7 and sqrt(IC7) are small at balance and h(q) = a7 q^2 + a8 L8(q)^2 - T is steep there: a
  // Newton step from the start overshoots below q = 0, where h has a second, spurious root
  // (a7 q^2 is even) or no real value. The stage's bisection guard keeps q in its bracket.
  it.each<[string, number, number[]]>([
    ['sources 0.2 uA above tail/2', 10.2e-6, [-42, -200, -300]],
    ['the check design', 20e-6, [-400]],
  ])('%s: agrees with bisection to 1e-8 of sigma', (_n, current, u10s) => {
    const d: Design = { ...base, sources: { polarity: 'p', w: 4e-6, l: 2e-6, current } };
    const st = compileStage(d);
    const scale = linearisedSigma(st);
    for (const u10 of u10s) {
      const u = Float64Array.of(0.5, 0, 0, -0.7, 0, 0, 0, 0, 0, 0, u10, 0);
      // As in folded.test.ts: the stage's residual of 1e-12 of T and the two routes' roundings
      // are far below 1e-8 sigma.
      expect(Math.abs(st.figure(u, 0) - bisectionOffset(d, Array.from(u)))).toBeLessThan(1e-8 * scale);
    }
  });
});

describe('folded stage: folding sources so weak that the folded current is below half its nominal (reference: bisection)', () => {
  // Both sources' V_T 60 sigma high (-25% current each): T = I5 + I6 - I_B falls below half its
  // nominal, so sqrt(T / a7) < sqrt(IC7 nominal) and the solve starts from the bracket's middle.
  it('agrees with bisection to 1e-8 relative on 10 draws of the other devices', () => {
    const st = compileStage(base);
    const ic7 = st.operatingPoint[4]!.ic;
    for (const draw of spread(10, [0, 1, 2, 3, 5, 7, 8, 9, 10, 11], 0.2)) {
      const u = Float64Array.from(draw);
      u[4] = 60;
      u[6] = 60;
      const ref = bisectionOffset(base, Array.from(u));
      // As above: the stage's solve residual (1e-12 of T) and the two routes' roundings, for a
      // Vos of 7 mV or more on these draws.
      expect(Math.abs(st.figure(u, 0) - ref)).toBeLessThan(1e-8 * Math.abs(ref));
    }
    // The start really is the bracket's middle: T / a7 (I5 + I6 - I_B over I_S7, from the
    // sources' EKV currents) is below IC7 at nominal.
    const ut = thermalVoltage(base.temperature);
    const pp = base.process.p!;
    const src = base['sources'] as { w: number; l: number; current: number };
    const is5 = specificCurrent(pp.slope, pp.kp, src.w, src.l, ut);
    const i5 = is5 * ekvForward(ekvInverse(src.current / is5) - (60 * pp.avt) / Math.sqrt(2 * src.w * src.l) / (pp.slope * ut));
    const is7 = st.operatingPoint[4]!.current / ic7;
    expect((2 * i5 - base.tail!) / is7).toBeLessThan(ic7);
  });
});

describe('folded stage: folded branches carrying almost nothing (reference: bisection)', () => {
  // sources.current 0.2 nA above tail/2: the folded current T = I5 + I6 - I_B is 2e-5 of the
  // tail. Sources undrawn (a source mismatch of 1e-5 would leave no balance at all); input and
  // load drawn over +-6.
  const thin: Design = { ...base, sources: { polarity: 'p', w: 4e-6, l: 2e-6, current: 10.0002e-6 } };
  it('agrees with bisection to 1e-8 of sigma on 60 draws of the input and the load', () => {
    const st = compileStage(thin);
    const scale = linearisedSigma(st);
    for (const u of spread(60, [0, 1, 2, 3, 8, 9, 10, 11], 0.7)) {
      const got = st.figure(u, 0);
      // The stage stops at a residual of 1e-12 of T (2e-17 of I_B here), far below what moves
      // Vos by 1e-8 sigma; the rest is the two routes' rounding, as in folded.test.ts.
      expect(Math.abs(got - bisectionOffset(thin, Array.from(u)))).toBeLessThan(1e-8 * scale);
    }
  });
});

describe('folded stage: load deep in weak inversion (reference: bisection)', () => {
  // 5.2 fA tail, sources at 1.5x, load 1000/0.1 um: I_S7 = 5.2 mA, so the 2.6 fA branch puts
  // M7 at IC ~ 1e-12 (sqrt(IC7) ~ 1e-6), the bottom of the range the EKV functions are made for.
  const tail = 5.2e-15;
  const weakLoad: Design = {
    ...base,
    tail,
    sources: { polarity: 'p', w: 4e-6, l: 2e-6, current: 1.5 * tail },
    load: { polarity: 'n', w: 1000e-6, l: 0.1e-6 },
  };
  it('sqrt(IC7) ~ 1e-6, and 40 draws over +-6 sigma agree with bisection to 1e-8 relative', () => {
    const st = compileStage(weakLoad);
    expect(st.operatingPoint[4]!.ic).toBeLessThan(1.1e-12);
    for (const u of spread(40, ALL, 2.1)) {
      const ref = bisectionOffset(weakLoad, Array.from(u));
      // As for the overflowing load above: solve residual 1e-12 of T, roundings of the two
      // routes; Vos is a few mV for these draws.
      expect(Math.abs(st.figure(u, 0) - ref)).toBeLessThan(1e-8 * Math.abs(ref));
    }
  });
});

describe('folded stage: an input device exactly at s = sqrt(IC) = 1 (reference: bisection)', () => {
  // Input 19.3/1 um: I_S1 = 10.05 uA, so the pair sits at IC = 0.995 (s = 0.997 <= 1) and a
  // current-factor draw of about -3.4 sigma brings one side to s = 1. Near there s moves by
  // 8e-4 per unit of u, so steps of 1e-14 in u are 8e-18 in s: about 14 consecutive draws give
  // s = 1 exactly (the doubles below 1 are 1.1e-16 apart), where ekvInverseDifference still
  // takes its both-at-or-below-1 form and reads ln(s1/s2).
  const d: Design = { ...base, input: { polarity: 'n', w: 19.3e-6, l: 1e-6 } };
  it.each([
    ['M1', 1],
    ['M2', 3],
  ])('%s scanned across s = 1 in 2001 steps of 1e-14: every draw has a finite Vos that agrees with bisection to 1e-8 of sigma', (_n, index) => {
    const st = compileStage(d);
    const op = st.operatingPoint[0]!;
    const scale = linearisedSigma(st);
    expect(op.ic).toBeLessThan(1);
    // s(u) = sqrt(IC e^{-sigma_beta u}) with the other draws zero: u* = ln(IC) / sigma_beta.
    const uStar = Math.log(op.ic) / op.sigmaBeta;
    const s = (ui: number): number => Math.sqrt(op.ic * Math.exp(-op.sigmaBeta * ui));
    // The scan's ends lie 8e-15 either side of s = 1, far beyond this estimate's rounding
    // (a few 1e-16): the scan crosses s = 1.
    expect(s(uStar - 1e-11)).toBeGreaterThan(1 + 4e-15);
    expect(s(uStar + 1e-11)).toBeLessThan(1 - 4e-15);
    const ref = bisectionOffset(d, [0, index === 1 ? uStar : 0, 0, index === 3 ? uStar : 0, 0, 0, 0, 0, 0, 0, 0, 0]);
    for (let k = -1000; k <= 1000; k++) {
      const u = new Float64Array(12);
      u[index] = uStar + k * 1e-14;
      const got = st.figure(u, 0);
      expect(Number.isFinite(got)).toBe(true);
      // One reference for the scan: over 2e-11 of u, Vos moves by 2e-11 (I_D/gm)_in sigma_beta,
      // ~1e-15 V, far below the 1e-8 sigma tolerance of folded.test.ts.
      expect(Math.abs(got - ref)).toBeLessThan(1e-8 * scale);
    }
  });
});

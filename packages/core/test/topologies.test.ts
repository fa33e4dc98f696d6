import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { ekvForward, ekvInverse } from '../src/ekv.js';
import { InputError } from '../src/errors.js';
import { groupedBudget, linearisedSigma, mirrorStageSigma, simpleStageSigma, varianceBudget } from '../src/linearised.js';
import { pairSigma } from '../src/pelgrom.js';
import type { DeviceGeometry, Stage } from '../src/index.js';
import { demoProcess, mirrorDesign, simpleDesign, withChanges } from './designs.js';
import { mirrorBisection } from './mirrorBisection.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

const pDesign: Design = withChanges(mirrorDesign, {
  input: { polarity: 'p', w: 6e-6, l: 1e-6 },
  load: { polarity: 'n', w: 2e-6, l: 2e-6 },
});
const correlated: Design = withChanges(mirrorDesign, {
  process: { n: { ...demoProcess.n, rho: 0.4 }, p: { ...demoProcess.p, rho: -0.3 } },
});
const all: [string, Design][] = [
  ['simple', simpleDesign],
  ['mirror', mirrorDesign],
  ['mirror, p input', pDesign],
  ['mirror, rho != 0', correlated],
  ['simple, weak inversion', withChanges(simpleDesign, { tail: 20e-9, input: { polarity: 'n', w: 4e-6, l: 4e-6 } })],
  ['mirror, strong inversion', withChanges(mirrorDesign, { tail: 2e-3 })],
];

describe('linearised sigma against the closed forms (reference values)', () => {
  it('check values computed from Pelgrom 1989 / Kinget 2005 (test/fixtures/check_values.py)', () => {
    // A_VT = 5 mV*um, A_beta = 1 %*um, gm/I_D = 10 /V. Quoted to 5 figures: 5e-5 relative.
    expect(rel(simpleStageSigma(pairSigma(5e-9, 5e-6, 5e-6), pairSigma(1e-8, 5e-6, 5e-6), 0.1), 1.0198e-3)).toBeLessThan(5e-5);
    expect(rel(simpleStageSigma(pairSigma(5e-9, 1e-6, 1e-6), pairSigma(1e-8, 1e-6, 1e-6), 0.1), 5.099e-3)).toBeLessThan(5e-5);
    const s10 = Math.sqrt(10e-12);
    const m = mirrorStageSigma(5e-9 / s10, 1e-8 / s10, 1 / 15, 5e-9 / s10, 1e-8 / s10, 0.5);
    expect(rel(m, 1.7927e-3)).toBeLessThan(5e-5);
  });

  it.each(all)('%s: sensitivities reproduce the closed form (identity, 1e-12 relative: rounding)', (_name, d) => {
    const st = compileStage(d);
    const [m1, , m3] = st.operatingPoint;
    const pi = d.process[d.input.polarity]!;
    const vtIn = pairSigma(pi.avt, d.input.w, d.input.l);
    const bIn = pairSigma(pi.abeta, d.input.w, d.input.l);
    let expected: number;
    if (d.topology === 'simple') {
      expected = simpleStageSigma(vtIn, bIn, 1 / m1!.gmOverId);
    } else {
      const pl = d.process[(d.load as DeviceGeometry).polarity]!;
      expected = mirrorStageSigma(
        vtIn, bIn, 1 / m1!.gmOverId,
        pairSigma(pl.avt, (d.load as DeviceGeometry).w, (d.load as DeviceGeometry).l), pairSigma(pl.abeta, (d.load as DeviceGeometry).w, (d.load as DeviceGeometry).l),
        m3!.gm / m1!.gm,
      );
    }
    if (pi.rho === 0 && (d.load === undefined || d.process[(d.load as DeviceGeometry).polarity]!.rho === 0)) {
      expect(rel(linearisedSigma(st), expected)).toBeLessThan(1e-12);
    } else {
      // With rho != 0 the closed form (independent draws) no longer holds; the sensitivities
      // are checked against the exact model by finite differences below instead.
      expect(linearisedSigma(st)).not.toBeCloseTo(expected, 9);
    }
  });

  it.each(all)('%s: sensitivities equal central differences of the exact offset', (_name, d) => {
    const st = compileStage(d);
    const u = new Float64Array(st.dimension);
    const h = 1e-4;
    for (let j = 0; j < st.dimension; j++) {
      u.fill(0);
      u[j] = h;
      const up = st.figure(u, 0);
      u[j] = -h;
      const dn = st.figure(u, 0);
      const fd = (up - dn) / (2 * h);
      // Central difference error ~ h^2 Vos'''/6 relative (~1e-8 at h = 1e-4 for sigmas of a few
      // percent) plus rounding ~1e-16 V / 1e-4: bound 1e-6 relative, or 1e-13 V absolute.
      expect(Math.abs(fd - st.sensitivities[j]!)).toBeLessThan(1e-6 * Math.abs(st.sensitivities[j]!) + 1e-13);
    }
  });
});

describe('variance budget', () => {
  it.each(all)('%s: shares sum to 1 (identity, rounding 1e-14)', (_name, d) => {
    const st = compileStage(d);
    const sum = varianceBudget(st).reduce((a, e) => a + e.share, 0);
    expect(Math.abs(sum - 1)).toBeLessThan(1e-14);
    const g = groupedBudget(st).reduce((a, e) => a + e.share, 0);
    expect(Math.abs(g - 1)).toBeLessThan(1e-14);
  });
  it('simple stage: V_T share = sigma_VT^2 / sigma^2 (computed from the closed form)', () => {
    const st = compileStage(simpleDesign);
    const vt = groupedBudget(st).find((e) => e.parameter === 'vt')!;
    const sVt = pairSigma(5e-9, 2e-6, 1e-6);
    expect(rel(vt.share, (sVt / linearisedSigma(st)) ** 2)).toBeLessThan(1e-12);
  });
});

const unit = fc.double({ min: -6, max: 6, noNaN: true });

describe('offset properties (fast-check)', () => {
  it.each(all)('%s: zero mismatch gives zero offset', (_name, d) => {
    const st = compileStage(d);
    // Rounding only: the two sides compute identical expressions.
    expect(Math.abs(st.figure(new Float64Array(st.dimension), 0))).toBeLessThan(1e-15);
  });

  it.each(all)('%s: swapping the input devices\' draws negates the offset (load draws zero)', (_name, d) => {
    const st = compileStage(d);
    fc.assert(
      fc.property(unit, unit, unit, unit, (a, b, c, e) => {
        const u = new Float64Array(st.dimension);
        u.set([a, b, c, e]);
        const x = st.figure(u, 0);
        u.set([c, e, a, b]);
        const y = st.figure(u, 0);
        // Rounding of the balance solve (1e-12 relative on currents) ~ 1e-13 V.
        return Math.abs(x + y) <= 1e-12 + 1e-12 * Math.abs(x);
      }),
      { seed: 7, numRuns: 300 },
    );
  });

  it.each(all)('%s: scaling both areas by k scales the linearised sigma by 1/sqrt(k)', (_name, d) => {
    fc.assert(
      fc.property(fc.double({ min: 0.01, max: 100, noNaN: true }), (k) => {
        const r = Math.sqrt(k);
        const scaled: Design = {
          ...d,
          input: { ...d.input, w: d.input.w * r, l: d.input.l * r },
          ...(d.load ? { load: { ...d.load, w: (d.load as DeviceGeometry).w * r, l: (d.load as DeviceGeometry).l * r } } : {}),
        };
        const ratio = linearisedSigma(compileStage(scaled)) / linearisedSigma(compileStage(d));
        // W/L kept, so IC and gm/I_D are unchanged: exact up to rounding (1e-12).
        return Math.abs(ratio * Math.sqrt(k) - 1) < 1e-12;
      }),
      { seed: 11, numRuns: 100 },
    );
  });

  it('simple stage: the exact offset equals the closed form written out (EKV inverse, Enz, Krummenacher & Vittoz, AICSP 8, 1995)', () => {
    const st = compileStage(simpleDesign);
    const [m1] = st.operatingPoint;
    const p = demoProcess.n;
    fc.assert(
      fc.property(unit, unit, unit, unit, (a, b, c, e) => {
        const u = Float64Array.of(a, b, c, e);
        const vt1 = m1!.sigmaVt * a;
        const vt2 = m1!.sigmaVt * c;
        const is1 = m1!.specificCurrent * Math.exp(m1!.sigmaBeta * b);
        const is2 = m1!.specificCurrent * Math.exp(m1!.sigmaBeta * e);
        const ut = st.thermalVoltage;
        const want = vt1 - vt2 + p.slope * ut * (ekvInverse(5e-6 / is1) - ekvInverse(5e-6 / is2));
        return Math.abs(st.figure(u, 0) - want) < 1e-15 + 1e-12 * Math.abs(want);
      }),
      { seed: 3, numRuns: 500 },
    );
  });
});

/** An independent solve of the mirror balance from its definition (mirrorBisection.ts): Vos. */
const mirrorReference = (st: Stage, u: Float64Array): number => mirrorBisection(st, u).vos;

describe('mirror balance solve', () => {
  it('agrees with an independent bisection on I1 + I4(I1) = I_B (the balance definition above)', () => {
    for (const d of [mirrorDesign, pDesign, withChanges(mirrorDesign, { tail: 2e-3 }), withChanges(mirrorDesign, { tail: 1e-12 })]) {
      const st = compileStage(d);
      fc.assert(
        fc.property(fc.array(unit, { minLength: 8, maxLength: 8 }), (arr) => {
          const u = Float64Array.from(arr);
          // Both solves stop at ~1e-12 relative current; dVos ~ n U_T * 2e-12 ~ 1e-13 V.
          return Math.abs(st.figure(u, 0) - mirrorReference(st, u)) < 1e-11;
        }),
        { seed: 5, numRuns: 200 },
      );
    }
  });

  it('converges for extreme mismatch (30% sigma(dbeta/beta), +-8 sigma draws) with no NaN', () => {
    // A tiny device: A_beta / sqrt(2 W L) = 0.3 -> W L = (1e-8 / 0.3)^2 / 2.
    const side = Math.sqrt((1e-8 / 0.3) ** 2 / 2);
    const d = withChanges(mirrorDesign, {
      input: { polarity: 'n', w: side, l: side },
      load: { polarity: 'p', w: side, l: side },
      process: { n: { ...demoProcess.n, abeta: 1e-8 }, p: { ...demoProcess.p, abeta: 1e-8 } },
    });
    const st = compileStage(d);
    expect(Math.abs(st.operatingPoint[0]!.sigmaBeta - 0.3)).toBeLessThan(1e-12);
    const n = 2000;
    const u = new Float64Array(n * 8);
    for (let i = 0; i < u.length; i++) u[i] = ((i * 7919) % 17) - 8; // deterministic values in [-8, 8]
    const out = new Float64Array(n);
    expect(st.figures(u, n, out, 0)).toBe(0);
    for (const x of out) expect(Number.isFinite(x)).toBe(true);
  });
});

describe('current-factor rule on a tiny device (sigma(dbeta/beta) = 30%)', () => {
  it('beta stays positive and the offset finite at +-10 sigma draws', () => {
    const side = Math.sqrt((1e-8 / 0.3) ** 2 / 2);
    const st = compileStage(withChanges(simpleDesign, { input: { polarity: 'n', w: side, l: side } }));
    for (const z of [-10, -5, 5, 10]) {
      const x = st.figure(Float64Array.of(0, z, 0, 0), 0);
      expect(Number.isFinite(x)).toBe(true);
      // Log-normal rule: I_S1 = I_S exp(0.3 z) > 0; sign: a larger beta1 needs less V_G1.
      expect(Math.sign(x)).toBe(-Math.sign(z));
    }
  });
});

describe('operating point', () => {
  it('reports current, IC, region, gm/I_D, overdrive, area for every device', () => {
    const st = compileStage(mirrorDesign);
    expect(st.operatingPoint.map((o) => o.device)).toEqual(['M1', 'M2', 'M3', 'M4']);
    const m1 = st.operatingPoint[0]!;
    // I_S = 2 n KP (W/L) U_T^2 (EKV 1995): 2*1.3*300e-6*2*U_T^2; I_D = 5 uA.
    const is = 2 * 1.3 * 300e-6 * 2 * st.thermalVoltage ** 2;
    expect(rel(m1.ic, 5e-6 / is)).toBeLessThan(1e-14);
    expect(m1.current).toBe(5e-6);
    expect(m1.gateArea).toBeCloseTo(2e-12, 20);
    expect(rel(ekvForward(m1.overdrive / (1.3 * st.thermalVoltage)), m1.ic)).toBeLessThan(1e-12);
  });
});

describe('validation at the library edge', () => {
  it.each([
    [{ ...simpleDesign, tail: -1 }, 'tail'],
    [{ ...simpleDesign, tail: Number.NaN }, 'tail'],
    [{ ...simpleDesign, topology: 'mirror' }, 'load'],
    [{ ...mirrorDesign, topology: 'simple' }, 'load'],
    [{ ...simpleDesign, input: { polarity: 'p', w: 1e-6, l: 1e-6 }, process: { n: demoProcess.n } }, 'process.p'],
    [{ ...simpleDesign, process: { n: { ...demoProcess.n, rho: 1.5 } } }, 'process.n.rho'],
    [{ ...simpleDesign, process: { n: { ...demoProcess.n, slope: 0.9 } } }, 'process.n.slope'],
    [{ ...simpleDesign, spec: { offset: 1e-3, instances: 2.5 } }, 'spec.instances'],
  ])('refuses %#, naming %s', (d, field) => {
    try {
      compileStage(d as Design);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      expect((e as InputError).field).toBe(field);
    }
  });
});

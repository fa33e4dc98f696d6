/**
 * The folded-cascode input stage (topology: folded): its exact balance against an independent
 * bisection, its linearised sigma against the closed form and central differences, the identity
 * with the simple stage when the sources and the load match, and the design-file rules. All
 * designs are invented.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design, ProcessParams } from '../src/design.js';
import { isInputError } from '../src/errors.js';
import { linearisedSigma } from '../src/linearised.js';
import { parseDesign } from '../src/parse/parseDesign.js';
import { writeDesign } from '../src/parse/writeDesign.js';
import { pairSigma } from '../src/pelgrom.js';
import { FOLDED_STAGE } from '../src/stages/folded.js';
import { demoProcess, foldedDesign, simpleDesign } from './designs.js';
import { bisectionOffset, block } from './foldedBisection.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

/** The check design (test/designs.ts): n pair 8/1 um, p sources 4/2 um at 20 uA, n load 4/2 um, 20 uA tail, 300 K. */
const folded: Design = foldedDesign;
const pInput: Design = {
  ...folded,
  input: { polarity: 'p', w: 16e-6, l: 1e-6 },
  sources: { polarity: 'n', w: 2e-6, l: 4e-6, current: 30e-6 },
  load: { polarity: 'p', w: 8e-6, l: 2e-6 },
};
const weak: Design = { ...folded, tail: 40e-9, sources: { polarity: 'p', w: 4e-6, l: 2e-6, current: 50e-9 } };
const strong: Design = { ...folded, tail: 2e-3, sources: { polarity: 'p', w: 40e-6, l: 2e-6, current: 1.5e-3 } };
const correlated: Design = { ...folded, process: { n: { ...demoProcess.n, rho: 0.5 }, p: { ...demoProcess.p, rho: -0.4 } } };
const designs: [string, Design][] = [
  ['n input, moderate inversion (the check design)', folded],
  ['p input, n sources, p load', pInput],
  ['weak inversion throughout', weak],
  ['strong inversion, sources carrying 1.5x the tail', strong],
  ['rho != 0', correlated],
];

describe('folded stage: exact balance (reference: independent bisection on the balance)', () => {
  const draw = fc.array(fc.double({ min: -4, max: 4, noNaN: true }), { minLength: 12, maxLength: 12 });
  it.each(designs)('%s: agrees with bisection to 1e-8 of sigma', (_n, d) => {
    const st = compileStage(d);
    const scale = linearisedSigma(st);
    fc.assert(
      fc.property(draw, (u) => {
        const got = st.figure(Float64Array.from(u), 0);
        // 200 halvings leave I1 exact to rounding; the stage stops at a balance residual of 1e-12
        // of the folded current, which moves Vos by about 1e-12 (I_src/gm_in) (~1e-15 V here).
        // 1e-8 of sigma covers that and the rounding of the two routes through ln and exp
        // (the reference goes through the EKV inverse of I7, which loses digits at small IC).
        expect(Math.abs(got - bisectionOffset(d, u))).toBeLessThan(1e-8 * scale);
      }),
      { numRuns: 200, seed: 12001 },
    );
  });

  it('the batch form gives the same bits as one sample at a time, and no draw within 6 sigma fails to balance', () => {
    const st = compileStage(folded);
    const n = 4000;
    const u = new Float64Array(n * 12);
    // A fixed, deterministic spread of draws over +-6 (no random source needed for coverage).
    for (let i = 0; i < u.length; i++) u[i] = 6 * Math.sin(1.7 * i + 0.3);
    const out = new Float64Array(n);
    expect(st.figures(u, n, out, 0)).toBe(0);
    for (let i = 0; i < n; i += 97) expect(out[i]).toBe(st.figure(u, 12 * i));
  });

  it('a draw whose folding sources cannot carry the tail current has no balance: NaN, counted, never a number', () => {
    // sources.current just above tail/2, and M5's V_T 65 mV high (40 sigma): I5 + I6 < I_B, so
    // no I1 in (0, I_B) balances the branches.
    const st = compileStage({ ...folded, sources: { polarity: 'p', w: 4e-6, l: 2e-6, current: 10.2e-6 } });
    const u = new Float64Array(12);
    u[4] = 40;
    expect(st.figure(u, 0)).toBeNaN();
    const out = new Float64Array(1);
    expect(st.figures(u, 1, out, 0)).toBe(1);
  });

  it('with the sources and the load matched the offset is the simple stage\'s for the same input draws (identity, 1e-15 V)', () => {
    const simple = compileStage({ ...simpleDesign, tail: folded.tail!, input: folded.input });
    const st = compileStage(folded);
    fc.assert(
      fc.property(fc.array(fc.double({ min: -6, max: 6, noNaN: true }), { minLength: 4, maxLength: 4 }), (u) => {
        const a = st.figure(Float64Array.of(...u, 0, 0, 0, 0, 0, 0, 0, 0), 0);
        const b = simple.figure(Float64Array.from(u), 0);
        // Matched sources and mirror give I1 = I2 = I_B/2 up to the solve's residual (1e-12 of
        // the folded current): Vos moves by under 1e-12 (I_src/gm_in) ~ 1e-16 V, plus rounding.
        expect(Math.abs(a - b)).toBeLessThan(1e-15 + 1e-12 * Math.abs(b));
      }),
      { numRuns: 300, seed: 12002 },
    );
  });

  it('a one-sigma strong M5 raises Vos, a strong M8 lowers it (signs from the balance: I1 - I2 = I5 - I6 - I_load ln(I8/I7))', () => {
    const st = compileStage(folded);
    const u = new Float64Array(12);
    u[5] = 1; // M5 current factor up: more current on M1's side at balance
    expect(st.figure(u, 0)).toBeGreaterThan(0);
    u[5] = 0;
    u[11] = 1; // M8 copies more: M2's side must carry less
    expect(st.figure(u, 0)).toBeGreaterThan(0);
    u[11] = 0;
    u[10] = 1; // M8's V_T up: it copies less
    expect(st.figure(u, 0)).toBeLessThan(0);
  });
});

describe('folded stage: linearised sigma (first-order analysis of the balance; Kinget, IEEE JSSC 40(6), 2005 for the mirror stage)', () => {
  it.each(designs.filter(([, d]) => (d.process.n?.rho ?? 0) === 0))('%s: sensitivities reproduce the six-term closed form with pair sigmas A/sqrt(WL), to 1e-12', (_n, d) => {
    const st = compileStage(d);
    const [m1, , m5, , m7] = st.operatingPoint;
    const g = (key: string): [ProcessParams, number, number] => {
      const b = block(d, key);
      return [d.process[b.polarity]!, b.w, b.l];
    };
    const [pi, wi, li] = g('input');
    const [ps, ws, ls] = g('sources');
    const [pl, wl, ll] = g('load');
    const gmIn = m1!.gm;
    const expected = Math.sqrt(
      pairSigma(pi.avt, wi, li) ** 2 +
        (m1!.current / gmIn) ** 2 * pairSigma(pi.abeta, wi, li) ** 2 +
        (m5!.gm / gmIn) ** 2 * pairSigma(ps.avt, ws, ls) ** 2 +
        (m5!.current / gmIn) ** 2 * pairSigma(ps.abeta, ws, ls) ** 2 +
        (m7!.gm / gmIn) ** 2 * pairSigma(pl.avt, wl, ll) ** 2 +
        (m7!.current / gmIn) ** 2 * pairSigma(pl.abeta, wl, ll) ** 2,
    );
    // Same formula by two routes (per-variable sensitivities vs pair sigmas): rounding only.
    expect(rel(linearisedSigma(st), expected)).toBeLessThan(1e-12);
  });

  it('the check design: 2.434 mV (computed from the first-order balance by test/fixtures/folded_reference.py; an independent implementation gave the same to 0.03%)', () => {
    // The script prints 2.434481 mV; quoted here to 4 figures: half a unit in the 4th is 2e-4.
    expect(rel(linearisedSigma(compileStage(folded)), 2.434e-3)).toBeLessThan(2.1e-4);
  });

  it.each(designs)('%s: the sensitivities equal central differences of the exact model (1e-6 relative)', (_n, d) => {
    const st = compileStage(d);
    const h = 1e-4;
    for (let j = 0; j < st.dimension; j++) {
      const up = new Float64Array(st.dimension);
      const dn = new Float64Array(st.dimension);
      up[j] = h;
      dn[j] = -h;
      const fd = (st.figure(up, 0) - st.figure(dn, 0)) / (2 * h);
      // Central-difference error h^2 Vos'''/6 (~1e-8 relative at h = 1e-4 for per-mille
      // mismatch), plus the solve's residual (1e-12 of the folded current) over 2h: 1e-6 relative.
      expect(Math.abs(fd - st.sensitivities[j]!)).toBeLessThan(1e-6 * Math.abs(st.sensitivities[j]!) + 1e-13);
    }
  });

  it('names its twelve variables M1, M2 (input), M5, M6 (sources), M7, M8 (load)', () => {
    const st = compileStage(folded);
    expect(st.variables.map((v) => v.name)).toEqual(['M1.dVT', 'M1.dbeta', 'M2.dVT', 'M2.dbeta', 'M5.dVT', 'M5.dbeta', 'M6.dVT', 'M6.dbeta', 'M7.dVT', 'M7.dbeta', 'M8.dVT', 'M8.dbeta']);
    expect(st.variables.map((v) => v.role)).toEqual(['input', 'input', 'input', 'input', 'sources', 'sources', 'sources', 'sources', 'load', 'load', 'load', 'load']);
    // Operating point: pair at I_B/2, sources at sources.current, each folded branch at the difference.
    expect(st.operatingPoint.map((o) => o.current)).toEqual([10e-6, 10e-6, 20e-6, 20e-6, 10e-6, 10e-6]);
  });
});

describe('folded stage: design file', () => {
  const text = [
    'temperature: 300 K',
    'topology: folded',
    'tail: 20 uA',
    'input:   { polarity: n, w: 8 um, l: 1 um }',
    'sources: { polarity: p, w: 4 um, l: 2 um, current: 20 uA }',
    'load:    { polarity: n, w: 4 um, l: 2 um }',
    'process:',
    '  n: { vt0: 0.45 V, slope: 1.3, kp: 300 uA/V^2, avt: 5 mV*um, abeta: 1 %*um }',
    '  p: { vt0: 0.50 V, slope: 1.35, kp: 90 uA/V^2, avt: 6.5 mV*um, abeta: 1.2 %*um }',
    'spec: { offset: 8 mV }',
  ].join('\n');

  it('reads sources.current in amperes, and writes back to the same doubles', () => {
    const d = parseDesign(text, { source: 'f.yaml' });
    expect(block(d, 'sources').current).toBe(20e-6);
    expect(parseDesign(writeDesign(d), { source: 'f.yaml' })).toEqual(d);
  });

  it.each([
    ['sources', text.replace(/^sources:.*\n/m, ''), 'sources: missing, but topology is folded; add sources: { polarity: p'],
    ['sources.current (missing)', text.replace(', current: 20 uA', ''), 'sources.current: missing; add current: 20 uA'],
    ['sources.current (not a current)', text.replace('current: 20 uA', 'current: 20 uV'), 'sources.current: expected a current such as "10 uA", got "20 uV"'],
    ['sources.current (not above tail/2)', text.replace('current: 20 uA', 'current: 10 uA'), 'sources.current: must exceed half the tail current (10 uA)'],
    ['sources.polarity', text.replace('{ polarity: p, w: 4 um, l: 2 um, current', '{ polarity: n, w: 4 um, l: 2 um, current'), 'sources.polarity: the folding current sources is the opposite polarity'],
    ['load.polarity', text.replace('load:    { polarity: n', 'load:    { polarity: p'), 'load.polarity: the bottom mirror is the same polarity as the input devices (input is n), so expected n, got "p"'],
    ['spec.error', text.replace('offset: 8 mV', 'error: 1 %'), 'spec.error: a folded stage is specified by its offset (offset: 10 mV); did you mean "offset"?'],
  ])('%s: refused with one line naming the field', (_f, t, fragment) => {
    let err: unknown;
    try {
      parseDesign(t, { source: 'f.yaml' });
    } catch (e) {
      err = e;
    }
    expect(isInputError(err)).toBe(true);
    expect((err as Error).message).toContain(fragment);
    expect((err as Error).message).not.toContain('\n');
  });

  it('the library refuses what the reader refuses: a design object whose branch current is not positive', () => {
    expect(() => compileStage({ ...folded, sources: { polarity: 'p', w: 4e-6, l: 2e-6, current: 8e-6 } })).toThrow(/^sources\.current: must exceed half the tail current/);
  });
});

describe('folded stage: edges', () => {
  // The strong design with a long narrow load (1/4 um): I_S7 = 2 n KP (W/L) U_T^2 = 0.13 uA, so
  // the branch's 0.5 mA puts M7 at IC ~ 3800, sqrt(IC7) ~ 62: the balance in the log domain.
  const strongLoad: Design = { ...strong, load: { polarity: 'n', w: 1e-6, l: 4e-6 } };
  it.each<[string, number[]]>([
    ['small draws', [0.5, -0.3, 0.2, 0.1, -1, 0.4, 0.3, -0.2, 1.5, -0.7, -0.8, 0.6]],
    ['M8 V_T 3000 sigma high: M8 off, I7 carries the whole folded current', [0.5, -0.3, 0.2, 0.1, -1, 0.4, 0.3, -0.2, 0, 0, 3000, 0]],
  ])('load deep in strong inversion (sqrt(IC7) > 30), %s: agrees with bisection (1e-8 relative)', (_n, u) => {
    const st = compileStage(strongLoad);
    expect(Math.sqrt(st.operatingPoint[4]!.ic)).toBeGreaterThan(30);
    const ref = bisectionOffset(strongLoad, u);
    expect(Number.isFinite(ref)).toBe(true);
    expect(Math.abs(st.figure(Float64Array.from(u), 0) - ref)).toBeLessThan(1e-8 * Math.abs(ref));
  });
  it('an input current factor so far out that sqrt(IC1) underflows: no finite offset, NaN', () => {
    const st = compileStage(folded);
    const u = new Float64Array(12);
    u[1] = 1600 / st.operatingPoint[0]!.sigmaBeta; // z1 = 1600: e^{-z1} underflows
    expect(st.figure(u, 0)).toBeNaN();
  });
  it('warnings name the block of each device near the process minimum: input, then sources, then load', () => {
    const d: Design = { ...folded, process: { n: { ...demoProcess.n, minW: 3e-6, minL: 0.6e-6 }, p: { ...demoProcess.p, minW: 3e-6 } } };
    expect(compileStage(d).warnings.map((w) => w.split(' ')[0])).toEqual(['input.l', 'sources.w', 'load.w']);
  });
  it('the branch-current message states half the tail and the value given, in amperes', () => {
    expect(() => compileStage({ ...folded, sources: { polarity: 'p', w: 4e-6, l: 2e-6, current: 8e-6 } })).toThrow(
      'sources.current: must exceed half the tail current (10 uA): each folded branch carries sources.current - tail/2 at balance, got 8 uA; raise sources.current or lower tail',
    );
  });
  it('a design that skipped validation without sources.current is an internal error, named', () => {
    const d = { ...folded, sources: { polarity: 'p', w: 4e-6, l: 2e-6 } } as Design;
    expect(() => FOLDED_STAGE.compile(d)).toThrow(/^internal: sources\.current missing after validation$/);
  });
});

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compileConditions } from '../src/compileStage.js';
import { compileStage } from '../src/compileStage.js';
import { conditionDesign, defaultDriftPair, namedDriftPair } from '../src/conditions.js';
import type { Design, OperatingCondition } from '../src/design.js';
import { InputError } from '../src/errors.js';
import { parseDesign } from '../src/parse/parseDesign.js';
import { writeDesign } from '../src/parse/writeDesign.js';
import { stageDefinition } from '../src/stages/registry.js';
import { kpAtTemperature, KP_EXPONENT_DEFAULT } from '../src/temperatureLaw.js';
import { BOLTZMANN, ELEMENTARY_CHARGE, thermalVoltage } from '../src/thermal.js';
import { validateDesign } from '../src/validateDesign.js';
import type { Stage } from '../src/stages/definition.js';
import { demoProcess, foldedDesign, mirrorDesign, simpleDesign, withChanges } from './designs.js';
import { draws } from './testDraws.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

const resistorDesign: Design = {
  ...simpleDesign,
  name: 'test resistor (invented)',
  topology: 'resistor',
  load: { w: 2e-6, l: 10e-6, r: 20e3 },
  process: { ...demoProcess, resistor: { ar: 5e-9 } },
};

/** The draws with every V_T variable (or every current-factor variable) set to 0. */
function only(stage: Stage, u: Float64Array, keep: 'vt' | 'beta'): Float64Array {
  return Float64Array.from(u, (x, j) => (stage.variables[j]!.parameter === keep ? x : 0));
}

describe('temperature law KP(T) = KP (T / T_process)^m', () => {
  it.each([
    ['simple', simpleDesign],
    ['mirror', mirrorDesign],
    ['resistor', resistorDesign],
  ] as const)('%s: without process.temperature the stage compiles exactly as its module does without the law (identity, every bit)', (_n, d) => {
    const law = compileStage(d);
    const bare = stageDefinition(d.topology).compile(validateDesign(d));
    const pinned = compileStage({ ...d, process: { ...d.process, temperature: d.temperature } });
    for (const u of draws(law.dimension, 50, 3)) {
      expect(law.figure(u, 0)).toBe(bare.figure(u, 0));
      expect(pinned.figure(u, 0)).toBe(bare.figure(u, 0));
    }
    expect(Array.from(law.sensitivities)).toEqual(Array.from(bare.sensitivities));
    expect(law.operatingPoint).toEqual(bare.operatingPoint);
  });

  it('I_S at another temperature is 2 n KP(T) (W/L) U_T(T)^2 with KP(T) = KP (T/T0)^-1.5 (EKV 1995 definition; 1e-13 relative, rounding)', () => {
    const d = withChanges(simpleDesign, { temperature: 398.15, process: { ...demoProcess, temperature: 300 } });
    const op = compileStage(d).operatingPoint[0]!;
    const ut = (BOLTZMANN * 398.15) / ELEMENTARY_CHARGE;
    const kp = 300e-6 * (398.15 / 300) ** -1.5;
    expect(rel(op.specificCurrent, 2 * 1.3 * kp * (2e-6 / 1e-6) * ut * ut)).toBeLessThan(1e-13);
    expect(KP_EXPONENT_DEFAULT).toBe(-1.5);
    // kp_exponent is honoured: m = -2 gives KP (T/T0)^-2.
    const d2 = withChanges(d, { process: { n: { ...demoProcess.n, kpExponent: -2 }, temperature: 300 } });
    expect(rel(compileStage(d2).operatingPoint[0]!.specificCurrent, 2 * 1.3 * 300e-6 * (398.15 / 300) ** -2 * 2 * ut * ut)).toBeLessThan(1e-13);
    expect(kpAtTemperature(3e-4, 300, 300, -1.5)).toBe(3e-4);
  });

  it('the slope factor and the matching coefficients do not move with temperature (per-device sigmas equal at every condition, exactly)', () => {
    const d = { ...mirrorDesign, conditions: [{ name: 'cold', temperature: 233.15 }, { name: 'hot', temperature: 398.15 }] };
    const [a, b] = compileConditions(d);
    a!.stage.operatingPoint.forEach((op, i) => {
      expect(op.sigmaVt).toBe(b!.stage.operatingPoint[i]!.sigmaVt);
      expect(op.sigmaBeta).toBe(b!.stage.operatingPoint[i]!.sigmaBeta);
    });
  });
});

describe('conditions: designs of the same stage type', () => {
  it('a condition that sets nothing compiles to exactly the design (identity, every bit)', () => {
    for (const d of [simpleDesign, mirrorDesign, resistorDesign]) {
      const own = compileStage(d);
      const [c] = compileConditions({ ...d, conditions: [{ name: 'own' }] });
      for (const u of draws(own.dimension, 30, 5)) expect(c!.stage.figure(u, 0)).toBe(own.figure(u, 0));
    }
  });

  it('a common V_T shift leaves every offset unchanged (only V_T differences and inversion levels enter: exact)', () => {
    const d = { ...mirrorDesign, conditions: [{ name: 'base' }, { name: 'vt', shift: { n: { vt0: 0.05 }, p: { vt0: -0.03 } } }] };
    const [a, b] = compileConditions(d);
    for (const u of draws(a!.stage.dimension, 30, 6)) expect(b!.stage.figure(u, 0)).toBe(a!.stage.figure(u, 0));
  });

  it('a kp shift of -10 % multiplies the temperature-scaled KP, so I_S, by 0.90 (1e-15 relative, rounding)', () => {
    const d = { ...mirrorDesign, conditions: [{ name: 'hot', temperature: 398.15 }, { name: 'hot-slow', temperature: 398.15, shift: { n: { kp: -0.1 }, p: { kp: -0.1 } } }] };
    const [a, b] = compileConditions(d);
    a!.stage.operatingPoint.forEach((op, i) => expect(rel(b!.stage.operatingPoint[i]!.specificCurrent, 0.9 * op.specificCurrent)).toBeLessThan(1e-15));
  });

  it("the stage's own fields (tail, a block's field such as load.r) take the condition's value; the rest is inherited", () => {
    const d = { ...resistorDesign, conditions: [{ name: 'low', tail: 5e-6, load: { r: 10e3 } }] as OperatingCondition[] };
    const c = conditionDesign(d, d.conditions[0]!);
    expect(c['tail']).toBe(5e-6);
    expect(c['load']).toEqual({ w: 2e-6, l: 10e-6, r: 10e3 });
    expect(c.temperature).toBe(d.temperature);
    expect(c.conditions).toBeUndefined();
    expect(compileStage(c).operatingPoint[0]!.current).toBe(2.5e-6);
  });
});

describe("conditions on the other stage types (the stage's own fields, read from its definition)", () => {
  const folded: Design = foldedDesign;
  const currentMirror: Design = {
    name: 'current mirror (invented)',
    temperature: 300,
    topology: 'current-mirror',
    input: { polarity: 'n', w: 4e-6, l: 16e-6, current: 10e-6 },
    output: { polarity: 'n', w: 8e-6, l: 16e-6 },
    process: { n: demoProcess.n },
    spec: { error: 0.01, instances: 1 },
  };

  it.each([
    ['folded: sources.current', { ...folded, conditions: [{ name: 'own' }, { name: 'low', sources: { current: 16e-6 } }] } as Design, 'sources', 16e-6],
    ['current mirror: input.current', { ...currentMirror, conditions: [{ name: 'own' }, { name: 'low', input: { current: 2e-6 } }] } as Design, 'input', 2e-6],
  ] as const)('%s at a condition; a condition that sets nothing compiles to the design exactly', (_n, d: Design, role: string, current: number) => {
    const own = compileStage(d);
    const [same, low] = compileConditions(d);
    for (const u of draws(own.dimension, 20, 9)) expect(same!.stage.figure(u, 0)).toBe(own.figure(u, 0));
    const op = low!.stage.operatingPoint.find((o) => o.role === role)!;
    // The block's devices carry the condition's current (the folding sources, or the mirror's input).
    expect(rel(op.current, current)).toBeLessThan(1e-15);
    expect(low!.design[role]).toEqual({ ...(d[role] as object), current });
  });

  it("a structural or geometry key in a condition is refused naming the condition's field", () => {
    expect(() => validateDesign({ ...currentMirror, conditions: [{ name: 'x', output: { w: 1e-6 } }] })).toThrow(/^conditions\[0\]\.output: /);
    expect(() => validateDesign({ ...currentMirror, conditions: [{ name: 'x', tail: 1e-6 }] })).toThrow(/^conditions\[0\]\.tail: a current-mirror stage has no tail/);
    expect(() => validateDesign({ ...folded, conditions: [{ name: 'x', sources: { w: 1e-6 } }] })).toThrow(/^conditions\[0\]\.sources\.w: the geometry is the instance's own/);
  });
});

describe('drift checks (per sample, from the draws)', () => {
  // Weak inversion, exponential law (Mead 1989): I_i = I_S,i exp(v_i), so at balance
  // Vos = dV_T1 - dV_T2 + n U_T ln(beta_2/beta_1): the V_T part is temperature-independent and
  // the current-factor part is n (k/q) T ln(beta_2/beta_1), so its drift is Vos_beta / T.
  // The EKV inverse is v = ln IC + sqrt(IC) + O(IC) (Enz, Krummenacher & Vittoz 1995), so the
  // model follows this law to about sqrt(IC)/2 relative: 1e-9 needs IC near 1e-18, reached
  // here by a wide, short device at 1 aA; at IC = 1e-4 the bound is sqrt(IC) itself.
  const weak = (tail: number, w: number, l: number, kp: number): Design => ({
    ...simpleDesign,
    temperature: 250,
    tail,
    input: { polarity: 'n', w, l },
    process: { n: { ...demoProcess.n, kp } },
    conditions: [{ name: 'cold', temperature: 250 }, { name: 'hot', temperature: 400 }],
  });

  it.each([
    ['IC near 1e-19', weak(1e-18, 1e-2, 1e-8, 3e-3), 1e-9],
    ['IC near 1e-4', weak(5e-11, 2e-6, 1e-6, 300e-6), 1e-2],
  ] as const)('weak inversion (%s): drift = n (k/q) ln(beta_2/beta_1), the V_T part does not drift', (_n, d, tol) => {
    const [a, b] = compileConditions(d);
    const sa = a!.stage;
    const sb = b!.stage;
    const ic = Math.max(sa.operatingPoint[0]!.ic, sb.operatingPoint[0]!.ic);
    expect(ic).toBeLessThan(tol === 1e-9 ? 1e-18 : 1e-4);
    // The tolerance: sqrt(IC) at its largest, a bound on the EKV deviation from the exponential law.
    expect(tol).toBeGreaterThanOrEqual(Math.sqrt(ic));
    const n = demoProcess.n.slope;
    for (const u of draws(4, 200, 7)) {
      const va = sa.figure(u, 0);
      const vb = sb.figure(u, 0);
      const drift = (vb - va) / (400 - 250);
      // Rounding floor: a few units in the last place of the two offsets, over the span.
      const floor = (4 * Number.EPSILON * (Math.abs(va) + Math.abs(vb))) / 150;
      // ln(beta_i/beta) = sigma_beta u_beta,i (rho = 0), from the draws themselves.
      const sBeta = sa.variables[1]!.sigma;
      const lnRatio = sBeta * (u[3]! - u[1]!);
      const expected = (n * BOLTZMANN * lnRatio) / ELEMENTARY_CHARGE;
      expect(Math.abs(drift - expected)).toBeLessThanOrEqual(tol * Math.abs(expected) + floor);
      // Vos_beta / T at either condition gives the same drift.
      const vosBeta = sa.figure(only(sa, u, 'beta'), 0);
      expect(Math.abs(drift - vosBeta / 250)).toBeLessThanOrEqual(tol * Math.abs(expected) + floor);
      // The V_T part alone: equal at both temperatures (rounding only).
      const vt = only(sa, u, 'vt');
      expect(Math.abs(sb.figure(vt, 0) - sa.figure(vt, 0))).toBeLessThanOrEqual(4 * Number.EPSILON * Math.abs(sa.figure(vt, 0)));
    }
  });

  it('strong inversion with KP ~ T^-1.5: the current-factor offset scales as T^0.75 per sample, so it drifts as 0.75 Vos_beta / T (square law)', () => {
    // Square law at fixed current: V_ov = sqrt(2 n I / beta) and beta ~ KP ~ T^-1.5, so the
    // current-factor offset, a difference of overdrives, is proportional to T^0.75. In the
    // EKV form n U_T v = 2 n U_T sqrt(IC) + 2 n U_T ln(1 - exp(-sqrt IC)), whose second term
    // is below e^-70 relative at IC >= 5000: the law holds to rounding (1e-9 asked).
    const d: Design = {
      ...simpleDesign,
      temperature: 300,
      tail: 20e-3,
      input: { polarity: 'n', w: 1e-6, l: 10e-6 },
      conditions: [{ name: 'a', temperature: 300 }, { name: 'b', temperature: 301 }, { name: 'c', temperature: 400 }],
    };
    const [a, b, c] = compileConditions(d);
    expect(Math.min(a!.stage.operatingPoint[0]!.ic, c!.stage.operatingPoint[0]!.ic)).toBeGreaterThan(5000);
    for (const u of draws(4, 200, 8)) {
      const beta = only(a!.stage, u, 'beta');
      const va = a!.stage.figure(beta, 0);
      expect(rel(c!.stage.figure(beta, 0), va * (400 / 300) ** 0.75)).toBeLessThan(1e-9);
      // First order in the step: over 1 K the drift is 0.75 Vos_beta / T at the midpoint to
      // (dT / T)^2 / 24 ~ 5e-7 relative (the Taylor remainder of T^0.75 about the midpoint).
      const drift = b!.stage.figure(u, 0) - a!.stage.figure(u, 0);
      const mid = 0.5 * (va + b!.stage.figure(beta, 0));
      expect(rel(drift, (0.75 * mid) / 300.5)).toBeLessThan(1e-6);
    }
  });

  it('thermal voltage used at a condition is kT/q at its temperature (2019 SI constants; exact)', () => {
    const [a] = compileConditions({ ...simpleDesign, conditions: [{ name: 'hot', temperature: 398.15 }] });
    expect(a!.stage.thermalVoltage).toBe(thermalVoltage(398.15));
  });
});

describe('the default drift pair', () => {
  const four: OperatingCondition[] = [
    { name: 'cold', temperature: 233.15 },
    { name: 'room', temperature: 300.15 },
    { name: 'hot', temperature: 398.15 },
    { name: 'hot-slow', temperature: 398.15, tail: 8e-6, shift: { n: { kp: -0.1 }, p: { kp: -0.1 } } },
  ];

  it('is the coldest and the hottest of the conditions that differ only in temperature', () => {
    const d = { ...mirrorDesign, conditions: four };
    expect(defaultDriftPair(d)).toEqual({ from: 0, to: 2 });
    // A condition that sets the design's own tail differs only in temperature too.
    expect(defaultDriftPair({ ...d, conditions: [{ name: 'x', temperature: 250, tail: 10e-6 }, { name: 'y', temperature: 350 }] })).toEqual({ from: 0, to: 1 });
    // No two at different temperatures with the rest equal: none.
    expect(defaultDriftPair({ ...d, conditions: [four[0]!, four[3]!] })).toBeNull();
    expect(namedDriftPair(d, ['hot-slow', 'cold'])).toEqual({ from: 3, to: 0 });
  });

  it('does not depend on the order of the list (property, fast-check seed 13)', () => {
    fc.assert(
      fc.property(fc.shuffledSubarray(four, { minLength: 4, maxLength: 4 }), (order) => {
        const p = defaultDriftPair({ ...mirrorDesign, conditions: order });
        expect(p).not.toBeNull();
        expect([order[p!.from]!.name, order[p!.to]!.name]).toEqual(['cold', 'hot']);
      }),
      { seed: 13, numRuns: 50 },
    );
  });
});

describe('conditions in a design file', () => {
  const base = `
name: conditions test (invented)
temperature: 27 C
topology: mirror
tail: 10 uA
input: { polarity: n, w: 2 um, l: 1 um }
load: { polarity: p, w: 4 um, l: 2 um }
process:
  temperature: 27 C
  n: { vt0: 0.45 V, slope: 1.3, kp: 300 uA/V^2, kp_exponent: -1.5, avt: 5 mV*um, abeta: 1 %*um }
  p: { vt0: 0.5 V, slope: 1.35, kp: 90 uA/V^2, avt: 6.5 mV*um, abeta: 1.2 %*um }
spec: { offset: 10 mV }
conditions:
  - { name: cold, temperature: -40 C }
  - { name: room, temperature: 27 C }
  - { name: hot-slow, temperature: 125 C, tail: 8 uA, shift: { n: { kp: -10 % }, p: { kp: -10 %, vt0: 20 mV } } }
`;
  const fails = (text: string): string => {
    try {
      parseDesign(text, { source: 'c.yaml' });
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      return (e as Error).message;
    }
    throw new Error('expected an InputError');
  };

  it('reads in SI units and writes back number for number', () => {
    const d = parseDesign(base, { source: 'c.yaml' });
    expect(d.process.temperature).toBe(300.15);
    expect(d.process.n?.kpExponent).toBe(-1.5);
    expect(d.conditions?.[2]).toEqual({ name: 'hot-slow', temperature: 398.15, tail: 8e-6, shift: { n: { kp: -0.1 }, p: { kp: -0.1, vt0: 0.02 } } });
    const again = parseDesign(writeDesign(d), { source: 'again.yaml' });
    expect(again).toEqual(d);
  });

  it.each([
    ['an unknown field, with the closest spelling', base.replace('tail: 8 uA', 'tial: 8 uA'), ['conditions[2].tial: ', 'did you mean "tail"?']],
    ['a duplicate name', base.replace('name: room', 'name: cold'), ['conditions[1].name: ', '"cold" is already the name of conditions[0]']],
    ['a temperature above 1000 K', base.replace('-40 C', '1200 K'), ['conditions[0].temperature: ', 'from 1 K to 1000 K', '1200 K']],
    ['a temperature below 1 K', base.replace('-40 C', '-273 C'), ['conditions[0].temperature: ', 'from 1 K to 1000 K']],
    ['a shift that makes kp non-positive', base.replace('n: { kp: -10 % }', 'n: { kp: -100 % }'), ['conditions[2].shift.n.kp: ', 'makes KP zero', 'above -100 %']],
    ['a shift with a unit that is not a fraction', base.replace('n: { kp: -10 % }', 'n: { kp: -10 mV }'), ['conditions[2].shift.n.kp: ', '"-10 mV"']],
    ['a shift key that is not kp or vt0', base.replace('n: { kp: -10 % }', 'n: { vth: 20 mV }'), ['conditions[2].shift.n.vth: ', 'did you mean "vt0"?']],
    ['a geometry', base.replace('{ name: cold, temperature: -40 C }', '{ name: cold, temperature: -40 C, input: { w: 3 um } }'), ['conditions[0].input: ', 'geometry is the instance']],
    ['a tail out of range', base.replace('tail: 8 uA', 'tail: 8 A'), ['conditions[2].tail: ', '8 A']],
    ['a name that is a number', base.replace('name: room', 'name: 3'), ['conditions[1].name: ', 'quotes']],
    ['no name', base.replace('name: room, ', ''), ['conditions[1].name: ', 'missing']],
    ['a list that is a mapping', base.replace(/conditions:[\s\S]*$/, 'conditions: { name: cold }\n'), ['conditions: ', 'a list']],
    ['an empty list', base.replace(/conditions:[\s\S]*$/, 'conditions: []\n'), ['conditions: ', 'empty']],
    ['65 conditions', base.replace(/conditions:[\s\S]*$/, `conditions:\n${Array.from({ length: 65 }, (_, i) => `  - { name: c${i} }`).join('\n')}\n`), ['conditions: ', 'at most 64']],
    ['a p-device |V_T0| shifted below 0', base.replace('vt0: 20 mV', 'vt0: -600 mV'), ['conditions[2].shift.p.vt0: ', 'negative']],
    ['kp_exponent out of range', base.replace('kp_exponent: -1.5', 'kp_exponent: -9'), ['process.n.kp_exponent: ', '-9']],
    ['process.temperature out of range', base.replace('temperature: 27 C\n  n:', 'temperature: 2000 K\n  n:'), ['process.temperature: ', '2000 K']],
  ])('refuses %s in one line naming the field', (_what, text, parts) => {
    const message = fails(text);
    expect(message.split('\n')).toHaveLength(1);
    for (const p of parts) expect(message).toContain(p);
  });

  it('a shift of a polarity the design lacks is refused at the library edge too', () => {
    const d = { ...simpleDesign, process: { n: demoProcess.n }, conditions: [{ name: 'slow', shift: { p: { kp: -0.1 } } }] };
    expect(() => validateDesign(d)).toThrow(/^conditions\[0\]\.shift\.p: the design has no process\.p/);
  });
});

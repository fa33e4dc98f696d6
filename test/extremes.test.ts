/**
 * Extreme but valid designs: tail currents from 1 fA to 50 mA, gate areas from 0.001 um^2 to
 * 1e5 um^2, temperatures from 4 K to 475 K and a 50% per-device sigma(dbeta/beta), for both
 * topologies. Each must give finite numbers everywhere (compiled stage, linearised sigma, a short
 * Monte Carlo run and a short importance-sampling run), report its non-converged samples, and
 * stay sensible; values past the design limits must be refused naming the field.
 */
import { compileStage, DESIGN_LIMITS, InputError, linearisedSigma, type Design, type DeviceGeometry, type TopologyName } from '@twinfet/core';
import { estimateHighSigma, simulate, type RunReport, type HighSigmaReport } from '@twinfet/montecarlo';
import { describe, expect, it } from 'vitest';
import { runCli } from './support/cli.js';
import { baseDesign } from './support/designs.js';
import { nonFinitePaths } from './support/finite.js';

const MC_SAMPLES = 4000;
const IS_SAMPLES = 5000;

/** Square devices of `areaUm2` for every pair of the design. */
function withArea(d: Design, areaUm2: number): Design {
  const side = Math.sqrt(areaUm2) * 1e-6;
  return {
    ...d,
    input: { ...d.input, w: side, l: side },
    ...(d.load === undefined ? {} : { load: { ...d.load, w: side, l: side } }),
  };
}

/** A_beta giving a per-device sigma(dbeta/beta) = A_beta / sqrt(2 W L) of `fraction` on every pair. */
function withBetaSigma(d: Design, fraction: number): Design {
  const abetaFor = (w: number, l: number): number => fraction * Math.sqrt(2 * w * l);
  const n = d.process.n!;
  const p = d.process.p!;
  return {
    ...d,
    process: {
      n: { ...n, abeta: abetaFor(d.input.w, d.input.l) },
      ...(d.load === undefined ? {} : { p: { ...p, abeta: abetaFor((d.load as DeviceGeometry).w, (d.load as DeviceGeometry).l) } }),
    },
  };
}

/** Largest per-device sigma(dbeta/beta) of a design, fraction (A_beta / sqrt(2 W L): Pelgrom 1989 with one draw per device). */
function maxBetaSigma(d: Design): number {
  const devices = d['load'] === undefined ? [d.input] : [d.input, d['load'] as DeviceGeometry];
  return Math.max(...devices.map((g) => d.process[g.polarity]!.abeta / Math.sqrt(2 * g.w * g.l)));
}

interface Outcome {
  readonly linear: number;
  readonly run: RunReport;
  readonly tail: HighSigmaReport;
}

async function evaluate(d: Design): Promise<Outcome> {
  const stage = compileStage(d);
  const linear = linearisedSigma(stage);
  const run = await simulate(d, { samples: MC_SAMPLES, workers: 1, seed: 'extreme' });
  const tail = await estimateHighSigma(d, { samples: IS_SAMPLES, workers: 1, seed: 'extreme' });
  return { linear, run, tail };
}

/** The checks every extreme case must pass. */
function expectFiniteAndSensible(d: Design, o: Outcome): void {
  const { linear, run, tail } = o;
  // No NaN or Infinity anywhere in either report (the CLI refuses to print one: output.ts assertFinite).
  expect(nonFinitePaths(run, 'run')).toEqual([]);
  expect(nonFinitePaths(tail, 'tail')).toEqual([]);
  expect(Number.isFinite(linear) && linear > 0).toBe(true);

  // Non-converged samples are counted, excluded and reported (exact integer bookkeeping).
  expect(Number.isInteger(run.nonConverged)).toBe(true);
  expect(run.evaluated).toBe(MC_SAMPLES - run.nonConverged);
  expect(run.warnings.some((w) => w.includes('did not converge'))).toBe(run.nonConverged > 0);
  expect(Number.isInteger(tail.nonConverged) && tail.nonConverged >= 0 && tail.nonConverged <= IS_SAMPLES).toBe(true);

  // Probabilities are probabilities and intervals hold their estimates (exact order relations).
  expect(run.yield.estimate).toBeGreaterThanOrEqual(0);
  expect(run.yield.estimate).toBeLessThanOrEqual(1);
  expect(run.yield.interval[0]).toBeLessThanOrEqual(run.yield.estimate);
  expect(run.yield.interval[1]).toBeGreaterThanOrEqual(run.yield.estimate);
  expect(run.offset.sigmaInterval[0]).toBeLessThanOrEqual(run.offset.sigma);
  expect(run.offset.sigmaInterval[1]).toBeGreaterThanOrEqual(run.offset.sigma);
  expect(tail.failureProbability).toBeGreaterThanOrEqual(0);
  expect(tail.failureProbability).toBeLessThanOrEqual(1);
  expect(tail.interval[0]).toBeLessThanOrEqual(tail.failureProbability);
  expect(tail.interval[1]).toBeGreaterThanOrEqual(tail.failureProbability);
  const signed = run.offset.quantiles.signed.map((q) => q.value);
  expect(signed.every((v) => v !== null)).toBe(true); // exact quantiles at 4000 samples are never "beyond"
  for (let i = 1; i < signed.length; i++) expect(signed[i]!).toBeGreaterThanOrEqual(signed[i - 1]!);

  // Sensible: the exact-model sigma lies within a factor of 2 of the linearised one even where the
  // model is far from linear (common practice, no source: a gross-error bound, not accuracy).
  expect(run.offset.sigma / linear).toBeGreaterThan(0.5);
  expect(run.offset.sigma / linear).toBeLessThan(2);
  if (maxBetaSigma(d) <= 0.02 && run.nonConverged === 0) {
    // Small mismatch: the exact sigma agrees with the linearised one to well under 1% (first-order model, Kinget 2005).
    // Allowance: 4 standard errors of a sample sigma, sigma / sqrt(2 (N - 1)), plus that 1%.
    const se = run.offset.sigma / Math.sqrt(2 * (run.evaluated - 1));
    expect(Math.abs(run.offset.sigma - linear)).toBeLessThan(4 * se + 0.01 * linear);
    // FORM on a nearly linear boundary: the sigma level is spec / sigma to 2% (Hasofer & Lind
    // 1974; 2% covers the small curvature from the beta term), also where the failure
    // probability itself underflows to 0 (the 1e3 and 1e5 um^2 pairs sit 50 to 600 sigma out).
    expect(Math.abs(tail.form.sigmaLevel / (d.spec.offset! / linear) - 1)).toBeLessThan(0.02);
  }
}

const TOPOLOGIES: readonly TopologyName[] = ['simple', 'mirror'];

describe.each(TOPOLOGIES)('%s stage', (topology) => {
  const base = baseDesign(topology);

  it.each([1e-15, 1e-12, 1e-9, 1e-6, 1e-3, 50e-3])('tail current %s A: finite, reported, sensible', async (tail) => {
    const d = { ...base, tail };
    expectFiniteAndSensible(d, await evaluate(d));
  });

  it.each([0.001, 0.1, 10, 1e3, 1e5])('gate area %s um^2 on every pair: finite, reported, sensible', async (area) => {
    const d = withArea(base, area);
    expectFiniteAndSensible(d, await evaluate(d));
  });

  it.each([
    [4, true],
    [77, true],
    [199, true],
    [200, false],
    [300, false],
    [450, false],
    [451, true],
    [475, true],
  ] as const)('temperature %s K: finite, and the out-of-range warning is %s', async (temperature, warned) => {
    const d = { ...base, temperature };
    // The usual range 200-450 K is the project's rule (compileStage.ts, common practice, no source), ends included.
    const stage = compileStage(d);
    expect(stage.warnings.some((w) => w.startsWith(`temperature ${temperature.toFixed(1)} K is outside 200-450 K`))).toBe(warned);
    const o = await evaluate(d);
    expect(o.run.warnings.some((w) => w.includes('outside 200-450 K'))).toBe(warned);
    expectFiniteAndSensible(d, o);
  });

  it('sigma(dbeta/beta) of 50% per device: finite numbers although far from linear', async () => {
    const d = withBetaSigma(base, 0.5);
    // The per-device sigma is what was asked for (A / sqrt(2 W L), Pelgrom 1989 with one draw per device); exact to rounding.
    expect(Math.abs(compileStage(d).variables[1]!.sigma - 0.5)).toBeLessThan(1e-12);
    const o = await evaluate(d);
    expectFiniteAndSensible(d, o);
    // The log-normal current factor makes the exact sigma differ from the linearised one by more
    // than sampling error here (4000 samples: SE ~1.1%); only finiteness and the factor-2 bound hold.
  });

  it('combined extremes (4 K, 0.001 um^2, 1 fA): many solves fail, and every one is counted and reported', async () => {
    const d = withArea({ ...base, temperature: 4, tail: 1e-15 }, 0.001);
    const o = await evaluate(d);
    expectFiniteAndSensible(d, o);
    if (topology === 'mirror') {
      // sigma(dV_T)/(n U_T) is ~340 per unit draw at 4 K, so the mirror's current ratio
      // exp(-dV_T/(n U_T)) leaves the doubles for a good share of the draws (seeded: this seed
      // gives ~1000 of 4000); the check is that they are reported, not how many.
      expect(o.run.nonConverged).toBeGreaterThan(0);
      expect(o.tail.nonConverged).toBeGreaterThan(0);
    } else {
      // The simple pair has a closed form: nothing to converge (exact).
      expect(o.run.nonConverged).toBe(0);
    }
  });
});

describe('beyond the design limits: a clear refusal naming the field', () => {
  const base = baseDesign('mirror');
  it.each<[string, Design, string]>([
    ['0.5 K', { ...base, temperature: 0.5 }, 'temperature'],
    ['2000 K', { ...base, temperature: 2000 }, 'temperature'],
    ['10 A tail', { ...base, tail: 10 }, 'tail'],
    ['1e-21 A tail', { ...base, tail: 1e-21 }, 'tail'],
    ['a 1 m wide load', { ...base, load: { polarity: 'p', w: 1, l: 2e-6 } }, 'load.w'],
    ['a 0.1 nm long input', { ...base, input: { polarity: 'n', w: 2e-6, l: 1e-10 } }, 'input.l'],
    ['A_VT of 5e-324 V*m', { ...base, process: { ...base.process, n: { ...base.process.n!, avt: 5e-324 } } }, 'process.n.avt'],
    ['a 1 nm x 1 nm load (sigma(dbeta/beta) 849% per device)', { ...base, load: { polarity: 'p', w: 1e-9, l: 1e-9 } }, 'load'],
    ['a 100 V spec', { ...base, spec: { offset: 100, instances: 1 } }, 'spec.offset'],
  ])('%s', (_what, d, field) => {
    let caught: unknown;
    try {
      compileStage(d);
    } catch (e) {
      caught = e;
    }
    // Exact: the project's own error type, the field path, one line (this project's rule).
    expect(caught).toBeInstanceOf(InputError);
    expect((caught as InputError).field).toBe(field);
    expect((caught as InputError).message).not.toContain('\n');
  });

  it('the limits include every extreme of the issue (1 fA..50 mA, 4..475 K, 0.001..1e5 um^2)', () => {
    // Exact comparisons against the exported limits (validateDesign.ts, this project's rule).
    expect(DESIGN_LIMITS.tail[0]).toBeLessThanOrEqual(1e-15);
    expect(DESIGN_LIMITS.tail[1]).toBeGreaterThanOrEqual(50e-3);
    expect(DESIGN_LIMITS.temperature[0]).toBeLessThanOrEqual(4);
    expect(DESIGN_LIMITS.temperature[1]).toBeGreaterThanOrEqual(475);
    expect(DESIGN_LIMITS.length[0]).toBeLessThanOrEqual(Math.sqrt(0.001) * 1e-6);
    expect(DESIGN_LIMITS.length[1]).toBeGreaterThanOrEqual(Math.sqrt(1e5) * 1e-6);
  });
});

describe('through the command line', () => {
  // (`run --method importance` takes the same path but has no sample cap: with every weight
  // underflowing it samples to the 1e7 maximum, ~6 s, so only `tail --samples` is run here.)
  it.each([['tail', ['--samples', '2000']]] as const)('%s on a 1e5 um^2 mirror pair 492 sigma from its spec: exit 0 and an all-finite JSON report', async (cmd, extra) => {
    const r = await runCli([cmd, 'test/fixtures/huge-pair.yaml', '--json', '--workers', '1', ...extra]);
    // Exit 0 and no "internal error: ... is Infinity" (output.ts refuses to print a non-finite number);
    // stderr holds at most warnings (a spec 492 sigma out is beyond the 50-sigma unit-slip rule).
    expect(r.stderr).toMatch(/^(twinfet: warning: [^\n]*\n)*$/);
    expect(r.stderr).not.toContain('internal error');
    expect(r.code).toBe(0);
    const report = JSON.parse(r.stdout) as Record<string, unknown>;
    expect(nonFinitePaths(report)).toEqual([]);
    const tail = report as unknown as HighSigmaReport;
    // FORM sigma level from the design-point distance, although 2 Phi(-492) underflows to 0:
    // spec / sigma_lin = 10 mV / 20.309 uV = 492.40 for this design (Kinget's mirror form with
    // the EKV gm/I_D, computed by test/fixtures/demo_sigma.py); the boundary is nearly linear
    // here, so 1% is generous (common practice, no source).
    expect(Math.abs(tail.form.sigmaLevel / 492.4 - 1)).toBeLessThan(0.01);
    expect(tail.failureProbability).toBe(0); // exact: below the smallest double
  });
});

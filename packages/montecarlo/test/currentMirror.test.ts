/**
 * The current mirror through the analyses: a dimensionless, two-sided figure (the relative current
 * error) carried through Monte Carlo, yield and sizing. The design is invented (the demo process,
 * not foundry data).
 */
import { compileStage, linearisedSigma, type Design, type DeviceGeometry } from '@twinfet/core';
import { describe, expect, it } from 'vitest';
import { simulate } from '../src/analyses/simulate.js';
import { createExecutor } from '../src/engine/pool.js';
import { sizeDesign } from '../src/sizing/size.js';
import { twoSidedTail } from '../src/stats/normal.js';
import { testProcess } from './designs.js';

/** A ratio-2 n mirror in strong inversion (IC 77), 0.21% linearised sigma. */
const mirror: Design = {
  name: 'test current mirror (invented)',
  temperature: 300.15,
  topology: 'current-mirror',
  input: { polarity: 'n', w: 4e-6, l: 16e-6, current: 10e-6 },
  output: { polarity: 'n', w: 8e-6, l: 16e-6 },
  process: { n: testProcess.n },
  spec: { error: 4e-3, instances: 64 },
};

/** Rounding W and L each up to 4 significant digits moves an area by at most (1 + 1e-3)^2. */
const ROUNDING = (1 + 1e-3) ** 2;

describe('current mirror: Monte Carlo of the current error on the exact model', () => {
  it('sigma within 4 standard errors of the linearised sigma; two-sided yield against 2 Phi(-spec/sigma) within 4 binomial SE', async () => {
    const r = await simulate(mirror, { samples: 200_000, seed: 31, workers: 1 });
    expect(r.figure).toMatchObject({ name: 'currentError', unit: '', sided: 'two' });
    const lin = linearisedSigma(compileStage(mirror));
    expect(Math.abs(lin / 2.133e-3 - 1)).toBeLessThan(5e-4); // as inspect prints it (4 figures)
    // SE of a normal sample's standard deviation: sigma / sqrt(2 (N - 1)).
    const se = r.offset.sigma / Math.sqrt(2 * (r.evaluated - 1));
    expect(Math.abs(r.offset.sigma - lin)).toBeLessThan(4 * se);
    // 0.4% is 1.9 sigma: both tails count (failuresHigh and failuresLow), P(|e| > spec) = 2 Phi(-k).
    const p = twoSidedTail(mirror.spec['error']! / lin);
    expect(Math.abs(r.yield.failure.estimate - p)).toBeLessThan(4 * Math.sqrt((p * (1 - p)) / r.evaluated));
    expect(r.yield.failuresHigh).toBeGreaterThan(0);
    expect(r.yield.failuresLow).toBeGreaterThan(0);
    // The chip of 64 copies: Y^64 (identity up to rounding of exp(64 log Y)).
    expect(Math.abs(r.chip.estimate / r.yield.estimate ** 64 - 1)).toBeLessThan(1e-12);
  });
});

describe('current mirror: sizing for a current-error sigma (area law, Pelgrom 1989; Kinget 2005)', () => {
  const executor = createExecutor(1);

  it('output.area: a_out = C_out / (target^2 - rest) with W/L kept (so the ratio stays 2), confirmed on the exact model', async () => {
    const target = 0.2e-2;
    const r = await sizeDesign(mirror, { target: { kind: 'sigma', sigma: target }, vary: 'output.area', executor, seed: 'size-out' });
    const st = compileStage(mirror);
    const outVar = st.variables.reduce((a, v, j) => a + (v.role === 'output' ? st.sensitivities[j]! ** 2 : 0), 0);
    const rest = linearisedSigma(st) ** 2 - outVar;
    const o = mirror['output'] as DeviceGeometry;
    const needed = (outVar * o.w * o.l) / (target ** 2 - rest);
    const got = r.linearised.pairs.find((p) => p.role === 'output')!.gateArea;
    expect(got).toBeGreaterThanOrEqual(needed * (1 - 1e-9));
    expect(got).toBeLessThanOrEqual(needed * ROUNDING * (1 + 1e-9));
    const after = r.design['output'] as DeviceGeometry;
    expect(Math.abs(after.w / after.l / (o.w / o.l) - 1)).toBeLessThan(2e-3);
    expect(r.design.input).toEqual(mirror.input);
    expect(r.confirmed.met).toBe(true);
    expect(r.confirmed.sigmaInterval![1]).toBeLessThanOrEqual(target);
  });

  it('both: the optimum total is (sqrt C_in + sqrt C_out)^2 / target^2 (Lagrange), confirmed by an independent Monte Carlo', async () => {
    const target = 0.15e-2;
    const r = await sizeDesign(mirror, { target: { kind: 'sigma', sigma: target }, vary: 'both', executor, seed: 'size-both' });
    const split = r.split!;
    expect(split.blocks.map((b) => b.block)).toEqual(['input', 'output']);
    const closed = (Math.sqrt(split.blocks[0]!.coefficient) + Math.sqrt(split.blocks[1]!.coefficient)) ** 2 / target ** 2;
    // Rounding W and L up to 4 digits moves W/L, so IC and gm/I_D, by up to 1e-3: the sized total
    // may sit that much below the closed form as well as above it.
    expect(split.optimum.total).toBeGreaterThanOrEqual(closed / ROUNDING);
    expect(split.optimum.total).toBeLessThanOrEqual(closed * ROUNDING * (1 + 1e-9));
    const check = await simulate(r.design, { samples: 200_000, seed: 'independent', executor, keepOffsets: false });
    const se = check.offset.sigma / Math.sqrt(2 * (check.evaluated - 1));
    expect(Math.abs(check.offset.sigma - r.result.sigmaLinearised)).toBeLessThan(4 * se);
    expect(check.offset.sigma).toBeLessThan(target + 4 * se);
    await executor.close();
  });
});

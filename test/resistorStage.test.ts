/**
 * The resistor-loaded pair through every analysis, end to end: the library's Monte Carlo against
 * the closed-form linearised sigma, and inspect, run, tail, size and sweep through the built CLI
 * on examples/resistor-pair.yaml (an invented demo process).
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { compileStage, linearisedSigma, pairSigma, type Design } from '@twinfet/core';
import { estimateHighSigma, simulate } from '@twinfet/montecarlo';
import { describe, expect, it } from 'vitest';
import { loadDesign } from '../packages/cli/src/designFile.js';
import { runCli } from './support/cli.js';

const EXAMPLE = fileURLToPath(new URL('../examples/resistor-pair.yaml', import.meta.url));

/** A resistor pair whose load matters: small resistor bodies, strong-ish inversion (invented). */
async function resistorHeavy(): Promise<Design> {
  const d = await loadDesign(EXAMPLE);
  return { ...d, load: { w: 0.5e-6, l: 1e-6, r: 20e3 }, process: { ...d.process, resistor: { ar: 2e-8 } } };
}

describe('resistor stage: Monte Carlo against the linearised closed form (Razavi 2017)', () => {
  it('the exact-model sigma is within 4 standard errors of the linearised one (small mismatch)', async () => {
    const d = await resistorHeavy();
    const st = compileStage(d);
    const p = d.process.n!;
    // Closed form: sigma^2 = s_VT^2 + (I_D/gm)^2 (s_beta^2 + s_R^2), pair sigmas A/sqrt(WL).
    const idOverGm = 1 / st.operatingPoint[0]!.gmOverId;
    const closed = Math.sqrt(
      pairSigma(p.avt, d.input.w, d.input.l) ** 2 + idOverGm ** 2 * (pairSigma(p.abeta, d.input.w, d.input.l) ** 2 + pairSigma(2e-8, 0.5e-6, 1e-6) ** 2),
    );
    expect(Math.abs(linearisedSigma(st) / closed - 1)).toBeLessThan(1e-12);
    const r = await simulate(d, { samples: 400_000, seed: 'resistor-mc', workers: 1 });
    // SE of a sample sigma: sigma / sqrt(2 (N - 1)); the offset is close to linear at these
    // sigmas (dR/R 4% per pair), so 4 SE is the bound.
    const se = r.offset.sigma / Math.sqrt(2 * (r.evaluated - 1));
    expect(Math.abs(r.offset.sigma - closed)).toBeLessThan(4 * se);
    // The resistors' share of the budget is visible: the load dR/R group carries its variance.
    const load = r.analytic.grouped.find((g) => g.role === 'load' && g.parameter === 'r');
    expect(load?.share).toBeGreaterThan(0.05);
  });

  it('the high-sigma estimate agrees with plain Monte Carlo where both are precise (about 2.7 sigma)', async () => {
    const d = await loadDesign(EXAMPLE);
    const mc = await simulate(d, { samples: 400_000, seed: 'resistor-plain', workers: 1 });
    const is = await estimateHighSigma(d, { seed: 'resistor-is', workers: 1, relError: 0.02 });
    const p = mc.yield.failure.estimate;
    const seMc = Math.sqrt((p * (1 - p)) / mc.evaluated);
    // Two independent estimators of one probability: their difference within 4 combined SE.
    expect(Math.abs(is.failureProbability - p)).toBeLessThan(4 * Math.hypot(seMc, is.standardError));
  });
});

describe('resistor stage through the CLI (inspect, run, tail, size, sweep)', () => {
  it('inspect --json shows both resistors, the gain and the dR/R budget line', async () => {
    const r = await runCli(['inspect', EXAMPLE, '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout) as { resistors: { device: string; voltageGain: number }[]; analytic: { grouped: { role: string; parameter: string }[] } };
    expect(j.resistors.map((x) => x.device)).toEqual(['R1', 'R2']);
    // gm R with gm = (gm/I_D) I_D at I_B/2: the stage's gain, as inspect computes it.
    expect(j.resistors[0]!.voltageGain).toBeGreaterThan(1);
    expect(j.analytic.grouped.some((g) => g.role === 'load' && g.parameter === 'r')).toBe(true);
    const text = await runCli(['inspect', EXAMPLE]);
    expect(text.stdout).toContain('load pair dR/R');
  });

  it('run, tail, size (load.area and both) and sweep (load.area) all exit 0 with one report each', async () => {
    const csv = join(mkdtempSync(join(tmpdir(), 'twinfet-resistor-')), 'samples.csv');
    const run = await runCli(['run', EXAMPLE, '--samples', '20000', '--json', '--samples-out', csv]);
    expect(run.code).toBe(0);
    // The samples file names the stage's six variables in sample order.
    expect(readFileSync(csv, 'utf8').split('\n', 1)[0]).toBe('sample,offset_V,M1_dVT_V,M1_dbeta_rel,M2_dVT_V,M2_dbeta_rel,R1_dR_rel,R2_dR_rel');
    expect((JSON.parse(run.stdout) as { figure: { name: string } }).figure.name).toBe('offset');
    const tail = await runCli(['tail', EXAMPLE, '--json']);
    expect(tail.code).toBe(0);
    const size = await runCli(['size', EXAMPLE, '--sigma', '1.5mV', '--vary', 'both', '--json']);
    expect(size.code).toBe(0);
    const s = JSON.parse(size.stdout) as { confirmed: { met: boolean }; split: { blocks: { block: string }[] } };
    expect(s.confirmed.met).toBe(true);
    expect(s.split.blocks.map((b) => b.block)).toEqual(['input', 'load']);
    const refused = await runCli(['size', EXAMPLE, '--sigma', '1.5mV', '--vary', 'load.area']);
    // The input pair's dV_T term alone exceeds 1.5 mV: sizing the resistors cannot reach it.
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain('set by the input pair dV_T term');
    const sweep = await runCli(['sweep', EXAMPLE, '--vary', 'load.area', '--from', '1um^2', '--to', '20um^2', '--steps', '3', '--samples', '5000', '--json']);
    expect(sweep.code).toBe(0);
  });
});

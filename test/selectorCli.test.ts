/**
 * The selector stage through the built command line (examples/selector-64.yaml, an invented
 * demo process): the reports read the figure's description (required lead L, one-sided, the
 * Bechhofer form), and the JSON carries the figure under its own name.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { compileStage, linearisedSigma } from '@twinfet/core';
import { correctSelection } from '@twinfet/montecarlo';
import { describe, expect, it } from 'vitest';
import { loadDesign } from '../packages/cli/src/designFile.js';
import { REPO_ROOT, runCli } from './support/cli.js';

const EXAMPLE = 'examples/selector-64.yaml';
const out = mkdtempSync(join(tmpdir(), 'twinfet-selector-'));

describe('twinfet with a selector (end to end, the built CLI)', () => {
  it('inspect: per-cell sigma, its budget and the Bechhofer form; --json carries analytic.cellSigma and analytic.yield', async () => {
    const text = await runCli(['inspect', EXAMPLE]);
    expect(text.code).toBe(0);
    for (const s of ['M2..M64 (n)', 'per-cell sigma sigma_c', 'spec L <=', 'Bechhofer correct selection', 'lead needed for P(correct)', 'each cell dV_T', 'share of sigma_c^2']) expect(text.stdout).toContain(s);
    expect(text.stdout).not.toContain('Vos');
    const j = JSON.parse((await runCli(['inspect', EXAMPLE, '--json'])).stdout);
    const design = await loadDesign(`${REPO_ROOT}${EXAMPLE}`);
    const sc = linearisedSigma(compileStage(design));
    // Same computation through JSON (all 17 digits kept).
    expect(j.analytic.cellSigma).toBe(sc);
    expect(j.analytic.yield.estimate).toBe(1 - (1 - correctSelection(64, 15e-3 / sc)));
    expect(j.analytic.yield.populations).toBe(64);
    expect(j.analytic.gaussian).toBeUndefined();
  });

  it('run --json: the figure is `lead`, its block replaces `offset`, yield.spec is the separation, with the Bechhofer form and the winner share beside it', async () => {
    const r = await runCli(['run', EXAMPLE, '--samples', '20000', '--json', '--workers', '2'], { timeoutMs: 120_000 });
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.figure.name).toBe('lead');
    expect(j.figure.sided).toBe('one');
    expect(j.offset).toBeUndefined();
    for (const k of ['mean', 'sigma', 'sigmaInterval', 'quantiles']) expect(j.lead).toHaveProperty(k);
    expect(j.yield.spec).toBe(15e-3);
    expect(j.yield.interval).toHaveLength(2);
    expect(j.analytic.cellSigma).toBeGreaterThan(0);
    expect(j.analytic.yield.estimate).toBeGreaterThan(0.99);
    expect(j.analytic.yieldAgreement.consistent).toBe(true);
    expect(j.response.label).toBe("winner's share of the tail");
    expect(j.response.at).toBe(15e-3);
    expect(j.chip.instances).toBe(4);
  });

  it('run (text, with --plot): one-sided quantiles, the skew note, the Bechhofer estimate and the winner share plot', async () => {
    const plot = join(out, 'share.svg');
    const r = await runCli(['run', EXAMPLE, '--samples', '20000', '--plot', plot, '--workers', '2'], { timeoutMs: 120_000 });
    expect(r.code).toBe(0);
    expect(r.stderr).toBe('');
    for (const s of ['required lead mean', 'required lead sigma', 'not symmetric', 'Bechhofer estimate', "winner's share of the tail at lead 15 mV", 'spec L <=']) expect(r.stdout).toContain(s);
    expect(r.stdout).not.toMatch(/^\|L\|/m);
    const svg = readFileSync(plot, 'utf8');
    expect(svg.startsWith('<svg')).toBe(true);
    expect(svg).toContain("winner's share of the tail (%)");
    expect(svg).toContain('1-99% of samples');
  });

  it('tail: one design point for 63 mirror-image regions, the spec written as L', async () => {
    const r = await runCli(['tail', EXAMPLE, '--spec', '20mV', '--rel-error', '0.1', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.mirrorRegions).toBe(63);
    expect(j.designPoints).toHaveLength(1);
    expect(j.designPoints[0].side).toBe('M2 beats M1');
    const text = await runCli(['tail', EXAMPLE, '--spec', '20mV', '--rel-error', '0.1']);
    for (const s of ['spec L <=', '63 mirror images', 'FORM estimate (sum over regions)']) expect(text.stdout).toContain(s);
    expect(text.stdout).not.toContain('|Vos|');
  });

  it('size --yield and sweep --vary cells read the figure (L, required lead) and the law (Bechhofer)', async () => {
    const s = await runCli(['size', EXAMPLE, '--yield', '0.9999', '--vary', 'input.area'], { timeoutMs: 120_000 });
    expect(s.code).toBe(0);
    for (const t of ['at L <= 15 mV', 'Bechhofer estimate', '(L > 15 mV']) expect(s.stdout).toContain(t);
    const w = await runCli(['sweep', EXAMPLE, '--vary', 'cells', '--from', '2', '--to', '8', '--steps', '2', '--samples', '2000'], { timeoutMs: 120_000 });
    expect(w.code).toBe(0);
    expect(w.stdout).toContain('sweeping cells');
    const both = await runCli(['sweep', EXAMPLE, '--vary', 'spec.separation', '--from', '5mV', '--to', '9mV', '--spec', '3mV']);
    expect(both.code).toBe(2);
    expect(both.stderr).toContain('--vary spec.separation');
  });
});

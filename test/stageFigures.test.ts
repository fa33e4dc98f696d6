/**
 * The two stage types of the folded-cascode and current-mirror examples through every command of
 * the built CLI. The current mirror's figure is dimensionless (a relative current error, shown in
 * %): no report may print it in volts, and every option that takes a value of the figure (--spec,
 * --sigma, --target-sigma) reads a percentage. Run `npx tsc -b` first. Checks are exact string
 * and integer comparisons unless a tolerance is stated.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { compileStage, linearisedSigma } from '@twinfet/core';
import { loadDesign } from '../packages/cli/src/designFile.js';

const root = fileURLToPath(new URL('..', import.meta.url));
const bin = join(root, 'packages/cli/bin/twinfet.js');
const mirror = join(root, 'examples/bias-mirror.yaml');
const folded = join(root, 'examples/folded-cascode-ota.yaml');
const out = mkdtempSync(join(tmpdir(), 'twinfet-stages-'));

/** Runs the CLI; the sampling commands on one worker (inspect takes no --workers). */
function twinfet(...args: string[]): { code: number; stdout: string; stderr: string } {
  const workers = args[0] === 'inspect' ? [] : ['--workers', '1'];
  const r = spawnSync(process.execPath, [bin, ...args, ...workers], { cwd: root, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

/** A number followed by a volt unit (5 mV, 12.3 uV, 0.4 V): what a dimensionless figure's lines must not hold. */
const VOLTS = /\d\s*[munpf]?V\b/;

/** The lines of a report that mention the figure (by its label, symbol or the spec), and the budget rows. */
function figureLines(text: string): string[] {
  return text.split('\n').filter((l) => /current error|\|e\||spec|sigma part|device (dV_T|dbeta)|^e\s|area rule|linearised sigma|confirmed/.test(l) && !/^warning:/.test(l));
}

describe('current mirror (examples/bias-mirror.yaml): a dimensionless figure through every command', () => {
  it('inspect: the current error in %, budget per device; --json names the figure and gives the library sigma', async () => {
    const r = twinfet('inspect', mirror);
    expect(r.code).toBe(0);
    for (const s of ['current error sigma (linearised)    0.2133 %', 'spec |e| <=', 'input device dV_T', 'output device dbeta/beta']) expect(r.stdout).toContain(s);
    const lines = figureLines(r.stdout);
    expect(lines.length).toBeGreaterThanOrEqual(6);
    for (const l of lines) expect(l).not.toMatch(VOLTS);
    expect(r.stdout).toContain("warning: the output device is taken at the diode's drain voltage");
    const j = JSON.parse(twinfet('inspect', mirror, '--json').stdout) as { figure: { name: string; unit: string }; analytic: { sigma: number } };
    expect(j.figure).toMatchObject({ name: 'currentError', unit: '' });
    // Same computation through JSON: exact (JSON keeps all 17 digits).
    expect(j.analytic.sigma).toBe(linearisedSigma(compileStage(await loadDesign(mirror))));
  });

  it('run: quantiles, histogram, spec and yields in %; --json has a currentError block in place of offset; the samples file and the plot say so too', () => {
    const csv = join(out, 'mirror.csv');
    const svg = join(out, 'mirror.svg');
    const r = twinfet('run', mirror, '--samples', '20000', '--seed', '5', '--samples-out', csv, '--plot', svg);
    expect(r.code).toBe(0);
    for (const s of ['current error sigma', 'spec |e| <=                1.000 %', 'chip yield (64 instances)']) expect(r.stdout).toContain(s);
    for (const l of figureLines(r.stdout)) expect(l).not.toMatch(VOLTS);
    // The histogram rows are labelled in % (25 rows, two of them marking +-spec).
    const rows = r.stdout.split('\n').filter((l) => /^ *-?\d+\.\d{3} % \|/.test(l));
    expect(rows).toHaveLength(25);
    expect(rows.filter((l) => l.endsWith('<- spec'))).toHaveLength(2);
    expect(readFileSync(csv, 'utf8').split('\n')[0]).toBe('sample,currentError_rel,M1_dVT_V,M1_dbeta_rel,M2_dVT_V,M2_dbeta_rel');
    const plot = readFileSync(svg, 'utf8');
    expect(plot).toContain('current error e (%)');
    expect(plot).not.toContain('(mV)');
    const j = JSON.parse(twinfet('run', mirror, '--samples', '20000', '--seed', '5', '--json').stdout) as Record<string, unknown>;
    expect(j).toHaveProperty('currentError');
    expect(j).not.toHaveProperty('offset');
    expect(j['figure']).toMatchObject({ name: 'currentError', unit: '', sided: 'two' });
    expect((j['yield'] as { spec: number }).spec).toBe(0.01);
  });

  it('--spec reads a percentage for this figure (0.5% = 0.005) and refuses a voltage naming the option', () => {
    const j = JSON.parse(twinfet('run', mirror, '--samples', '2000', '--spec', '0.5%', '--json').stdout) as { yield: { spec: number } };
    expect(j.yield.spec).toBe(0.005);
    const bad = twinfet('run', mirror, '--samples', '2000', '--spec', '5mV');
    expect(bad.code).toBe(2);
    expect(bad.stdout).toBe('');
    expect(bad.stderr.trim()).toBe('twinfet: --spec: expected a current error limit such as 1% (a percentage or a plain fraction), got "5mV"');
  });

  it('tail: the spec in %, and each design point\'s value under currentError in --json', () => {
    const r = twinfet('tail', mirror);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('spec |e| <=                  1.000 %');
    const j = JSON.parse(twinfet('tail', mirror, '--json').stdout) as { figure: { name: string }; spec: number; designPoints: Record<string, unknown>[] };
    expect(j.figure.name).toBe('currentError');
    expect(j.spec).toBe(0.01);
    for (const p of j.designPoints) {
      expect(p).not.toHaveProperty('offset');
      // The failure point lies on the boundary |e| = spec (the search converges to it).
      expect(Math.abs(Math.abs(p['currentError'] as number) - 0.01)).toBeLessThan(1e-9);
    }
  });

  it('size --sigma 0.18% --vary both: the target, the sigmas and the split in %, both blocks listed', () => {
    const r = twinfet('size', mirror, '--sigma', '0.18%', '--vary', 'both', '--samples', '20000');
    expect(r.code).toBe(0);
    for (const s of ['current error sigma <= 0.1800 %', 'both (input and output, W/L of each kept', 'optimum (W*L of one input + one output device)']) expect(r.stdout).toContain(s);
    for (const l of figureLines(r.stdout)) expect(l).not.toMatch(VOLTS);
    const bad = twinfet('size', mirror, '--sigma', '0.2mV');
    expect(bad.code).toBe(2);
    expect(bad.stderr.trim()).toBe('twinfet: --sigma: expected a current error sigma such as 0.2% (a percentage or a plain fraction), got "0.2mV"');
  });

  it('sweep: sigmas in %, the CSV columns marked rel, the plot axis in %; --vary spec.error and --spec are refused together', () => {
    const csv = join(out, 'sweep.csv');
    const svg = join(out, 'sweep.svg');
    const r = twinfet('sweep', mirror, '--vary', 'input.current', '--from', '2uA', '--to', '20uA', '--steps', '2', '--samples', '2000', '--target-sigma', '0.25%', '--csv', csv, '--plot', svg);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('sigma <= 0.2500 %');
    const header = readFileSync(csv, 'utf8').split('\n')[0]!.split(',');
    expect(header.slice(0, 5)).toEqual(['input.current_A', 'analytic_sigma_rel', 'mc_sigma_rel', 'mc_sigma_lo_rel', 'mc_sigma_hi_rel']);
    expect(readFileSync(svg, 'utf8')).toContain('current error sigma (%)');
    // The caution holds at every point: given once, not once per point.
    expect(r.stdout.split('\n').filter((l) => l.includes('channel-length modulation'))).toHaveLength(1);
    const both = twinfet('sweep', mirror, '--vary', 'spec.error', '--from', '0.5%', '--to', '1%', '--spec', '1%');
    expect(both.code).toBe(2);
    expect(both.stderr.trim()).toBe('twinfet: --spec: cannot be combined with --vary spec.error; drop one');
  });

  it('sweep --vary spec.error shows the swept limits in % as written (0.5 %, 2 %), not as fractions', () => {
    const r = twinfet('sweep', mirror, '--vary', 'spec.error', '--from', '0.5%', '--to', '2%', '--steps', '2', '--samples', '2000');
    expect(r.code).toBe(0);
    const first = (l: string): string => l.trim().split(/\s{2,}/)[0]!;
    const rows = r.stdout.split('\n').filter((l) => /^\d/.test(l)).map(first);
    // The two endpoints as given on the command line (exact: 0.005 and 0.02 print as 0.5 % and 2 %).
    expect(rows).toEqual(['0.5 %', '2 %']);
  });
});

describe('folded-cascode stage (examples/folded-cascode-ota.yaml) through the CLI', () => {
  it('inspect: six devices, the three pairs in the budget, 2.434 mV', () => {
    const r = twinfet('inspect', folded);
    expect(r.code).toBe(0);
    for (const s of ['M5 (p)  sources', 'M8 (n)  load', 'offset sigma (linearised)         2.434 mV', 'sources pair dV_T', 'load pair dbeta/beta']) expect(r.stdout).toContain(s);
  });

  it('size --vary sources.area changes only the sources; both lists all three blocks', () => {
    const r = twinfet('size', folded, '--sigma', '2.3mV', '--vary', 'sources.area', '--samples', '20000', '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout) as { design: Record<string, { w: number; l: number; current?: number }>; figure: { name: string } };
    expect(j.figure.name).toBe('offset');
    expect(j.design['input']).toMatchObject({ w: 8e-6, l: 1e-6 });
    expect(j.design['load']).toMatchObject({ w: 4e-6, l: 2e-6 });
    expect(j.design['sources']!.current).toBe(20e-6);
    expect(j.design['sources']!.w).toBeGreaterThan(4e-6);
    const both = twinfet('size', folded, '--sigma', '1.5mV', '--vary', 'both', '--samples', '20000');
    expect(both.code).toBe(0);
    expect(both.stdout).toContain('both (input pair, sources and load, W/L of each kept');
    expect(both.stdout).toContain('optimum (W*L of one input + one sources + one load device)');
    for (const b of ['input    original', 'sources  sized', 'load     sized']) expect(both.stdout).toContain(b);
  });
});

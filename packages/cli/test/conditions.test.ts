/**
 * Operating conditions through the built command line: the JSON the issue asks for, the compact
 * text table, and the commands that honour the conditions (inspect, tail, size, sweep).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { compileConditions, linearisedSigma } from '@twinfet/core';
import { describe, expect, it } from 'vitest';
import { loadDesign } from '../src/designFile.js';

const root = fileURLToPath(new URL('../../../', import.meta.url));
const bin = join(root, 'packages/cli/bin/twinfet.js');
const example = join(root, 'examples/comparator-conditions.yaml');
const demo = join(root, 'examples/comparator-demo.yaml');
const out = mkdtempSync(join(tmpdir(), 'twinfet-conditions-'));

function twinfet(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: root, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

interface Entry {
  name: string;
  temperature: number;
  tail: number;
  offset: { mean: number; sigma: number; sigmaInterval: [number, number] };
  yield: { estimate: number; interval: [number, number] };
}

describe('twinfet with operating conditions (built CLI)', () => {
  it('run --json: per condition name, temperature, tail, offset and yield; the all-conditions yield on top; the drift in V/K', () => {
    const r = twinfet('run', example, '--samples', '20000', '--workers', '1', '--json');
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout) as {
      conditions: Entry[];
      yield: { over: string; estimate: number; interval: [number, number]; worst: string };
      chip: { instances: number; estimate: number };
      drift: { from: string; to: string; mean: number; sigma: number; quantiles: { p: number; value: number }[] };
    };
    expect(j.conditions.map((c) => c.name)).toEqual(['cold', 'room', 'hot', 'hot-slow']);
    // The file's temperatures and tails in SI units (-40 C = 233.15 K; 1e-9 K for the decimal sum).
    expect(Math.abs(j.conditions[0]!.temperature - 233.15)).toBeLessThan(1e-9);
    expect(j.conditions.map((c) => c.tail)).toEqual([10e-6, 10e-6, 10e-6, 8e-6]);
    for (const c of j.conditions) {
      expect(c.offset.sigmaInterval[0]).toBeLessThan(c.offset.sigma);
      expect(c.offset.sigmaInterval[1]).toBeGreaterThan(c.offset.sigma);
      expect(j.yield.estimate).toBeLessThanOrEqual(c.yield.estimate);
    }
    expect(j.yield.over).toBe('all conditions');
    expect(j.conditions.map((c) => c.name)).toContain(j.yield.worst);
    // Chip yield from the all-conditions yield: Y^64 (1e-12 for rounding).
    expect(Math.abs(j.chip.estimate - j.yield.estimate ** 64)).toBeLessThan(1e-12);
    expect([j.drift.from, j.drift.to]).toEqual(['cold', 'hot']);
    // V/K: the linearised drift sigma of this design is 1.868 uV/K (`twinfet inspect`); 4 SE of 2e4 samples is 2%.
    expect(Math.abs(j.drift.sigma / 1.868e-6 - 1)).toBeLessThan(0.02 + 0.001);
    expect(j.drift.quantiles.map((q) => q.p)).toEqual([0.001, 0.01, 0.5, 0.99, 0.999]);
  });

  it('run text: one compact table of the conditions, the all-conditions yield and the drift in uV/K', () => {
    const r = twinfet('run', example, '--samples', '20000', '--workers', '1');
    expect(r.code).toBe(0);
    const lines = r.stdout.split('\n');
    const head = lines.findIndex((l) => l.startsWith('condition  temperature'));
    expect(head).toBeGreaterThan(0);
    expect(lines.slice(head + 2, head + 6).map((l) => l.split(/\s+/)[0])).toEqual(['cold', 'room', 'hot', 'hot-slow']);
    expect(lines[head + 5]).toContain('n kp -10%, p kp -10%');
    expect(r.stdout).toContain('yield, all conditions');
    expect(r.stdout).toMatch(/drift cold -> hot \(-40 C to 125 C\)/);
    expect(r.stdout).toMatch(/sigma 1\.8\d\d uV\/K/);
  });

  it('a design without conditions prints nothing new (no conditions, drift or "over" keys)', () => {
    const j = JSON.parse(twinfet('run', demo, '--samples', '2000', '--workers', '1', '--json').stdout) as Record<string, unknown> & { yield: Record<string, unknown> };
    expect('conditions' in j).toBe(false);
    expect('drift' in j).toBe(false);
    expect('over' in j.yield).toBe(false);
  });

  it('inspect: the linearised sigma and Gaussian yield at each condition and the linearised drift sigma', async () => {
    const r = twinfet('inspect', example, '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout) as { conditions: { name: string; linearised: { sigma: number; yield: number } }[]; drift: { linearisedSigma: number } };
    const at = compileConditions(await loadDesign(example));
    // The same numbers as the library's (exact: the same computation).
    expect(j.conditions.map((c) => c.linearised.sigma)).toEqual(at.map((c) => linearisedSigma(c.stage)));
    expect(Math.abs(j.drift.linearisedSigma / 1.868e-6 - 1)).toBeLessThan(5e-4);
    const text = twinfet('inspect', example).stdout;
    expect(text).toContain('drift cold -> hot (-40 C to 125 C): linearised sigma 1.868 uV/K');
  });

  it('tail: the failure over all conditions from a mixture over every condition\'s design points', () => {
    const r = twinfet('tail', example, '--spec', '20mV', '--workers', '1', '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout) as { over: string; designPoints: { condition: string }[]; conditions: { name: string; failureProbability: number }[]; failureProbability: number };
    expect(j.over).toBe('all conditions');
    expect(j.designPoints.map((p) => p.condition)).toEqual(['cold', 'cold', 'room', 'room', 'hot', 'hot', 'hot-slow', 'hot-slow']);
    // Union >= each condition (the same weights; 1e-12 for the order of summation).
    for (const c of j.conditions) expect(j.failureProbability).toBeGreaterThanOrEqual(c.failureProbability * (1 - 1e-12));
  });

  it('size says which condition limits the sized design, and --write keeps the conditions', async () => {
    const file = join(out, 'sized.yaml');
    const r = twinfet('size', example, '--sigma', '2.5mV', '--vary', 'input.area', '--samples', '50000', '--workers', '1', '--write', file);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/limited by +condition (hot|hot-slow) on the exact model/);
    const sized = await loadDesign(file);
    expect(sized.conditions).toEqual((await loadDesign(example)).conditions);
  });

  it('sweep has a "limited by" column and judges the largest sigma over the conditions', () => {
    const r = twinfet('sweep', example, '--vary', 'input.w', '--from', '2um', '--to', '4um', '--steps', '2', '--samples', '5000', '--workers', '1');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('limited by (sigma / yield)');
    expect(r.stdout).toContain('each sigma is the largest over the conditions');
  });
});

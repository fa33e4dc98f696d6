import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { compileStage, linearisedSigma, parseDesign as parseText, parseQuantity, shiftedDecimal, writeDesign as designToYaml, type Design } from '@twinfet/core';
import { simulate } from '@twinfet/montecarlo';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { loadDesign } from '../src/designFile.js';

const parseDesign = (text: string, source: string): Design => parseText(text, { source });

const root = fileURLToPath(new URL('../../../', import.meta.url));
const bin = join(root, 'packages/cli/bin/twinfet.js');
const demo = join(root, 'examples/comparator-demo.yaml');
const senseAmp = join(root, 'examples/sense-amp-pmos.yaml');
const out = mkdtempSync(join(tmpdir(), 'twinfet-size-'));

function twinfet(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: root, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

describe('designToYaml: written designs load back to the same doubles (identities)', () => {
  it('shiftedDecimal moves the decimal point exactly: the loader parses "<text> <unit>" back to x', () => {
    const units: [string, Parameters<typeof parseQuantity>[1], number][] = [
      ['um', 'length', -6],
      ['nA', 'current', -9],
      ['mV', 'voltage', -3],
      ['uA/V^2', 'kp', -6],
      ['mV*um', 'avt', -9],
      ['%*um', 'abeta', -8],
      ['fF/um^2', 'cox', -3],
    ];
    fc.assert(
      fc.property(fc.double({ min: 1e-300, max: 1e300, noNaN: true }), fc.constantFrom(...units), (x, [unit, dim, p]) => {
        expect(parseQuantity(`${shiftedDecimal(x, p)} ${unit}`, dim, 'x')).toBe(x);
      }),
      { seed: 1035, numRuns: 500 },
    );
    // Computed by hand: 1.235e-5 m is 12.35 um; 5e-9 V*m is 5 mV*um; 1e-8 m is 1 %*um.
    expect(shiftedDecimal(1.235e-5, -6)).toBe('12.35');
    expect(shiftedDecimal(5e-9, -9)).toBe('5');
    expect(shiftedDecimal(1e-8, -8)).toBe('1');
  });

  it('each example, and random geometries, round-trip through the design-file loader', async () => {
    for (const f of ['comparator-demo', 'sense-amp-pmos', 'weak-inversion-wta']) {
      const d = await loadDesign(join(root, `examples/${f}.yaml`));
      expect(parseDesign(designToYaml(d, ['header']), 'x.yaml')).toEqual(d);
    }
    const d0 = await loadDesign(demo);
    fc.assert(
      fc.property(fc.double({ min: 1e-7, max: 1e-3, noNaN: true }), fc.double({ min: 1e-7, max: 1e-4, noNaN: true }), fc.double({ min: 1e-9, max: 1e-3, noNaN: true }), (w, l, tail) => {
        const d: Design = { ...d0, tail, input: { ...d0.input, w, l } };
        expect(parseDesign(designToYaml(d, []), 'x.yaml')).toEqual(d);
      }),
      { seed: 1053, numRuns: 200 },
    );
  });
});

describe('twinfet size (end to end, the built CLI)', () => {
  it('--json prints the sized design in SI units and the confirmed sigma meets the target; --write saves a loadable file', async () => {
    const file = join(out, 'sized.yaml');
    const r = twinfet('size', demo, '--sigma', '2mV', '--vary', 'input.area', '--json', '--workers', '1', '--seed', 'e2e', '--write', file);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    for (const k of ['vary', 'target', 'rule', 'original', 'linearised', 'result', 'confirmed', 'confirmations', 'areaCost', 'design', 'notes', 'warnings']) expect(j).toHaveProperty(k);
    expect(j.vary).toBe('input.area');
    expect(j.target).toMatchObject({ kind: 'sigma', sigma: 0.002 });
    expect(j.confirmed.met).toBe(true);
    expect(j.confirmed.sigmaInterval[1]).toBeLessThanOrEqual(0.002);
    expect(j.written).toBe(file);
    // The JSON design and the written file are the same design (exact doubles), and the
    // linearised sigma of either equals the reported one (same computation).
    const design = j.design as Design;
    const loaded = await loadDesign(file);
    expect(loaded).toEqual(design);
    expect(linearisedSigma(compileStage(loaded))).toBe(j.result.sigmaLinearised);
    expect(readFileSync(file, 'utf8')).toMatch(/^# Sized by twinfet \S+ from .*comparator-demo\.yaml for offset sigma <= 2 mV, varying input\.area\./);
    // Independent Monte Carlo (new seed) on the written file: within 4 standard errors of the
    // linearised sigma when mismatch is small (first-order model, Kinget, IEEE JSSC 40(6), 2005), and the
    // target met to 4 SE.
    const check = await simulate(loaded, { samples: 200_000, seed: 'independent', workers: 1, keepOffsets: false });
    const se = check.offset.sigma / Math.sqrt(2 * (check.evaluated - 1));
    expect(check.offset.sigma).toBeLessThan(0.002 + 4 * se);
    // Kinget 2005: the rule area is the original varied area x (sigma0/target)^2.
    expect(j.areaCost.ruleArea).toBeCloseTo(j.original.variedArea * (j.original.sigmaLinearised / 0.002) ** 2, 20);
    // The load is unchanged when only the input pair is varied.
    expect(design.load).toEqual((await loadDesign(demo)).load);
  });

  it('reports input capacitance Cox W L when the process gives cox (Kinget 2005 area/capacitance trade-off)', async () => {
    const r = twinfet('size', senseAmp, '--sigma', '0.8mV', '--vary', 'input.area', '--json', '--workers', '1');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    const cox = parseQuantity('8.6 fF/um^2', 'cox', 'cox');
    const p = j.result.pairs[0];
    // Same product, so equal to rounding (1e-12 relative).
    expect(Math.abs(p.gateCapacitance / (cox * p.w * p.l) - 1)).toBeLessThan(1e-12);
    const text = twinfet('size', senseAmp, '--sigma', '0.8mV', '--vary', 'input.area', '--workers', '1');
    expect(text.stdout).toContain('input capacitance');
    expect(text.stdout).toMatch(/input capacitance\s+\d+(\.\d+)? fF per input/);
    expect(text.stdout).not.toMatch(/NaN|Infinity/);
  });

  it('--vary both prints the split and its saving against equal scaling', () => {
    const r = twinfet('size', demo, '--sigma', '2mV', '--vary', 'both', '--workers', '1');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/area split\s+optimum .* saving \d+(\.\d+)? %/);
  });

  it('refusals are one line on stderr, exit code 2, naming the option and the limiting term', () => {
    const cases: [string[], RegExp][] = [
      [['--sigma', '0.5mV', '--vary', 'input.w'], /^twinfet: --sigma: offset sigma 0\.5 mV cannot be met by varying input\.w: .*load pair dV_T.*vary load\.area or both$/],
      [['--sigma', '2mV', '--yield', '0.99'], /^twinfet: --sigma: give exactly one target/],
      [[], /^twinfet: --sigma: give exactly one target/],
      [['--sigma', '2mA'], /^twinfet: --sigma: expected a voltage/],
      [['--yield', '1.5'], /^twinfet: --yield: expected a number strictly between 0 and 1/],
      [['--sigma', '2mV', '--vary', 'input.wl'], /^twinfet: --vary: .*did you mean "input\.w"\?$/],
      [['--sigma', '2mV', '--write', 'x.txt'], /^twinfet: --write: expected a file name ending in \.yaml/],
    ];
    for (const [args, re] of cases) {
      const r = twinfet('size', demo, ...args);
      expect(r.code).toBe(2);
      expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
      expect(r.stderr.trimEnd()).toMatch(re);
      expect(r.stdout).toBe('');
    }
    const simple = twinfet('size', senseAmp, '--sigma', '1mV', '--vary', 'load.area');
    expect(simple.code).toBe(2);
    expect(simple.stderr.trimEnd()).toMatch(/^twinfet: --vary: load\.area needs a load \(the mirror, resistor or folded stages have one\), but this design is a simple stage/);
  });
});

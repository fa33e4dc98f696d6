import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { compileStage, InputError, linearisedSigma } from '@twinfet/core';
import { describe, expect, it } from 'vitest';
import { loadDesign } from '../src/designFile.js';
import { stageDefinition } from '@twinfet/core';
import { SWEEP_FIELDS, fieldValue, plotAxis, sweepField, sweepFields, sweepValues, withField } from '../src/sweepField.js';

const root = fileURLToPath(new URL('../../../', import.meta.url));
const bin = join(root, 'packages/cli/bin/twinfet.js');
const demo = join(root, 'examples/comparator-demo.yaml');
const senseAmp = join(root, 'examples/sense-amp-pmos.yaml');
const out = mkdtempSync(join(tmpdir(), 'twinfet-sweep-'));

function twinfet(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: root, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

describe('sweep fields', () => {
  it('every field of the stage type can be set and read back through the design (identity)', async () => {
    const d = await loadDesign(demo);
    const before = JSON.stringify(d);
    for (const f of sweepFields(stageDefinition(d.topology))) {
      const changed = withField(d, f.path, 0.123);
      // An area is set through W and L (W/L kept): their product is 0.123 to rounding.
      if (f.dimension === 'area') expect(Math.abs(fieldValue(changed, f.path)! / 0.123 - 1)).toBeLessThan(1e-15);
      else expect(fieldValue(changed, f.path)).toBe(0.123);
      // Only that field changed: setting it back to the original value restores the design.
      const orig = fieldValue(d, f.path);
      if (orig !== undefined && f.dimension !== 'area') expect(withField(changed, f.path, orig)).toEqual(d);
    }
    expect(JSON.stringify(d)).toBe(before); // the original is not modified
  });

  it('unknown fields, load fields of a simple stage and a missing polarity are refused naming --vary', async () => {
    const demoDesign = await loadDesign(demo);
    const simple = await loadDesign(senseAmp);
    const msg = (fn: () => unknown): string => {
      try {
        fn();
      } catch (e) {
        expect(e).toBeInstanceOf(InputError);
        expect((e as InputError).field).toBe('--vary');
        return (e as InputError).message;
      }
      throw new Error('expected a refusal');
    };
    expect(msg(() => sweepField('inptu.w', demoDesign))).toContain('did you mean "input.w"?');
    expect(msg(() => sweepField('gain', demoDesign))).toContain('expected a numeric design field');
    expect(msg(() => sweepField('load.w', simple))).toContain('needs a load (the mirror, resistor or folded stages have one)');
    expect(msg(() => sweepField('process.n.avt', simple))).toContain('no process.n');
  });

  it('values: linear steps are evenly spaced and log steps have a constant ratio, ends exact (computed)', () => {
    expect(sweepValues(1, 5, 5, false)).toEqual([1, 2, 3, 4, 5]);
    const v = sweepValues(1e-6, 1e-4, 5, true);
    expect(v[0]).toBe(1e-6);
    expect(v[4]).toBe(1e-4);
    // Ratio 10^(2/4) = sqrt(10) between neighbours, to the 12-digit rounding of the inner points.
    for (let i = 1; i < v.length; i++) expect(Math.abs(v[i]! / v[i - 1]! / Math.sqrt(10) - 1)).toBeLessThan(2e-12);
  });

  it('plot axes use readable units (common practice, no source)', () => {
    const f = (p: string) => SWEEP_FIELDS.find((x) => x.path === p)!;
    expect(plotAxis(f('input.w'), [1e-6, 2e-5])).toEqual({ unit: 'um', scale: 1e6 });
    expect(plotAxis(f('tail'), [1e-9, 2e-8])).toEqual({ unit: 'nA', scale: 1e9 });
    expect(plotAxis(f('tail'), [1e-6, 2e-5])).toEqual({ unit: 'uA', scale: 1e6 });
    expect(plotAxis(f('process.n.avt'), [5e-9])).toEqual({ unit: 'mV*um', scale: 1e9 });
  });
});

describe('twinfet sweep (end to end, the built CLI)', () => {
  it('--json: one point per step at the exact values, analytic sigma equal to the library value', async () => {
    const r = twinfet('sweep', senseAmp, '--vary', 'input.w', '--from', '10um', '--to', '40um', '--steps', '3', '--samples', '20000', '--json', '--workers', '1');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.field).toBe('input.w');
    expect(j.unit).toBe('m');
    expect(j.points.map((p: { value: number }) => p.value)).toEqual([10e-6, 25e-6, 40e-6]);
    const d = await loadDesign(senseAmp);
    for (const p of j.points) {
      // Same computation through JSON: equal to every digit.
      expect(p.analyticSigma).toBe(linearisedSigma(compileStage({ ...d, input: { ...d.input, w: p.value } })));
      expect(p.monteCarlo.sigmaInterval).toHaveLength(2);
      expect(p.monteCarlo.yieldInterval[0]).toBeLessThanOrEqual(p.monteCarlo.yield);
      expect(p.importance).toBeNull();
    }
  });

  it('--csv writes a header and one row per point; --plot writes an SVG with both panels and the axis titles', () => {
    const csv = join(out, 'sweep.csv');
    const svg = join(out, 'sweep.svg');
    const r = twinfet('sweep', demo, '--vary', 'input.w', '--from', '1um', '--to', '20um', '--steps', '4', '--log', '--samples', '5000', '--target-sigma', '2mV', '--target-yield', '0.999', '--csv', csv, '--plot', svg, '--workers', '1');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('sigma <= 2 mV');
    const lines = readFileSync(csv, 'utf8').trimEnd().split('\n');
    expect(lines).toHaveLength(5);
    expect(lines[0]).toMatch(/^input\.w_m,analytic_sigma_V,mc_sigma_V,/);
    const text = readFileSync(svg, 'utf8');
    expect(text.startsWith('<svg')).toBe(true);
    expect(text.trimEnd().endsWith('</svg>')).toBe(true);
    for (const title of ['input.w (um)', 'offset sigma (mV)', 'failure probability', 'target sigma', 'target failure']) expect(text).toContain(title);
    expect(text).not.toMatch(/NaN|Infinity/);
  });

  it('temperature accepts Celsius and --method importance adds the high-sigma column', () => {
    const r = twinfet('sweep', senseAmp, '--vary', 'temperature', '--from', '-40 C', '--to', '125 C', '--steps', '2', '--samples', '5000', '--method', 'importance', '--json', '--workers', '1');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    // 0 C = 273.15 K exactly (SI); -40 C and 125 C to rounding of the decimal sum.
    expect(Math.abs(j.points[0].value - 233.15)).toBeLessThan(1e-9);
    expect(Math.abs(j.points[1].value - 398.15)).toBeLessThan(1e-9);
    for (const p of j.points) {
      expect(p.importance.interval[0]).toBeLessThanOrEqual(p.importance.failure);
      expect(p.importance.failure).toBeLessThanOrEqual(p.importance.interval[1]);
    }
  });

  it('--method importance: every yield of a row comes from its importance-sampling failure (the sense-amp example)', () => {
    // The sense amplifier at 15 C: linearised sigma 1.089 mV, spec 5 mV = 4.591 sigma, so
    // p = 2 Phi(-4.591) = 4.41e-6 and the 1024-instance chip yield is (1 - p)^1024 = 0.99549 (by
    // hand, A&S 26.2). The Monte Carlo count (1 failure in 20000) would give 0.950087.
    const csv = join(out, 'is-sweep.csv');
    const r = twinfet('sweep', senseAmp, '--vary', 'temperature', '--from', '-40 C', '--to', '125 C', '--steps', '4', '--method', 'importance', '--csv', csv, '--workers', '1');
    expect(r.code).toBe(0);
    const row = r.stdout.split('\n').find((l) => l.startsWith('15 C'))!;
    const cells = row.trim().split(/\s{2,}/);
    // Columns: value, analytic sigma, MC sigma, interval, yield (IS), interval, chip yield (IS), ...
    const chip = Number(cells[6]);
    const failure = Number(cells[7]);
    expect(r.stdout).toContain('chip yield (1024, IS)');
    expect(Math.abs(chip - Math.exp(1024 * Math.log1p(-failure)))).toBeLessThan(1e-5); // printed to 5 decimals
    // Against the hand value: the importance estimate is +-5% at 95% (stop rule), and the exact
    // model's p differs from the linearised Gaussian one by under 5%: 1024 p 0.1 = 4.5e-4.
    expect(Math.abs(chip - 0.99549)).toBeLessThan(4.5e-4);
    // The CSV says where the yields came from and gives the same figure.
    const lines = readFileSync(csv, 'utf8').trimEnd().split('\n');
    const head = lines[0]!.split(',');
    const at15 = lines[2]!.split(',');
    expect(at15[head.indexOf('yield_method')]).toBe('importance-sampling');
    expect(Math.abs(Number(at15[head.indexOf('chip_yield')]) - chip)).toBeLessThan(1e-5);
  });

  it('CSV: one numeric format per column (exponent form, full precision; counts as whole numbers)', () => {
    const csv = join(out, 'formats.csv');
    const r = twinfet('sweep', senseAmp, '--vary', 'input.w', '--from', '1um', '--to', '40um', '--steps', '4', '--samples', '2000', '--method', 'importance', '--csv', csv, '--workers', '1');
    expect(r.code).toBe(0);
    const lines = readFileSync(csv, 'utf8').trimEnd().split('\n');
    const head = lines[0]!.split(',');
    const rows = lines.slice(1).map((l) => l.split(','));
    const real = /^-?\d(\.\d+)?e[+-]\d+$/;
    for (const [c, name] of head.entries()) {
      for (const row of rows) {
        const v = row[c]!;
        if (name === 'samples' || name === 'failures') expect(v).toMatch(/^\d+$/);
        else if (name === 'yield_method') expect(v).toMatch(/^(importance-sampling|monte-carlo)$/);
        else {
          expect(v).toMatch(real);
          // Full precision: the text reads back to the double the JSON report holds (round trip).
          expect(Number(v).toExponential()).toBe(v);
        }
      }
    }
  });

  it('--vary input.area steps W L at fixed W/L, as size --vary input.area does', async () => {
    const r = twinfet('sweep', senseAmp, '--vary', 'input.area', '--from', '4um^2', '--to', '100um^2', '--steps', '3', '--samples', '2000', '--json', '--workers', '1');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.unit).toBe('m^2');
    expect(j.points.map((p: { value: number }) => p.value)).toEqual([4e-12, 52e-12, 100e-12]);
    const d = await loadDesign(senseAmp);
    for (const p of j.points) {
      const g = withField(d, 'input.area', p.value).input;
      // W/L stays 24/1.5 = 16 and W L is the swept value, to the 12-digit rounding of W and L.
      expect(Math.abs(g.w / g.l / 16 - 1)).toBeLessThan(1e-11);
      expect(Math.abs((g.w * g.l) / p.value - 1)).toBeLessThan(1e-11);
      expect(p.analyticSigma).toBe(linearisedSigma(compileStage({ ...d, input: g })));
    }
    // At fixed W/L the inversion coefficient is fixed, so both terms of sigma scale as
    // 1/sqrt(W L) (Pelgrom 1989): from 4 to 100 um^2 sigma falls by exactly 5 (1e-9 for rounding).
    expect(Math.abs(j.points[0].analyticSigma / j.points[2].analyticSigma - 5)).toBeLessThan(1e-9);
  });

  it('refusals are one line, exit code 2, naming the option', () => {
    const cases: [string, string[], RegExp][] = [
      [demo, ['--vary', 'input.w', '--from', '0um', '--to', '10um', '--log'], /^twinfet: --log: needs --from and --to above 0/],
      [demo, ['--vary', 'input.w', '--from', '2mA', '--to', '10um'], /^twinfet: --from: expected a length/],
      [demo, ['--vary', 'input.w', '--from', '1um'], /^twinfet: --to: missing/],
      [demo, ['--from', '1um', '--to', '2um'], /^twinfet: --vary: missing/],
      [demo, ['--vary', 'process.n.rho', '--from', '0', '--to', '1.5'], /^twinfet: --to: process\.n\.rho = 1\.5 is not a valid design/],
      [demo, ['--vary', 'spec.offset', '--from', '1mV', '--to', '5mV', '--spec', '2mV'], /^twinfet: --spec: cannot be combined with --vary spec\.offset/],
      [senseAmp, ['--vary', 'load.w', '--from', '1um', '--to', '2um'], /^twinfet: --vary: load\.w needs a load \(the mirror, resistor or folded stages have one\)/],
      [demo, ['--vary', 'input.w', '--from', '1um', '--to', '2um', '--plot', 'x.png'], /^twinfet: --plot: expected a file name ending in \.svg/],
    ];
    for (const [file, args, re] of cases) {
      const r = twinfet('sweep', file, ...args);
      expect(r.code).toBe(2);
      expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
      expect(r.stderr.trimEnd()).toMatch(re);
    }
  });
});

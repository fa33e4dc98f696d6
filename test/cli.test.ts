import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';
import { compileStage, linearisedSigma } from '@twinfet/core';
import { twoSidedTail } from '@twinfet/montecarlo';
import { loadDesign } from '../packages/cli/src/designFile.js';

const root = fileURLToPath(new URL('..', import.meta.url));
const bin = join(root, 'packages/cli/bin/twinfet.js');
const demo = join(root, 'examples/comparator-demo.yaml');
const linear = join(root, 'test/fixtures/linear-pair.yaml');
const senseAmp = join(root, 'examples/sense-amp-pmos.yaml');
const out = mkdtempSync(join(tmpdir(), 'twinfet-cli-'));

function twinfet(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: root, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

describe('twinfet (end to end, the built CLI)', () => {
  it('--help, <command> --help and --version exit 0', () => {
    const h = twinfet('--help');
    expect(h.code).toBe(0);
    for (const c of ['inspect', 'run', 'tail']) expect(h.stdout).toContain(c);
    expect(twinfet('run', '--help').stdout).toContain('--samples');
    const v = twinfet('--version');
    expect(v.code).toBe(0);
    expect(v.stdout.trim()).toMatch(/^\d+\.\d+\.\d+$/);
  });

  it('runs from the bundle: it is newer than every build, and its inlined version is the package version', () => {
    // The bin takes the bundle only when its stamp is at least as new as each tsbuildinfo (the
    // global set-up has just made it), so every end-to-end test here exercises the bundle.
    const stamp = statSync(join(root, 'packages/cli/bundle/built')).mtimeMs;
    for (const p of ['cli', 'core', 'montecarlo']) expect(statSync(join(root, `packages/${p}/dist/tsconfig.tsbuildinfo`)).mtimeMs).toBeLessThanOrEqual(stamp);
    const bundled = readFileSync(join(root, 'packages/cli/bundle/twinfet.cjs'), 'utf8');
    expect(bundled).not.toContain('TWINFET_BUNDLED_VERSION');
    const pkg = JSON.parse(readFileSync(join(root, 'packages/cli/package.json'), 'utf8')) as { version: string };
    expect(twinfet('--version').stdout.trim()).toBe(pkg.version);
  });

  it('loads both bundle files with the code cache the bundler wrote (V8 accepts it: same Node, same source)', async () => {
    // bin/loadBundle.js hands V8 <file>.cache; V8 sets cachedDataRejected when the cache does not
    // match the source or this V8, and then compiles from source (correct but slow). The bundler
    // ran in this Node a moment ago (global set-up), so a rejection here means it saved the cache
    // of another file or a stale build.
    const { loadBundle } = (await import(pathToFileURL(join(root, 'packages/cli/bin/loadBundle.js')).href)) as {
      loadBundle(url: URL): { exports: Record<string, unknown>; script: { cachedDataRejected?: boolean } };
    };
    for (const f of ['twinfet', 'worker']) {
      const { exports, script } = loadBundle(pathToFileURL(join(root, `packages/cli/bundle/${f}.cjs`)));
      expect(script.cachedDataRejected, f).toBe(false);
      expect(typeof exports[f === 'twinfet' ? 'main' : 'default'], f).toBe('function');
    }
  });

  it('inspect --json gives analytic.sigma equal to the library value and a budget summing to 1', async () => {
    const r = twinfet('inspect', demo, '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout) as { analytic: { sigma: number; budget: { device: string; parameter: string; share: number }[] } };
    const lib = linearisedSigma(compileStage(await loadDesign(demo)));
    // Same computation through JSON: exact to the printed digits (JSON keeps all 17).
    expect(j.analytic.sigma).toBe(lib);
    expect(Math.abs(j.analytic.budget.reduce((a, e) => a + e.share, 0) - 1)).toBeLessThan(1e-12);
    expect(j.analytic.budget[0]).toMatchObject({ device: 'M1', parameter: 'vt' });
  });

  it('inspect prints an aligned table with every device and the budget', () => {
    const r = twinfet('inspect', demo);
    expect(r.code).toBe(0);
    for (const s of ['M1 (n)', 'M4 (p)', 'offset sigma (linearised)', 'input pair dV_T', 'Gaussian instance yield']) expect(r.stdout).toContain(s);
  });

  it('run --json prints one object with the documented fields, volts throughout', async () => {
    const r = twinfet('run', demo, '--samples', '2e5', '--seed', '42', '--json', '--workers', '2');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    for (const k of ['samples', 'seed', 'offset', 'analytic', 'yield', 'chip']) expect(j).toHaveProperty(k);
    expect(j.samples).toBe(200000);
    expect(j.seed).toBe('42');
    expect(j.offset.sigmaInterval).toHaveLength(2);
    expect(j.yield.interval).toHaveLength(2);
    expect(j.chip.interval).toHaveLength(2);
    expect(j.yield.method).toBe('clopper-pearson');
    expect(j.yield.confidence).toBe(0.95);
    expect(j.chip.instances).toBe(1);
    const sigma = linearisedSigma(compileStage(await loadDesign(demo)));
    // Volts: the demo's sigma is ~3.85 mV; Monte Carlo within 4 standard errors (sigma/sqrt(2N)).
    expect(Math.abs(j.offset.sigma - sigma)).toBeLessThan((4 * sigma) / Math.sqrt(4e5));
    // Yield against the Gaussian estimate within 4 binomial SE plus the model's nonlinearity
    // (the exact offset of the demo is within 0.3% of linear: allow 3% of p).
    const p = twoSidedTail(0.01 / sigma);
    expect(Math.abs(1 - j.yield.estimate - p)).toBeLessThan(4 * Math.sqrt(p / 2e5) + 0.03 * p);
    expect(j.offset.quantiles.signed.map((q: { p: number }) => q.p)).toEqual([0.001, 0.01, 0.5, 0.99, 0.999]);
  });

  it('accepts 1e6-style and 1_000_000-style sample counts', () => {
    const a = JSON.parse(twinfet('run', demo, '--samples', '1_000', '--json', '--workers', '1').stdout);
    expect(a.samples).toBe(1000);
    const b = JSON.parse(twinfet('run', demo, '--samples', '2e3', '--json', '--workers', '1').stdout);
    expect(b.samples).toBe(2000);
  });

  it('the text report shows the design, sigma with interval, histogram, budget, yield and timing', () => {
    const r = twinfet('run', demo, '--samples', '50000', '--workers', '1');
    expect(r.code).toBe(0);
    for (const s of ['Comparator front end (demo)', 'offset sigma', 'linearised sigma', 'quantiles', '<- spec', 'input pair dV_T', 'instance yield', 'chip yield', 'samples/s', 'seed 1']) {
      expect(r.stdout).toContain(s);
    }
    expect(r.stderr).toBe(''); // no progress bar when stderr is not a terminal
  });

  it('points to the high-sigma command when few failures were seen', () => {
    const r = twinfet('run', demo, '--samples', '20000', '--spec', '20mV', '--workers', '1');
    expect(r.stdout).toContain('limited by the sample count');
    expect(r.stdout).toContain('twinfet tail');
  });

  it('--samples-out writes every sample with its draws by device and parameter', () => {
    const file = join(out, 'samples.csv');
    const r = twinfet('run', demo, '--samples', '3000', '--workers', '1', '--samples-out', file, '--json');
    expect(r.code).toBe(0);
    const lines = readFileSync(file, 'utf8').trim().split('\n');
    expect(lines[0]).toBe('sample,offset_V,M1_dVT_V,M1_dbeta_rel,M2_dVT_V,M2_dbeta_rel,M3_dVT_V,M3_dbeta_rel,M4_dVT_V,M4_dbeta_rel');
    expect(lines).toHaveLength(3001);
    const offsets = lines.slice(1).map((l) => Number(l.split(',')[1]));
    const mean = offsets.reduce((a, b) => a + b, 0) / offsets.length;
    const sd = Math.sqrt(offsets.reduce((a, b) => a + (b - mean) ** 2, 0) / (offsets.length - 1));
    const j = JSON.parse(r.stdout);
    // The CSV is the same samples (9 significant digits printed): 1e-7 relative.
    expect(Math.abs(sd / j.offset.sigma - 1)).toBeLessThan(1e-7);
    // M1's dV_T column has the per-device sigma A_VT/sqrt(2WL) = 2.5 mV within 4 SE (SE = s/sqrt(2N)).
    const d1 = lines.slice(1).map((l) => Number(l.split(',')[2]));
    const s1 = Math.sqrt(d1.reduce((a, b) => a + b * b, 0) / d1.length);
    expect(Math.abs(s1 - 2.5e-3)).toBeLessThan((4 * 2.5e-3) / Math.sqrt(6000));
  });

  it('--plot writes an SVG histogram with the spec lines', () => {
    const file = join(out, 'hist.svg');
    const r = twinfet('run', demo, '--samples', '20000', '--workers', '1', '--plot', file);
    expect(r.code).toBe(0);
    const svg = readFileSync(file, 'utf8');
    expect(svg.startsWith('<svg')).toBe(true);
    for (const s of ['offset Vos (mV)', '+spec', 'Gaussian fit']) expect(svg).toContain(s);
    expect(svg).not.toMatch(/NaN|Infinity/);
  });

  it('tail --json gives the documented fields', () => {
    const r = twinfet('tail', demo, '--spec', '20mV', '--json', '--seed', '3');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    for (const k of ['spec', 'failureProbability', 'interval', 'sigmaLevel', 'samples', 'designPoints', 'form']) expect(j).toHaveProperty(k);
    expect(j.spec).toBe(0.02);
    expect(j.designPoints).toHaveLength(2);
    expect(j.designPoints[0].coordinates).toHaveLength(8);
    expect(j.interval[0]).toBeLessThanOrEqual(j.failureProbability);
    expect(j.interval[1]).toBeGreaterThanOrEqual(j.failureProbability);
    // FORM is exact only for a linear offset; on the demo it is a first-order estimate, so the
    // two are compared on the linear pair below instead.
    expect(j.form.failureProbability).toBeGreaterThan(0);
  });

  it('tail on a linear pair: FORM gives 2 Phi(-spec/sigma) and the estimate lies within 4 of its standard errors', () => {
    const r = twinfet('tail', linear, '--json', '--seed', '3');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    // sigma = A_VT / sqrt(W L) = 5e-9 / sqrt(40e-12) V (Pelgrom 1989); the offset is linear (the
    // file's header), so P(|Vos| > 4 mV) = 2 Phi(-4 mV / sigma) = 2 Phi(-5.0596) (A&S 26.2, erfc).
    const truth = twoSidedTail(4e-3 / (5e-9 / Math.sqrt(40e-12)));
    // FORM at two design points of a linear boundary is exact (Hasofer & Lind 1974); the design
    // point solve stops at 1e-9 relative in the distance, which moves p by ~5e-8 relative.
    expect(Math.abs(j.form.failureProbability / truth - 1)).toBeLessThan(1e-6);
    // The importance-sampling estimate is unbiased: within 4 of its standard errors.
    expect(Math.abs(j.failureProbability - truth)).toBeLessThan(4 * j.standardError);
  });

  it('run --method importance adds the high-sigma estimate to the report', () => {
    const r = twinfet('run', demo, '--samples', '20000', '--spec', '20mV', '--method', 'importance', '--json', '--workers', '1');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.importance.spec).toBe(0.02);
    expect(j.importance.failureProbability).toBeGreaterThan(0);
  });

  it('run with no failures says so, with the upper bound on the failure probability and the usual digits', () => {
    // The sense amplifier at 10000 samples: 4.59 sigma, expected 0.045 failures. Clopper-Pearson
    // upper bound for 0 of 10000 at 95% two-sided: 1 - 0.025^(1/10000) = 3.688e-4 (closed form
    // of the beta quantile at x = 0, Clopper & Pearson 1934).
    const r = twinfet('run', senseAmp, '--samples', '10000', '--workers', '1');
    expect(r.code).toBe(0);
    expect(r.stdout).not.toContain('below double precision');
    expect(r.stdout).toContain('failure probability at most 3.688e-4');
    const line = r.stdout.split('\n').find((l) => l.startsWith('instance yield'))!;
    expect(line).toContain('1 (no failures in 10000 samples)');
    // The lower end with 3 figures of its failure part (0.999631), not 15 digits.
    expect(line).toMatch(/\[0\.999631, 1\]/);
    const chip = r.stdout.split('\n').find((l) => l.startsWith('chip yield'))!;
    expect(chip).toContain('1 (no failures in 10000 samples)');
    expect(chip).not.toMatch(/\d{9}/);
  });

  it('tail with a spec inside the bulk answers by plain Monte Carlo and says so, never a degenerate interval', () => {
    const r = twinfet('tail', senseAmp, '--spec', '1uV', '--workers', '1');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('plain Monte Carlo with a Clopper-Pearson interval');
    expect(r.stdout).toContain('twinfet run');
    expect(r.stdout).not.toMatch(/\[1, 1\]|\[0, 0\]|0\.00%|would need 0 samples/);
    // Near 1 the figures print as 1 - q, so they keep their digits: "1 - 7.980e-4 ... [1 - ..., 1 - ...]".
    const line = r.stdout.split('\n').find((l) => l.startsWith('failure probability'))!;
    const qs = [...line.matchAll(/1 - ([\d.e+-]+)/g)].map((m) => Number(m[1]));
    expect(qs).toHaveLength(3);
    expect(qs[1]).toBeGreaterThan(qs[0]!);
    expect(qs[2]).toBeLessThan(qs[0]!);
    // 1 uV is 9.2e-4 of sigma (1.089 mV): truth 2 Phi(-9.2e-4) = 0.99927 (A&S 26.2); the
    // Clopper-Pearson interval of the same run covers it.
    const j = JSON.parse(twinfet('tail', senseAmp, '--spec', '1uV', '--workers', '1', '--json').stdout);
    expect(j.method).toBe('monte-carlo');
    expect(j.interval[0]).toBeLessThanOrEqual(0.99927);
    expect(j.interval[1]).toBeGreaterThanOrEqual(0.99927);
    expect(j.interval[0]).toBeLessThan(j.interval[1]);
    // The printed figures are those of the JSON report, rounded.
    expect(Math.abs(qs[0]! - (1 - j.failureProbability))).toBeLessThan(1e-3 * (1 - j.failureProbability));
  });

  it('small things: --workers names itself, tail shows the temperature, run --plot says what it wrote, inspect says dbeta/beta', () => {
    const w = twinfet('run', demo, '--workers', '2.5');
    expect(w.code).toBe(2);
    expect(w.stderr.trim()).toBe('twinfet: --workers: expected a whole number such as 2 or 4 (threads), got "2.5"');
    const t = twinfet('tail', demo, '--workers', '1');
    expect(t.stdout.split('\n')[0]).toContain('27.0 C');
    const file = join(out, 'said.svg');
    const p = twinfet('run', demo, '--samples', '5000', '--workers', '1', '--plot', file);
    expect(p.stdout.trimEnd().split('\n').at(-1)).toBe(`wrote ${file}`);
    const i = twinfet('inspect', demo);
    expect(i.stdout).toContain('sigma dbeta/beta');
    expect(i.stdout).not.toContain('dB/B');
  });

  it('a bad value exits 2 with one line naming the field, nothing on stdout', () => {
    const r = twinfet('run', demo, '--samples', 'many');
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain('--samples');
  });
});

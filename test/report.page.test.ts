/// <reference lib="dom" />
/**
 * The design-review page read without a browser: a parsed document must hold every section,
 * every figure as an SVG with axis labels, and the numbers of `twinfet run --json` for the same
 * seed. (The browser test, report.browser.test.ts, makes the same checks in Chromium.)
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseHTML } from 'linkedom';
import { describe, expect, it } from 'vitest';
import { runCli } from './support/cli.js';
import { checkPage, extractPage } from './support/reportPage.js';

const out = mkdtempSync(join(tmpdir(), 'twinfet-report-'));

async function pageAndRun(design: string, args: string[], runArgs: string[], sections = 7) {
  const file = join(out, `${design.replace(/\W/g, '-')}.html`);
  const r = await runCli(['report', design, '--out', file, '--workers', '2', ...args], { timeoutMs: 60_000 });
  expect(r.code, r.stderr).toBe(0);
  expect(r.stdout).toMatch(new RegExp(`^wrote .*: ${sections} sections, \\d+ figures`));
  const run = await runCli(['run', design, '--json', '--workers', '1', ...args, ...runArgs], { timeoutMs: 60_000 });
  expect(run.code, run.stderr).toBe(0);
  return { html: readFileSync(file, 'utf8'), run: JSON.parse(run.stdout) as Record<string, unknown> };
}

describe('twinfet report, read as text', () => {
  it('mirror stage, moderate failure rate: every section and figure, and the run\'s numbers', async () => {
    const { html, run } = await pageAndRun('examples/comparator-demo.yaml', ['--samples', '30000', '--seed', '11'], []);
    const page = extractPage(parseHTML(html).document as unknown as Document);
    checkPage(page, run);
    expect(page.title).toBe('Design review: Comparator front end (demo)');
    // Failure about 1e-2: plain Monte Carlo resolves it, so the high-sigma estimate does not run, and the page says why.
    expect(page.numbers.some((n) => n.path?.startsWith('importance.'))).toBe(false);
    expect(page.text).toMatch(/high-sigma estimate\s*not run: the Monte Carlo failure probability \S+ is at least 1e-4/);
    // The mirror stage has a load, so the area split is drawn.
    expect(page.figures.map((f) => f.id)).toEqual(['fig-inversion', 'fig-histogram', 'fig-probability', 'fig-budget', 'fig-yield', 'fig-area', 'fig-split', 'fig-transfer', 'fig-slope']);
    // The command that reproduces the page, seed included.
    expect(page.text).toContain('twinfet report examples/comparator-demo.yaml --out');
    expect(page.text).toContain('--samples 30000 --seed 11 --confidence 0.95 --chip-yield 0.99');
  });

  it('simple p pair at 4.6 sigma: the high-sigma estimate and FORM, equal to run --method importance', async () => {
    const { html, run } = await pageAndRun('examples/sense-amp-pmos.yaml', ['--samples', '20000', '--seed', '5'], ['--method', 'importance']);
    const page = extractPage(parseHTML(html).document as unknown as Document);
    checkPage(page, run);
    const paths = page.numbers.map((n) => n.path);
    for (const p of ['importance.failureProbability', 'importance.interval.0', 'importance.form.failureProbability', 'importance.chip.failure']) expect(paths).toContain(p);
    // No load: no split figure; the input pair is in moderate inversion, so no tanh law either, and the page says so.
    expect(page.figures.map((f) => f.id)).not.toContain('fig-split');
    expect(page.text).toContain('The weak-inversion tanh law is not drawn');
  });

  it('resistor stage: the resistor table, the split with the load resistors, and the run\'s numbers', async () => {
    const { html, run } = await pageAndRun('examples/resistor-pair.yaml', ['--samples', '20000', '--seed', '8'], []);
    const page = extractPage(parseHTML(html).document as unknown as Document);
    checkPage(page, run);
    expect(page.text).toContain('R1load1 \u00b5m5 \u00b5m5 \u00b5m\u00b220 k\u03a9');
    expect(page.figures.map((f) => f.id)).toContain('fig-split');
    expect(page.text).toMatch(/The split of area between the input pair and the load resistors/);
    expect(page.text).toContain('(I1 R1 \u2212 I2 R2)/R');
  });

  it('operating conditions: section 8 with the per-condition table, the all-conditions yield and the drift, equal to run --json', async () => {
    const design = 'examples/comparator-conditions.yaml';
    const { html, run } = await pageAndRun(design, ['--samples', '20000', '--seed', '3'], [], 8);
    const page = extractPage(parseHTML(html).document as unknown as Document);
    // Every tagged number, section 8's included, equals the run's JSON for the same seed (exactly) and is shown to its rounding.
    checkPage(page, run);
    expect(page.sections.map((x) => x.id)[7]).toBe('conditions');
    expect(page.sections[7]!.heading).toBe('8. Operating conditions');
    expect(page.figures.map((f) => f.id).slice(-2)).toEqual(['fig-conditions', 'fig-drift']);
    const paths = new Set(page.numbers.map((n) => n.path));
    const conditions = run['conditions'] as unknown[];
    expect(conditions).toHaveLength(4);
    // Each condition's mean, sigma with its interval, and yield with its interval are on the page.
    for (let i = 0; i < conditions.length; i++) {
      for (const k of ['offset.mean', 'offset.sigma', 'offset.sigmaInterval.0', 'offset.sigmaInterval.1', 'yield.estimate', 'yield.interval.0', 'yield.interval.1']) expect(paths, `conditions.${i}.${k}`).toContain(`conditions.${i}.${k}`);
    }
    // The all-conditions yield and the drift (the run's, in V/K).
    for (const k of ['yield.evaluated', 'yield.estimate', 'yield.interval.0', 'yield.interval.1', 'drift.mean', 'drift.sigma', 'drift.sigmaInterval.0', 'drift.sigmaInterval.1']) expect(paths, k).toContain(k);
    expect((run['yield'] as { over: string }).over).toBe('all conditions');
    expect(page.text).toContain('instance yield, all conditions');
    expect(page.text).toMatch(/Drift of the offset from cold to hot/);
    // The drift histogram holds every sample the drift was taken over: the trimmed bins lose none.
    const json = await runCli(['report', design, '--out', join(out, 'conditions-json.html'), '--workers', '1', '--samples', '20000', '--seed', '3', '--json'], { timeoutMs: 60_000 });
    expect(json.code, json.stderr).toBe(0);
    const data = JSON.parse(json.stdout) as { conditions: { drift: { histogram: { counts: number[] } } }; run: { drift: { samples: number } } };
    expect(data.conditions.drift.histogram.counts.reduce((a, b) => a + b, 0)).toBe(data.run.drift.samples);
  });

  it('refuses a missing or wrong --out and too few samples, naming the option', async () => {
    const cases: [string[], RegExp][] = [
      [['examples/comparator-demo.yaml'], /^twinfet: --out: missing; give the page to write/],
      [['examples/comparator-demo.yaml', '--out', join(out, 'x.pdf')], /^twinfet: --out: expected a file name ending in \.html/],
      [['examples/comparator-demo.yaml', '--out', join(out, 'x.html'), '--samples', '500'], /^twinfet: --samples: expected a whole number from 1000/],
      [['examples/comparator-demo.yaml', '--out', join(out, 'x.html'), '--chip-yield', '1.5'], /^twinfet: --chip-yield: expected a number strictly between 0 and 1/],
      [['examples/comparator-demo.yaml', '--out', join(out, 'no-such-dir', 'x.html'), '--samples', '1000'], /^twinfet: --out: cannot write/],
    ];
    for (const [args, re] of cases) {
      const r = await runCli(['report', ...args]);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
      expect(r.stderr.trimEnd()).toMatch(re);
    }
  });
});

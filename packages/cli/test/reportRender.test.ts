/// <reference lib="dom" />
/// <reference lib="dom.iterable" />
import { fileURLToPath } from 'node:url';
import { parseHTML } from 'linkedom';
import { beforeAll, describe, expect, it } from 'vitest';
import { loadDesign } from '../src/designFile.js';
import { collectReport } from '../src/report/collect.js';
import type { ReportData } from '../src/report/data.js';
import { CAUTION, renderReport } from '../src/report/page.js';

const demo = fileURLToPath(new URL('../../../examples/comparator-demo.yaml', import.meta.url));

let data: ReportData;
beforeAll(async () => {
  const design = await loadDesign(demo);
  data = await collectReport(design, { samples: 4000, seed: 'render', workers: 1, confidence: 0.95, chipYield: 0.99, source: demo, command: ['twinfet', 'report', demo], version: 'test' });
});

const doc = (html: string) => parseHTML(html).document;

const withConditions = fileURLToPath(new URL('../../../examples/comparator-conditions.yaml', import.meta.url));
let conditioned: ReportData;
beforeAll(async () => {
  const design = await loadDesign(withConditions);
  conditioned = await collectReport(design, { samples: 4000, seed: 'render', workers: 1, confidence: 0.95, chipYield: 0.99, source: withConditions, command: ['twinfet', 'report', withConditions], version: 'test' });
});

describe('the page renderer', () => {
  it('renders sections 1 to 7 in order, and no conditions section without conditions', () => {
    const d = doc(renderReport(data));
    expect([...d.querySelectorAll('main > section')].map((s) => s.getAttribute('id'))).toEqual(['design', 'operating-point', 'distribution', 'budget', 'yield', 'area', 'transfer']);
    expect(d.querySelector('#conditions')).toBeNull();
  });

  it('renders section 8 for a design with conditions: the per-condition table, the all-conditions yield, sigma by condition and the drift histogram', () => {
    const html = renderReport(conditioned);
    const d = doc(html);
    const s = d.querySelector('section#conditions');
    expect(s).not.toBeNull();
    expect(s!.querySelector('h2')!.textContent).toBe('8. Operating conditions');
    const rows = [...s!.querySelector('table')!.querySelectorAll('tbody tr')].map((r) => [...r.querySelectorAll('td')].map((c) => c.textContent));
    expect(rows.map((r) => r[0])).toEqual(['cold', 'room', 'hot', 'hot-slow']);
    // Kelvin with Celsius beside it; other settings with prefixes, a shift in % (exact text of the formatting).
    expect(rows[0]![1]).toBe('temperature 233.15 K (\u221240 \u00b0C)');
    expect(rows[3]![1]).toBe('temperature 398.15 K (125 \u00b0C), tail 8 \u00b5A, shift n.kp \u221210 %, shift p.kp \u221210 %');
    // Row i is the run's condition i: its sigma tagged with the run's path and exact value.
    const run = conditioned.run;
    const sigma = s!.querySelector('data[data-path="conditions.3.offset.sigma"]')!;
    expect(Number(sigma.getAttribute('value'))).toBe(run.conditions![3]!.offset.sigma);
    // The chip yield of a row is its own instance yield to the power of the instances (64), as computed here.
    expect(Number(rows[0]![8])).toBeCloseTo(run.conditions![0]!.yield.estimate ** 64, 3);
    expect(s!.textContent).toContain('instance yield, all conditions');
    for (const id of ['fig-conditions', 'fig-drift']) {
      const fig = s!.querySelector(`figure#${id}`);
      expect(fig!.querySelector('svg')).not.toBeNull();
      expect(fig!.querySelector('figcaption')!.textContent!.length).toBeGreaterThan(40);
    }
    // The drift's numbers carry the run's exact values, in V/K.
    const ds = s!.querySelector('data[data-path="drift.sigma"]')!;
    expect(Number(ds.getAttribute('value'))).toBe(run.drift!.sigma);
    expect(ds.getAttribute('data-unit')).toBe('V/K');
    expect(s!.querySelector('figure#fig-drift')!.textContent).toContain('dVos/dT');
  });

  it('is self-contained: no script, a policy that forbids every load, no address outside the page', () => {
    const html = renderReport(data);
    const d = doc(html);
    expect(d.querySelectorAll('script')).toHaveLength(0);
    expect(d.querySelector('meta[http-equiv="Content-Security-Policy"]')!.getAttribute('content')).toMatch(/^default-src 'none';/);
    for (const el of d.querySelectorAll('[src], [href]')) {
      const v = el.getAttribute('src') ?? el.getAttribute('href')!;
      expect(v.startsWith('#') || v.startsWith('data:')).toBe(true);
    }
    expect(html).not.toMatch(/@import|url\((?!#)/);
    // The print stylesheet (A4 and Letter share the margins).
    expect(html).toContain('@media print');
    expect(html).toContain('@page');
  });

  it('puts the caution before the first section', () => {
    const html = renderReport(data);
    expect(html.indexOf(CAUTION)).toBeGreaterThan(0);
    expect(html.indexOf(CAUTION)).toBeLessThan(html.indexOf('<section'));
  });

  it('keeps section 7 for a stage type without a transfer curve, saying why', () => {
    const d = doc(renderReport({ ...data, transfer: { none: 'the report has no transfer-curve definition for the x stage yet' } }));
    const s = d.querySelector('section#transfer')!;
    expect(s.querySelectorAll('figure')).toHaveLength(0);
    expect(s.textContent).toContain('No transfer curve: the report has no transfer-curve definition for the x stage yet.');
  });
});

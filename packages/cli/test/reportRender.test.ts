/// <reference lib="dom" />
/// <reference lib="dom.iterable" />
import { fileURLToPath } from 'node:url';
import { parseHTML } from 'linkedom';
import { beforeAll, describe, expect, it } from 'vitest';
import { loadDesign } from '../src/designFile.js';
import { collectReport } from '../src/report/collect.js';
import type { ConditionsData, ReportData } from '../src/report/data.js';
import { CAUTION, renderReport } from '../src/report/page.js';

const demo = fileURLToPath(new URL('../../../examples/comparator-demo.yaml', import.meta.url));

let data: ReportData;
beforeAll(async () => {
  const design = await loadDesign(demo);
  data = await collectReport(design, { samples: 4000, seed: 'render', workers: 1, confidence: 0.95, chipYield: 0.99, source: demo, command: ['twinfet', 'report', demo], version: 'test' });
});

const doc = (html: string) => parseHTML(html).document;

/** Hand-built conditions, shaped as ConditionsData (no stage can make them yet). */
const conditions: ConditionsData = {
  rows: [
    { name: 'cold', settings: [{ field: 'temperature', value: 233.15, unit: 'K' }], samples: 4000, mean: -1e-5, sigma: 3.7e-3, sigmaInterval: [3.62e-3, 3.78e-3], yield: 0.991, yieldInterval: [0.988, 0.9936], chipYield: 0.991 },
    { name: 'hot', settings: [{ field: 'temperature', value: 398.15, unit: 'K' }, { field: 'tail', value: 12e-6, unit: 'A' }], samples: 4000, mean: 2e-5, sigma: 4.1e-3, sigmaInterval: [4.01e-3, 4.19e-3], yield: 0.985, yieldInterval: [0.981, 0.9885], chipYield: 0.985 },
  ],
  drift: { from: 'cold', to: 'hot', samples: 4000, mean: 3e-5, sigma: 0.4e-3, histogram: { lo: -2e-3, binWidth: 0.1e-3, counts: Array.from({ length: 40 }, (_, i) => Math.round(400 * Math.exp(-0.5 * ((i - 19.5) / 4) ** 2))) } },
};

describe('the page renderer', () => {
  it('renders sections 1 to 7 in order, and no conditions section without conditions', () => {
    const d = doc(renderReport(data));
    expect([...d.querySelectorAll('main > section')].map((s) => s.getAttribute('id'))).toEqual(['design', 'operating-point', 'distribution', 'budget', 'yield', 'area', 'transfer']);
    expect(d.querySelector('#conditions')).toBeNull();
  });

  it('renders section 8 from a conditions object: the per-condition table, sigma by condition and the drift histogram', () => {
    const html = renderReport({ ...data, conditions });
    const d = doc(html);
    const s = d.querySelector('section#conditions');
    expect(s).not.toBeNull();
    expect(s!.querySelector('h2')!.textContent).toBe('8. Operating conditions');
    const rows = [...s!.querySelectorAll('tbody tr')].map((r) => [...r.querySelectorAll('td')].map((c) => c.textContent));
    expect(rows.map((r) => r[0])).toEqual(['cold', 'hot']);
    // Kelvin with Celsius beside it; other settings with prefixes (exact text of the formatting).
    expect(rows[0]![1]).toBe('temperature 233.15 K (\u221240 \u00b0C)');
    expect(rows[1]![1]).toBe('temperature 398.15 K (125 \u00b0C), tail 12 \u00b5A');
    expect(rows[1]![4]).toBe('4.1 mV');
    for (const id of ['fig-conditions', 'fig-drift']) {
      const fig = s!.querySelector(`figure#${id}`);
      expect(fig!.querySelector('svg')).not.toBeNull();
      expect(fig!.querySelector('figcaption')!.textContent!.length).toBeGreaterThan(40);
    }
    // The drift's numbers are tagged with their exact values.
    expect(s!.querySelector('data[data-key="conditions.drift.sigma"]')!.getAttribute('value')).toBe('0.0004');
    expect(s!.querySelector('figure#fig-drift')!.textContent).toContain('\u0394Vos');
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

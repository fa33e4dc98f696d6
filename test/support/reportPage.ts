/// <reference lib="dom.iterable" />
/// <reference lib="dom" />
/**
 * What the report tests read from a page, and the checks they share: the same extraction runs
 * in headless Chromium (page.evaluate) and on a parsed document without a browser, so both tests
 * assert the same things.
 */
import { expect } from 'vitest';

/** What a page shows, as plain data. */
export interface PageContent {
  readonly title: string;
  readonly sections: readonly { readonly id: string; readonly heading: string; readonly figures: number }[];
  readonly figures: readonly { readonly id: string; readonly svgs: number; readonly xLabels: readonly string[]; readonly yLabels: readonly string[]; readonly panels: number; readonly caption: string }[];
  readonly numbers: readonly { readonly path: string | null; readonly key: string | null; readonly value: string; readonly unit: string | null; readonly text: string }[];
  readonly caution: string;
  readonly scripts: number;
  readonly text: string;
}

/**
 * Reads a page's content with standard DOM calls only (the function is sent to the browser as
 * source, so it may use nothing from outside its body).
 */
export function extractPage(doc: Document): PageContent {
  const textOf = (el: Element | null): string => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();
  return {
    title: textOf(doc.querySelector('h1')),
    sections: [...doc.querySelectorAll('main > section')].map((s) => ({ id: s.getAttribute('id') ?? '', heading: textOf(s.querySelector('h2')), figures: s.querySelectorAll('figure').length })),
    figures: [...doc.querySelectorAll('figure')].map((f) => ({
      id: f.getAttribute('id') ?? '',
      svgs: f.querySelectorAll('svg').length,
      xLabels: [...f.querySelectorAll('text')].filter((t) => (t.getAttribute('class') ?? '') === 'axis-label x').map((t) => textOf(t)),
      yLabels: [...f.querySelectorAll('text')].filter((t) => (t.getAttribute('class') ?? '') === 'axis-label y').map((t) => textOf(t)),
      panels: [...f.querySelectorAll('g')].filter((g) => g.getAttribute('class') === 'panel').length,
      caption: textOf(f.querySelector('figcaption')),
    })),
    numbers: [...doc.querySelectorAll('data')].map((d) => ({ path: d.getAttribute('data-path'), key: d.getAttribute('data-key'), value: d.getAttribute('value') ?? '', unit: d.getAttribute('data-unit'), text: textOf(d) })),
    caution: textOf(doc.querySelector('.caution')),
    scripts: doc.querySelectorAll('script').length,
    text: textOf(doc.body),
  };
}

/** The sections every page has, in order (section 8 only with operating conditions). */
export const SECTION_IDS = ['design', 'operating-point', 'distribution', 'budget', 'yield', 'area', 'transfer'] as const;

const PREFIX: Readonly<Record<string, number>> = { f: 1e-15, p: 1e-12, n: 1e-9, '\u00b5': 1e-6, u: 1e-6, m: 1e-3, '': 1, k: 1e3 };

/**
 * The number a tag's text shows, in SI units, and half its last digit's place (the rounding the
 * text may carry). Text such as "3.861 mV", "−5.153 µV", "84.3 %", "0.990210", "1.23e−5".
 */
export function shownNumber(text: string, unit: string | null): { value: number; halfStep: number } {
  const t = text.replace(/\u2212/g, '-').trim();
  const m = /^(-?)(\d+)(?:\.(\d+))?(?:e(-?\d+))?\s*(.*)$/.exec(t);
  if (m === null) throw new Error(`not a number: "${text}"`);
  const [, sign, whole, frac = '', exp = '0', rest] = m;
  const u = unit ?? '';
  let scale = 1;
  if (u === '%') {
    if (rest !== '%') throw new Error(`"${text}" should be in %`);
    scale = 0.01;
  } else if (u !== '') {
    const prefix = rest!.endsWith(u) ? rest!.slice(0, rest!.length - u.length) : null;
    if (prefix === null || !(prefix in PREFIX)) throw new Error(`"${text}" should be in ${u} with an SI prefix`);
    scale = PREFIX[prefix]!;
  } else if (rest !== '') throw new Error(`"${text}" should be a plain number`);
  const e = Number(exp);
  const value = Number(`${sign}${whole}.${frac || '0'}`) * 10 ** e * scale;
  return { value, halfStep: 0.5 * 10 ** (e - frac.length) * scale };
}

/** The value at a dotted path ("offset.quantiles.signed.1.value") of a JSON object. */
export function at(json: unknown, path: string): unknown {
  return path.split('.').reduce<unknown>((o, k) => (o === null || typeof o !== 'object' ? undefined : (o as Record<string, unknown>)[k]), json);
}

/**
 * The checks both report tests make: every section present, every figure an SVG with non-empty
 * axis labels, the caution near the top, no script, and every tagged number equal to the run's
 * JSON for the same seed (exactly) and shown to its stated rounding.
 */
export function checkPage(page: PageContent, run: unknown): void {
  expect(page.sections.map((s) => s.id).slice(0, SECTION_IDS.length)).toEqual([...SECTION_IDS]);
  page.sections.forEach((s, i) => expect(s.heading.startsWith(`${i + 1}. `)).toBe(true));
  expect(page.caution).toMatch(/design aids.*foundry.*matching data.*sign-off/);
  expect(page.scripts).toBe(0);
  // Sections 2 to 7 each carry at least one figure (section 1 is tables).
  for (const s of page.sections.slice(1, SECTION_IDS.length)) expect(s.figures, `figures in section ${s.id}`).toBeGreaterThanOrEqual(1);
  for (const f of page.figures) {
    expect(f.svgs, `figure ${f.id}`).toBe(1);
    expect(f.xLabels.length, `figure ${f.id} x labels`).toBe(f.panels);
    expect(f.yLabels.length, `figure ${f.id} y labels`).toBe(f.panels);
    for (const l of [...f.xLabels, ...f.yLabels]) expect(l.length, `figure ${f.id} label`).toBeGreaterThan(2);
    expect(f.caption.length, `figure ${f.id} caption`).toBeGreaterThan(40);
  }
  const tagged = page.numbers.filter((n) => n.path !== null);
  expect(tagged.length).toBeGreaterThan(40);
  for (const n of tagged) {
    const expected = at(run, n.path!);
    expect(expected, `page number ${n.path} is not in the run's JSON`).not.toBeUndefined();
    // The same seed and sample count give the same doubles; the page writes them in full.
    if (typeof expected === 'string') expect(n.value, n.path!).toBe(expected);
    else expect(Number(n.value), n.path!).toBe(expected);
    const shown = shownNumber(n.text, n.unit);
    // The text is the value rounded to the digits it shows (plus rounding of the decimal itself).
    if (typeof expected === 'number') expect(Math.abs(shown.value - expected), `${n.path}: "${n.text}" for ${expected}`).toBeLessThanOrEqual(shown.halfStep * (1 + 1e-9) + Math.abs(expected) * 1e-12);
  }
}

/// <reference lib="dom" />
/**
 * The design-review page in a real browser: Debian's Chromium, headless, driven by
 * playwright-core. Under CI the browser must be there (.ci/run installs it); elsewhere the test
 * says why it skips.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';
import { BROWSER_PATHS, findBrowser, openBrowser, pngInk } from './support/browser.js';
import { runCli } from './support/cli.js';
import { checkPage, extractPage } from './support/reportPage.js';

const browser = findBrowser();
const ci = process.env['CI'] === 'true';
if (browser === null && ci) {
  throw new Error(`no Chromium found (looked at ${BROWSER_PATHS.join(', ')}): the browser test cannot run. Install Debian's package (apt-get install -y chromium; .ci/run does this) or set TWINFET_CHROMIUM.`);
}
if (browser === null) console.warn(`report.browser.test.ts: SKIPPED, no Chromium at ${BROWSER_PATHS.join(', ')} (apt-get install -y chromium, or set TWINFET_CHROMIUM); under CI=true this fails instead.`);

describe.skipIf(browser === null)('twinfet report in headless Chromium', () => {
  it('loads with no console error and no request, shows every section and figure with the run\'s numbers, and screenshots non-blank', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'twinfet-browser-'));
    const file = join(dir, 'review.html');
    const args = ['--samples', '20000', '--seed', '3', '--spec', '20mV'];
    const made = await runCli(['report', 'examples/comparator-demo.yaml', '--out', file, ...args], { timeoutMs: 60_000 });
    expect(made.code, made.stderr).toBe(0);
    // At 20 mV (5.2 sigma) the high-sigma estimate runs: compare with run --method importance.
    const run = await runCli(['run', 'examples/comparator-demo.yaml', '--json', '--workers', '1', '--method', 'importance', ...args], { timeoutMs: 60_000 });
    expect(run.code, run.stderr).toBe(0);

    const { context, close } = await openBrowser(browser!);
    try {
      const page = await context.newPage();
      const errors: string[] = [];
      const requests: string[] = [];
      page.on('console', (m) => {
        if (m.type() === 'error' || m.type() === 'warning') errors.push(`${m.type()}: ${m.text()}`);
      });
      page.on('pageerror', (e) => errors.push(`page error: ${e.message}`));
      page.on('request', (r) => requests.push(r.url()));
      const url = pathToFileURL(file).href;
      await page.goto(url, { waitUntil: 'load' });
      const content = await page.evaluate(extractPage, await page.evaluateHandle(() => document));
      checkPage(content, JSON.parse(run.stdout));
      expect(content.numbers.some((n) => n.path === 'importance.failureProbability')).toBe(true);
      // Every figure is laid out: a drawn SVG with a real size.
      const sizes = await page.$$eval('figure.plot svg', (svgs) => svgs.map((s) => s.getBoundingClientRect()).map((r) => [r.width, r.height]));
      for (const [w, h] of sizes) {
        expect(w).toBeGreaterThan(300);
        expect(h).toBeGreaterThan(80);
      }
      // Narrow window: the page reflows rather than overflowing sideways.
      await page.setViewportSize({ width: 380, height: 800 });
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow).toBeLessThanOrEqual(1);
      // Print: at the text width of A4 (210 mm less the stylesheet's 2 x 12 mm margins, at 96 px
      // per inch) nothing runs past the page, and both paper sizes print without error.
      await page.emulateMedia({ media: 'print' });
      await page.setViewportSize({ width: Math.floor(((210 - 24) / 25.4) * 96), height: 1000 });
      const printOverflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(printOverflow).toBeLessThanOrEqual(1);
      for (const format of ['A4', 'Letter'] as const) {
        const pdf = await page.pdf({ format, printBackground: true });
        const pages = (pdf.toString('latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length;
        // Seven sections with nine figures: more than a few pages, far fewer than one per figure and table.
        expect(pages, `${format} pages`).toBeGreaterThan(4);
        expect(pages, `${format} pages`).toBeLessThan(25);
      }
      await page.emulateMedia({ media: 'screen' });
      await page.setViewportSize({ width: 1100, height: 1400 });
      const png = await page.screenshot({ fullPage: true });
      writeFileSync(join(dir, 'review.png'), png);
      expect(errors).toEqual([]);
      // The page itself is the only thing loaded: no fonts, images, styles or anything else.
      expect(requests).toEqual([url]);
      const ink = await pngInk(context, png);
      // A blank page is one colour; this one has text, fills and lines in many shades and covers
      // several percent of the area (common practice, no source: thresholds far from blank).
      expect(ink.width).toBe(1100);
      expect(ink.height).toBeGreaterThan(4000);
      expect(ink.colours).toBeGreaterThan(50);
      expect(ink.inked).toBeGreaterThan(0.03);
    } finally {
      await close();
    }
  });
});

/// <reference lib="dom" />
/**
 * Makes the README's pictures of the design-review page with the same browser set-up as the
 * browser test: the top and the distribution section of the demo comparator at 1e6 samples, and
 * the transfer curve of the weak-inversion cell (where the tanh law is drawn). Run from the
 * repository root: npx --yes pnpm@12.4.2 screenshot
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { Page } from 'playwright-core';
import { BROWSER_PATHS, findBrowser, openBrowser, pngInk } from './browser.js';
import { REPO_ROOT, runCli } from './cli.js';

const browser = findBrowser();
if (browser === null) throw new Error(`no Chromium found at ${BROWSER_PATHS.join(', ')}; install Debian's chromium package`);
const dir = mkdtempSync(join(tmpdir(), 'twinfet-shot-'));

async function report(design: string, samples: string): Promise<string> {
  const file = join(dir, `${design.replace(/\W/g, '-')}.html`);
  const made = await runCli(['report', `examples/${design}.yaml`, '--out', file, '--samples', samples, '--seed', '1'], { timeoutMs: 120_000 });
  if (made.code !== 0) throw new Error(made.stderr);
  return pathToFileURL(file).href;
}

const pages: [string, string, [string, (p: Page) => Promise<Buffer>][]][] = [
  [
    'comparator-demo',
    '1e6',
    [
      ['docs/report-top.png', (p) => p.screenshot({ clip: { x: 0, y: 0, width: 1000, height: 1300 } })],
      ['docs/report-distribution.png', (p) => p.locator('section#distribution').screenshot()],
    ],
  ],
  ['weak-inversion-wta', '1e5', [['docs/report-transfer.png', (p) => p.locator('figure#fig-transfer').screenshot()]]],
];

const { context, close } = await openBrowser(browser, { width: 1000, height: 1300 });
try {
  for (const [design, samples, shots] of pages) {
    const page = await context.newPage();
    await page.goto(await report(design, samples), { waitUntil: 'load' });
    for (const [name, take] of shots) {
      const png = await take(page);
      const ink = await pngInk(context, png);
      if (ink.colours < 50 || ink.inked < 0.03) throw new Error(`${name} looks blank (${ink.colours} colours, ${(ink.inked * 100).toFixed(1)}% inked)`);
      writeFileSync(join(REPO_ROOT, name), png);
      console.log(`wrote ${name} (${ink.width} x ${ink.height}, ${(png.length / 1024).toFixed(0)} kB)`);
    }
    await page.close();
  }
} finally {
  await close();
}

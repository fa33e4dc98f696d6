/// <reference lib="dom" />
/**
 * Headless Chromium for the report tests: Debian's system browser (never a downloaded build),
 * driven by playwright-core.
 */
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext } from 'playwright-core';

/** Where the browser may be: TWINFET_CHROMIUM, then Debian's paths. */
export const BROWSER_PATHS = [process.env['TWINFET_CHROMIUM'], '/usr/bin/chromium', '/usr/bin/chromium-browser'].filter((p): p is string => p !== undefined && p !== '');

/** The first browser found, or null. */
export function findBrowser(): string | null {
  return BROWSER_PATHS.find((p) => existsSync(p)) ?? null;
}

/** Flags for a quiet, offline, throw-away browser (no sync, no updates, no background traffic). */
const FLAGS = ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-default-apps', '--disable-extensions'];

/** A browser context on a fresh profile; close() ends the browser and removes the profile. */
export async function openBrowser(executablePath: string, viewport = { width: 1100, height: 1400 }): Promise<{ context: BrowserContext; close: () => Promise<void> }> {
  const profile = mkdtempSync(join(tmpdir(), 'twinfet-chromium-'));
  const context = await chromium.launchPersistentContext(profile, { executablePath, headless: true, args: FLAGS, viewport, offline: true });
  return {
    context,
    close: async () => {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/**
 * How far a PNG is from blank, measured in the browser itself: the number of distinct colours
 * and the share of pixels that are not white.
 */
export async function pngInk(context: BrowserContext, png: Buffer): Promise<{ colours: number; inked: number; width: number; height: number }> {
  const page = await context.newPage();
  try {
    return await page.evaluate(async (b64: string) => {
      const img = new Image();
      img.src = `data:image/png;base64,${b64}`;
      await img.decode();
      const canvas = document.createElement('canvas');
      canvas.width = img.naturalWidth;
      canvas.height = img.naturalHeight;
      const ctx = canvas.getContext('2d')!;
      ctx.drawImage(img, 0, 0);
      const px = ctx.getImageData(0, 0, canvas.width, canvas.height).data;
      const colours = new Set<number>();
      let inked = 0;
      for (let i = 0; i < px.length; i += 4) {
        colours.add((px[i]! << 16) | (px[i + 1]! << 8) | px[i + 2]!);
        if (px[i]! < 245 || px[i + 1]! < 245 || px[i + 2]! < 245) inked++;
      }
      return { colours: colours.size, inked: inked / (px.length / 4), width: canvas.width, height: canvas.height };
    }, png.toString('base64'));
  } finally {
    await page.close();
  }
}

#!/usr/bin/env node
// Entry of the twinfet command line. The program is built by `tsc -b` to ../dist and bundled
// from there into ../bundle (packages/cli/bundle.mjs), which starts about twice as fast. The
// bundle runs when it is newer than every package's build; otherwise (not bundled yet, or the
// sources were rebuilt since) the same program runs from dist, so a stale bundle never does.
import { statSync } from 'node:fs';

const mtime = (rel) => {
  try {
    return statSync(new URL(rel, import.meta.url)).mtimeMs;
  } catch {
    return Number.NaN;
  }
};
const builds = ['../dist/tsconfig.tsbuildinfo', '../../core/dist/tsconfig.tsbuildinfo', '../../montecarlo/dist/tsconfig.tsbuildinfo'];
const bundled = mtime('../bundle/built');
const fresh = bundled === bundled && builds.every((f) => !(mtime(f) > bundled));
const { main } = await (fresh ? import('../bundle/twinfet.js') : import('../dist/main.js'));

process.exitCode = await main(process.argv.slice(2));

#!/usr/bin/env node
// Entry of the twinfet command line. The program is built by `tsc -b` to ../dist and bundled
// from there into ../bundle (packages/cli/bundle.mjs), which starts about twice as fast (one
// file, run with V8's code cache by ./loadBundle.js). The
// bundle runs when it is newer than every package's build; otherwise (not bundled yet, or the
// sources were rebuilt since) the same program runs from dist, so a stale bundle never does.
// `--version` and a `--help` into a pipe or file are answered here without loading the
// program (the help text is the program's own, written by the bundler beside the bundle).
import { readFileSync, statSync } from 'node:fs';

const argv = process.argv.slice(2);
const only = argv.length === 1 ? argv[0] : undefined;
if (only === '--version' || only === '-V') {
  process.stdout.write(`${JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')).version}\n`);
} else {
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
  // The saved help is 80 columns wide, as commander writes it when stdout is not a terminal.
  const help = fresh && (only === '--help' || only === '-h') && process.stdout.isTTY !== true ? readHelp() : undefined;
  if (help !== undefined) process.stdout.write(help);
  else {
    const { main } = fresh ? await loadBundled() : await import('../dist/main.js');
    process.exitCode = await main(argv);
  }
}

async function loadBundled() {
  const { loadBundle } = await import('./loadBundle.js');
  return loadBundle(new URL('../bundle/twinfet.cjs', import.meta.url)).exports;
}

function readHelp() {
  try {
    return readFileSync(new URL('../bundle/help.txt', import.meta.url), 'utf8');
  } catch {
    return undefined;
  }
}

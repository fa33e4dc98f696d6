// Bundles the built command line (dist/ of the three packages, made by `tsc -b`) into
// packages/cli/bundle/: one file to load instead of ~80 modules, which halves Node's start-up.
// Run from the repository root or anywhere: `node packages/cli/bundle.mjs`.
//
// - twinfet.js is the command line, worker.js the Monte Carlo worker thread. They sit in one
//   folder because the pool finds its worker at ./worker.js beside its own module.
// - piscina stays outside: it starts its own worker wrapper by path from its package folder.
// - vega and vega-lite stay outside and the plot code is split into its own chunk, so runs
//   without --plot never load them (the plot module is imported on demand).
// - The version is inlined (no package.json read at start-up).
import { readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';

const cli = fileURLToPath(new URL('.', import.meta.url));
const montecarlo = fileURLToPath(new URL('../montecarlo/', import.meta.url));
const outdir = `${cli}bundle`;
const { version } = JSON.parse(readFileSync(`${cli}package.json`, 'utf8'));

for (const f of [`${cli}dist/main.js`, `${montecarlo}dist/engine/worker.js`]) {
  try {
    statSync(f);
  } catch {
    console.error(`bundle: ${f} is missing; run \`npx tsc -b\` first`);
    process.exit(1);
  }
}

rmSync(outdir, { recursive: true, force: true });
await build({
  entryPoints: { twinfet: `${cli}dist/main.js`, worker: `${montecarlo}dist/engine/worker.js` },
  outdir,
  bundle: true,
  splitting: true,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  external: ['piscina', 'vega', 'vega-lite'],
  define: { TWINFET_BUNDLED_VERSION: JSON.stringify(version) },
  // CommonJS dependencies (seedrandom, jstat, cli-progress) call require() for Node's modules.
  banner: { js: "import { createRequire as __twinfetRequire } from 'node:module'; const require = __twinfetRequire(import.meta.url);" },
  chunkNames: 'chunk-[hash]',
  legalComments: 'none',
  logLevel: 'warning',
});
// The bin compares this stamp with the builds' time stamps and falls back to dist when stale.
writeFileSync(`${outdir}/built`, `${new Date().toISOString()}\n`);

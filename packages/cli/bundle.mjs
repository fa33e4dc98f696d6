// Bundles the built command line (dist/ of the three packages, made by `tsc -b`) into
// packages/cli/bundle/: one file to load instead of ~80 modules, and V8's code cache for it, so
// that a start reads compiled bytecode instead of parsing the program again.
// Run from the repository root or anywhere: `node packages/cli/bundle.mjs`.
//
// - twinfet.cjs is the command line, worker.cjs the Monte Carlo worker thread, each one
//   CommonJS file run by bin/loadBundle.js through node:vm with its code cache (<file>.cache).
//   CommonJS because node:vm compiles scripts with a cache; its ES-module form is experimental.
// - worker.js, the file the pool starts (it finds it at ./worker.js beside the pool's own
//   module, here twinfet.cjs), only loads worker.cjs.
// - piscina stays outside: it starts its own worker wrapper by path from its package folder.
// - import.meta.url, which a CommonJS file lacks, becomes the loader's __twinfetUrl.
// - The version is inlined (no package.json read at start-up).
// - twinfet.cjs.cache is written after the program has run the bundled example and `--help` in
//   this process, so it holds the bytecode of every function those ran, not only the top
//   level; worker.cjs.cache after the worker's top level (its chunk code compiles on first use).
// - help.txt is the program's own `--help` (80 columns), which bin/twinfet.js prints without
//   loading the program.
import { readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { build } from 'esbuild';
import { loadBundle } from './bin/loadBundle.js';

const cli = fileURLToPath(new URL('.', import.meta.url));
const montecarlo = fileURLToPath(new URL('../montecarlo/', import.meta.url));
const example = fileURLToPath(new URL('../../examples/comparator-demo.yaml', import.meta.url));
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
const options = {
  bundle: true,
  format: 'cjs',
  platform: 'node',
  target: 'node20',
  external: ['piscina'],
  define: { TWINFET_BUNDLED_VERSION: JSON.stringify(version), 'import.meta.url': '__twinfetUrl' },
  legalComments: 'none',
  logLevel: 'warning',
};
await build({ ...options, entryPoints: [`${cli}dist/main.js`], outfile: `${outdir}/twinfet.cjs` });
await build({ ...options, entryPoints: [`${montecarlo}dist/engine/worker.js`], outfile: `${outdir}/worker.cjs` });
writeFileSync(
  `${outdir}/worker.js`,
  `// The pool's worker: runs worker.cjs with its code cache (see packages/cli/bundle.mjs).
import { loadBundle } from '../bin/loadBundle.js';

export default loadBundle(new URL('./worker.cjs', import.meta.url)).exports.default;
`,
);

const worker = loadBundle(pathToFileURL(`${outdir}/worker.cjs`));
if (typeof worker.exports.default !== 'function') {
  console.error('bundle: worker.cjs does not export its task function');
  process.exit(1);
}
writeFileSync(`${outdir}/worker.cjs.cache`, worker.script.createCachedData());

const cliBundle = loadBundle(pathToFileURL(`${outdir}/twinfet.cjs`));
const { main } = cliBundle.exports;
const help = [];
const code = await main(['--help'], { out: (t) => help.push(t.endsWith('\n') ? t : `${t}\n`), err: (t) => help.push(t), errIsTty: false });
if (code !== 0) {
  console.error(`bundle: twinfet --help exited ${code}`);
  process.exit(1);
}
writeFileSync(`${outdir}/help.txt`, help.join(''));
const errors = [];
const warm = await main(['run', example, '--samples', '2000', '--workers', '1', '--json'], { out: () => {}, err: (t) => errors.push(t), errIsTty: false });
if (warm !== 0) {
  console.error(`bundle: twinfet run ${example} exited ${warm}: ${errors.join('')}`);
  process.exit(1);
}
writeFileSync(`${outdir}/twinfet.cjs.cache`, cliBundle.script.createCachedData());
// The bin compares this stamp with the builds' time stamps and falls back to dist when stale.
writeFileSync(`${outdir}/built`, `${new Date().toISOString()}\n`);

// Loads one file of the bundle (packages/cli/bundle/*.cjs, one CommonJS file each, made by
// packages/cli/bundle.mjs) through node:vm, with the V8 code cache the bundler wrote beside it
// (<file>.cache). With the cache V8 does not parse or compile the ~1.2 MB of the program again
// at each start: it reads the bytecode back, which took a 1000-sample run's loading from ~45 to
// ~25 ms and its first run of the model from ~100 to ~40 ms on the development machine.
//
// The cache is only an accelerator. V8 checks it against the source and its own version and
// flags, and rejects it when any differs (another Node version, a rebuilt bundle): the file is
// then compiled from its source as usual, with the same result.
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import vm from 'node:vm';

/**
 * Runs the CommonJS file at `url` (a file: URL) as Node would run a module, and returns its
 * exports with the compiled script (whose createCachedData() the bundler saves). The file's
 * `import.meta.url` was replaced by the bundler with `__twinfetUrl`, given here.
 *
 * @param {URL} url
 * @returns {{ exports: Record<string, unknown>, script: vm.Script }}
 */
export function loadBundle(url) {
  const file = fileURLToPath(url);
  const source = readFileSync(file, 'utf8');
  let cachedData;
  try {
    cachedData = readFileSync(`${file}.cache`);
  } catch {
    cachedData = undefined;
  }
  // The wrapper stays on the first line, so line numbers in stack traces are the file's own.
  const wrapped = `(function (exports, require, module, __filename, __dirname, __twinfetUrl) {${source}\n})`;
  const script = new vm.Script(wrapped, {
    filename: file,
    cachedData,
    importModuleDynamically: vm.constants.USE_MAIN_CONTEXT_DEFAULT_LOADER,
  });
  const module = { exports: {} };
  script.runInThisContext()(module.exports, createRequire(file), module, file, dirname(file), url.href);
  return { exports: module.exports, script };
}

/**
 * vitest global set-up: bundles the built command line (packages/cli/bundle.mjs) before any
 * test spawns it, so the end-to-end tests run the bundle users get, made from the current
 * build. The bundler reads dist/: run `npx tsc -b` first.
 */
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

export default function setup(): void {
  execFileSync(process.execPath, [fileURLToPath(new URL('../../packages/cli/bundle.mjs', import.meta.url))], { stdio: 'inherit' });
}

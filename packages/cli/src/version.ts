import { readFileSync } from 'node:fs';

/** Replaced by the version string when the command line is bundled (packages/cli/bundle.mjs). */
declare const TWINFET_BUNDLED_VERSION: string | undefined;

/** The command line's version: inlined in the bundle, read from package.json when run from dist. */
export const VERSION: string =
  typeof TWINFET_BUNDLED_VERSION === 'string'
    ? TWINFET_BUNDLED_VERSION
    : (JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')) as { version: string }).version;

/**
 * Vitest setup file: every fast-check property is seeded. Each property in the tests names its
 * own `seed`; this global default keeps one that does not from drawing a new seed per run.
 */
import fc from 'fast-check';

fc.configureGlobal({ seed: 20_261_201 });

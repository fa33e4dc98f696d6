/**
 * Monte Carlo with a V_T / current-factor correlation against the closed form derived in
 * packages/core/test/closedForms.ts (per pair S^2 + k^2 B^2 - 2 rho k S B), on designs where the
 * correlation moves sigma by far more than the test's tolerance, so that a dropped square root
 * or a flipped sign of rho in the sampled draws shows. Seeded, in this thread.
 */
import type { Design } from '@twinfet/core';
import { describe, expect, it } from 'vitest';
import { correlatedSigma } from '../../core/test/closedForms.js';
import { simulate } from '../src/analyses/simulate.js';
import { testProcess } from './designs.js';

/** A simple pair with a large current-factor term: I_D/gm x B ~ S (IC ~ 9 at 47 uA). */
const simple = (rho: number): Design => ({
  name: 'correlated simple pair (invented)',
  temperature: 300,
  topology: 'simple',
  tail: 94e-6,
  input: { polarity: 'n', w: 20e-6, l: 2e-6 },
  process: { n: { ...testProcess.n, abeta: 5e-8, rho } },
  spec: { offset: 5e-3, instances: 1 },
});
/** The same input with a mirror load whose current factor also matters. */
const mirror = (rho: number): Design => ({
  ...simple(rho),
  name: 'correlated mirror stage (invented)',
  topology: 'mirror',
  load: { polarity: 'p', w: 10e-6, l: 4e-6 },
  process: { n: { ...testProcess.n, abeta: 5e-8, rho }, p: { ...testProcess.p, abeta: 4e-8, rho: -rho } },
});

describe('Monte Carlo sigma with rho != 0 against the closed form (within 4 standard errors)', () => {
  it.each([
    ['simple, rho = 0.5', simple(0.5), simple(0)],
    ['simple, rho = -0.5', simple(-0.5), simple(0)],
    ['mirror, rho = 0.5 (load -0.5)', mirror(0.5), mirror(0)],
  ] as const)('%s', async (_name, d, uncorrelated) => {
    const want = correlatedSigma(d);
    // The correlation moves sigma by more than 5% here (so the check below has power).
    expect(Math.abs(want / correlatedSigma(uncorrelated) - 1)).toBeGreaterThan(0.05);
    const r = await simulate(d, { samples: 200_000, seed: 'rho', workers: 1, keepOffsets: false });
    // SE of a sample sigma, sigma / sqrt(2 (N - 1)) = 0.16%. The offset's departure from first
    // order is of relative size sigma(dbeta/beta)^2 ~ 3e-5 per device here (0.56% and 0.45%):
    // far below it, so 4 SE is the whole tolerance.
    const se = want / Math.sqrt(2 * (r.evaluated - 1));
    expect(Math.abs(r.offset.sigma - want)).toBeLessThan(4 * se);
  });
});

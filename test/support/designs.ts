import type { Design, ProcessParams, TopologyName } from '@twinfet/core';
import { demoProcess } from '../../packages/core/test/designs.js';
import { linearSimple } from '../../packages/montecarlo/test/designs.js';

/** The invented demo process of the core tests (not foundry data), one polarity each. */
export const demoN: ProcessParams = demoProcess.n;
export const demoP: ProcessParams = demoProcess.p;

/** The base designs the extreme cases vary one quantity of (values of examples/comparator-demo.yaml at 300 K). */
export function baseDesign(topology: TopologyName): Design {
  return {
    name: `extreme ${topology} (invented)`,
    temperature: 300,
    topology,
    tail: 10e-6,
    input: { polarity: 'n', w: 2e-6, l: 1e-6 },
    ...(topology === 'mirror' ? { load: { polarity: 'p', w: 4e-6, l: 2e-6 } } : {}),
    process: { n: demoN, p: demoP },
    spec: { offset: 10e-3, instances: 1 },
  };
}

/** A simple pair whose offset is linear in the draws: the beta term is ~1e-10 of the V_T term. */
export const linearPair: Design = linearSimple;

/**
 * A simple pair whose offset is far from Gaussian: 0.1 um x 0.2 um in strong inversion (IC 192)
 * with A_beta = 14 %*um, i.e. sigma(dbeta/beta) = 70% per device, so the log-normal current
 * factors dominate and the offset has kurtosis 4.17 (invented process values).
 * Exact sigma and kurtosis: test/fixtures/simple_pair_sigma.py ("heavy").
 */
export const heavyTailPair: Design = {
  name: 'heavy-tailed simple pair (invented)',
  temperature: 300,
  topology: 'simple',
  tail: 100e-6,
  input: { polarity: 'n', w: 0.1e-6, l: 0.2e-6 },
  process: { n: { ...demoN, abeta: 14e-8 } },
  spec: { offset: 1, instances: 1 },
};

/** The 2 um x 1 um demo n-pair at 10 uA: sigma(dbeta/beta) = 0.5% per device, offset kurtosis 3.00000002. Fixture "near_gaussian". */
export const nearGaussianPair: Design = {
  name: 'near-Gaussian simple pair (invented)',
  temperature: 300,
  topology: 'simple',
  tail: 10e-6,
  input: { polarity: 'n', w: 2e-6, l: 1e-6 },
  process: { n: demoN },
  spec: { offset: 10e-3, instances: 1 },
};

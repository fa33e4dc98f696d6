import type { Design, ProcessParams, TopologyName } from '@twinfet/core';

/** Invented demo process for the cross-package tests (not foundry data). */
export const demoN: ProcessParams = { vt0: 0.45, slope: 1.3, kp: 300e-6, avt: 5e-9, abeta: 1e-8, rho: 0 };
export const demoP: ProcessParams = { vt0: 0.5, slope: 1.35, kp: 90e-6, avt: 6.5e-9, abeta: 1.2e-8, rho: 0 };

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
export const linearPair: Design = {
  name: 'linear simple pair (invented)',
  temperature: 300,
  topology: 'simple',
  tail: 20e-6,
  input: { polarity: 'n', w: 20e-6, l: 2e-6 },
  process: { n: { ...demoN, abeta: 1e-12 } },
  spec: { offset: 2e-3, instances: 1 },
};

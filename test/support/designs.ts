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

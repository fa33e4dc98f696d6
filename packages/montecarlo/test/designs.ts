import type { Design } from '@twinfet/core';
import { demoProcess } from '../../core/test/designs.js';

/** The invented demo process of the core tests (not foundry data). */
export const testProcess = demoProcess;

/** A large simple pair: sigma(dbeta/beta) of 0.16%, so the offset is linear to well under 1%. */
export const bigSimple: Design = {
  name: 'big simple pair (invented)',
  temperature: 300,
  topology: 'simple',
  tail: 20e-6,
  input: { polarity: 'n', w: 20e-6, l: 2e-6 },
  process: testProcess,
  spec: { offset: 2e-3, instances: 1 },
};

/** A large mirror stage, same idea. */
export const bigMirror: Design = {
  name: 'big mirror stage (invented)',
  temperature: 300,
  topology: 'mirror',
  tail: 20e-6,
  input: { polarity: 'n', w: 20e-6, l: 2e-6 },
  load: { polarity: 'p', w: 10e-6, l: 4e-6 },
  process: testProcess,
  spec: { offset: 2e-3, instances: 4 },
};

/** A simple pair whose offset is the V_T difference plus a negligible beta term: linear. */
export const linearSimple: Design = {
  ...bigSimple,
  name: 'linear simple pair (invented)',
  process: { n: { ...testProcess.n, abeta: 1e-12 } },
};

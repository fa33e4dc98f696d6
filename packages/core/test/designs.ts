import type { Design } from '../src/design.js';

/** Invented demo process and designs for tests (not foundry data). */
export const demoProcess = {
  n: { vt0: 0.45, slope: 1.3, kp: 300e-6, avt: 5e-9, abeta: 1e-8, rho: 0 },
  p: { vt0: 0.5, slope: 1.35, kp: 90e-6, avt: 6.5e-9, abeta: 1.2e-8, rho: 0 },
} as const;

export const simpleDesign: Design = {
  name: 'test simple (invented)',
  temperature: 300,
  topology: 'simple',
  tail: 10e-6,
  input: { polarity: 'n', w: 2e-6, l: 1e-6 },
  process: demoProcess,
  spec: { offset: 10e-3, instances: 1 },
};

export const mirrorDesign: Design = {
  name: 'test mirror (invented)',
  temperature: 300,
  topology: 'mirror',
  tail: 10e-6,
  input: { polarity: 'n', w: 2e-6, l: 1e-6 },
  load: { polarity: 'p', w: 4e-6, l: 2e-6 },
  process: demoProcess,
  spec: { offset: 10e-3, instances: 1 },
};

/** A resistor-loaded pair (the resistor stage's tests). */
export const resistorDesign: Design = {
  name: 'test resistor pair (invented)',
  temperature: 300,
  topology: 'resistor',
  tail: 40e-6,
  input: { polarity: 'n', w: 8e-6, l: 1e-6 },
  load: { w: 1e-6, l: 5e-6, r: 20e3 },
  process: { n: demoProcess.n, resistor: { ar: 1e-8 } },
  spec: { offset: 5e-3, instances: 1 },
};

/** A two-device current mirror (the current-mirror stage's tests). */
export const currentMirrorDesign: Design = {
  name: 'test current mirror (invented)',
  temperature: 300,
  topology: 'current-mirror',
  input: { polarity: 'n', w: 4e-6, l: 4e-6, current: 10e-6 },
  output: { polarity: 'n', w: 8e-6, l: 4e-6 },
  process: { n: demoProcess.n },
  spec: { error: 5e-3, instances: 64 },
};

/** The folded-cascode check design: n pair 8/1 um, p sources 4/2 um at 20 uA, n load 4/2 um, 20 uA tail, 300 K. */
export const foldedDesign: Design = {
  name: 'test folded stage (invented)',
  temperature: 300,
  topology: 'folded',
  tail: 20e-6,
  input: { polarity: 'n', w: 8e-6, l: 1e-6 },
  sources: { polarity: 'p', w: 4e-6, l: 2e-6, current: 20e-6 },
  load: { polarity: 'n', w: 4e-6, l: 2e-6 },
  process: demoProcess,
  spec: { offset: 8e-3, instances: 1 },
};

/** A selector of `cells` cells of w x l at the tail current, separation spec 10 mV (the selector tests). */
export function selectorDesign(cells: number, tail: number, w = 4e-6, l = 4e-6, polarity: 'n' | 'p' = 'n'): Design {
  return {
    name: 'test selector (invented)',
    temperature: 300,
    topology: 'selector',
    cells,
    tail,
    input: { polarity, w, l },
    process: demoProcess,
    spec: { separation: 10e-3, instances: 1 },
  };
}

/** A copy with a few fields replaced (shallow per section). */
export function withChanges(d: Design, changes: Partial<Design>): Design {
  return { ...d, ...changes };
}

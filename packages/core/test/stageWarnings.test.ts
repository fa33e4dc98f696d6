/**
 * Each stage names the device block of a geometry warning by its own field: the resistor pair's
 * input devices as `input`, the current mirror's two devices as `input` and `output`. The rule is
 * the project's (a drawn width or length within 2x of the process minimum, no source); these
 * tests check only which field each stage's warning names, exactly. Designs are invented.
 */
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { currentMirrorDesign, demoProcess, resistorDesign } from './designs.js';

/** The demo process with drawn minima of 1 um, so that a 1.5 um device is within 2x of them. */
const process1um = { ...demoProcess.n, minW: 1e-6, minL: 1e-6 };

describe('geometry warnings name the stage field of the device', () => {
  it('resistor pair: a short input pair is named input.l', () => {
    const d: Design = { ...resistorDesign, input: { polarity: 'n', w: 8e-6, l: 1.5e-6 }, process: { ...resistorDesign.process, n: process1um } };
    const w = compileStage(d).warnings.filter((x) => x.includes('within 2x'));
    expect(w).toEqual(['input.l is within 2x of the process minimum length: the area law may underestimate mismatch of short devices']);
  });

  it('current mirror: a narrow output device is named output.w, a narrow input device input.w', () => {
    const base: Design = { ...currentMirrorDesign, output: { polarity: 'n', w: 1.5e-6, l: 4e-6 }, process: { n: process1um } };
    const out = compileStage(base).warnings.filter((x) => x.includes('within 2x'));
    expect(out).toEqual(['output.w is within 2x of the process minimum width: the area law may underestimate mismatch of narrow devices']);
    const inp = compileStage({ ...base, input: { polarity: 'n', w: 1.5e-6, l: 4e-6, current: 10e-6 }, output: { polarity: 'n', w: 8e-6, l: 4e-6 } } as Design)
      .warnings.filter((x) => x.includes('within 2x'));
    expect(inp).toEqual(['input.w is within 2x of the process minimum width: the area law may underestimate mismatch of narrow devices']);
  });
});

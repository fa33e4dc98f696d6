/**
 * The shared building blocks of the stage modules (elements.ts) where the stage tests do not
 * reach them: the resistor operating point (per-resistor sigma A_R / sqrt(2 W L), the same
 * per-element convention as Pelgrom, Duinmaijer & Welbers, IEEE JSSC 24(5), 1989, for devices),
 * the exact wording and boundaries of the small-device warnings (Drennan & McAndrew, IEEE JSSC
 * 38(3), 2003; the 2x threshold is this project's, common practice, no source), and the internal
 * guards that stand behind validateDesign. Designs are invented.
 */
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { deviceBlock, resistorBlock, resistorConstants, tailCurrent } from '../src/elements.js';
import { demoProcess, mirrorDesign, resistorDesign, simpleDesign } from './designs.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);


describe('resistor operating point (each load resistor carries I_B/2 at balance)', () => {
  it('R1 and R2: names, role, body, area W L, current, sigma(dR/R) = A_R / sqrt(2 W L), resistance (1e-12: rounding)', () => {
    const st = compileStage(resistorDesign);
    const r = st.resistors!;
    expect(r.map((x) => `${x.device}/${x.role}`)).toEqual(['R1/load', 'R2/load']);
    for (const x of r) {
      expect([x.w, x.l, x.current, x.resistance]).toEqual([1e-6, 5e-6, 20e-6, 20e3]);
      // 1 um x 5 um = 5 um^2.
      expect(rel(x.area, 5e-12)).toBeLessThan(1e-12);
      // 1 %um / sqrt(2 * 5 um^2) = 0.3162 %.
      expect(rel(x.sigmaR, 1e-8 / Math.sqrt(10e-12))).toBeLessThan(1e-12);
    }
  });
  it('without `r` no resistance is reported (the gain needs it)', () => {
    const st = compileStage({ ...resistorDesign, load: { w: 1e-6, l: 5e-6 } });
    for (const x of st.resistors!) {
      expect(x.resistance).toBeUndefined();
      expect('resistance' in x).toBe(false);
      expect(rel(x.area, 5e-12)).toBeLessThan(1e-12);
    }
  });
});

describe('small-device warnings: wording and the boundary at the minimum itself', () => {
  const withMin = (minW: number | undefined, minL: number | undefined): Design => ({
    ...simpleDesign,
    process: { n: { ...demoProcess.n, ...(minW === undefined ? {} : { minW }), ...(minL === undefined ? {} : { minL }) } },
  });
  it('within 2x: the whole sentence, naming the field and what kind of device (narrow, short)', () => {
    // Input 2 um x 1 um against minima 1.5 um and 0.75 um: both within 2x, neither below.
    expect(compileStage(withMin(1.5e-6, 0.75e-6)).warnings).toEqual([
      'input.w is within 2x of the process minimum width: the area law may underestimate mismatch of narrow devices',
      'input.l is within 2x of the process minimum length: the area law may underestimate mismatch of short devices',
    ]);
  });
  it('exactly at the minimum is drawable, so it is "within 2x", not "below"', () => {
    // W = min_w = 2 um (the same double on both sides): not below the minimum.
    expect(compileStage(withMin(2e-6, undefined)).warnings).toEqual([
      'input.w is within 2x of the process minimum width: the area law may underestimate mismatch of narrow devices',
    ]);
  });
  it('below the minimum length: both values in um and the process field', () => {
    expect(compileStage(withMin(undefined, 1.2e-6)).warnings).toEqual([
      "input.l = 1 um is below the process's smallest drawn length process.n.min_l = 1.2 um: such a device cannot be drawn, and the area law does not hold for it",
    ]);
  });
});

describe('internal guards behind validateDesign (a design that skipped validation)', () => {
  it('a missing or null block is an internal error naming the block', () => {
    const noLoad = { ...mirrorDesign, load: undefined } as unknown as Design;
    const nullLoad = { ...mirrorDesign, load: null } as unknown as Design;
    const numberLoad = { ...mirrorDesign, load: 3 } as unknown as Design;
    for (const d of [noLoad, nullLoad, numberLoad]) {
      expect(() => deviceBlock(d, 'load')).toThrow(/^internal: block load missing after validation$/);
      expect(() => resistorBlock(d, 'load')).toThrow(/^internal: block load missing after validation$/);
    }
    expect(deviceBlock(mirrorDesign, 'input')).toBe(mirrorDesign.input);
    expect(resistorBlock(resistorDesign, 'load')).toBe(resistorDesign['load']);
  });
  it('a missing tail current or resistor process is an internal error naming it', () => {
    const noTail = { ...simpleDesign, tail: undefined } as unknown as Design;
    expect(() => tailCurrent(noTail)).toThrow(/^internal: tail missing after validation$/);
    expect(tailCurrent(simpleDesign)).toBe(10e-6);
    const noResistorProcess: Design = { ...resistorDesign, process: { n: demoProcess.n } };
    expect(() => resistorConstants(noResistorProcess, resistorBlock(resistorDesign, 'load'))).toThrow(
      /^internal: process\.resistor missing after validation$/,
    );
  });
});

/**
 * Validation at the library's edge: compileStage refuses exactly what the design-file reader
 * refuses, with the same field, and fills the same defaults. Designs are invented.
 */
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { InputError } from '../src/errors.js';
import { parseDesign } from '../src/parse/parseDesign.js';
import { writeDesign } from '../src/parse/writeDesign.js';
import { STAGES } from '../src/stages/registry.js';
import { demoProcess, mirrorDesign, simpleDesign } from './designs.js';

/** The field an InputError names, or 'no error'. */
function fieldOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    if (e instanceof InputError) return e.field;
    throw e;
  }
  return 'no error';
}

/**
 * The same design through compileStage and through the reader: as JSON text, whose bare numbers
 * the reader takes as SI units (temperature in kelvin), so the text says exactly what the object does.
 */
function bothRoutes(d: Design): [string, string] {
  return [fieldOf(() => compileStage(d)), fieldOf(() => parseDesign(JSON.stringify(d), { source: 'edge.json' }))];
}

describe('compileStage refuses what the reader refuses, naming the same field', () => {
  it.each<[string, Design, string]>([
    ['a mirror load of the input polarity', { ...mirrorDesign, load: { polarity: 'n', w: 4e-6, l: 2e-6 } }, 'load.polarity'],
    ['a negative p-device vt0 (values are magnitudes)', { ...mirrorDesign, process: { ...demoProcess, p: { ...demoProcess.p, vt0: -0.5 } } }, 'process.p.vt0'],
    ['a load on a simple stage', { ...simpleDesign, load: { polarity: 'p', w: 4e-6, l: 2e-6 } }, 'load'],
    ['a slope factor below 1', { ...simpleDesign, process: { n: { ...demoProcess.n, slope: 0.9 } } }, 'process.n.slope'],
    ['a fractional instance count', { ...simpleDesign, spec: { offset: 0.01, instances: 2.5 } }, 'spec.instances'],
    ['a missing process entry for the load polarity', { ...mirrorDesign, process: { n: demoProcess.n } }, 'process.p'],
  ])('%s', (_what, d, field) => {
    const [lib, reader] = bothRoutes(d);
    expect(lib).toBe(field);
    // The reader may stop earlier on the same problem (a missing key), never at another field.
    expect(reader).toBe(field);
  });

  it('a misspelt spec key is refused with a did-you-mean, by the library as by the reader', () => {
    expect(() => compileStage({ ...simpleDesign, spec: { ofset: 0.01, instances: 1 } })).toThrow(/^spec\.ofset: unknown key; did you mean "offset"\?/);
  });

  it('a design written by writeDesign reads back to the same design (round trip through the registry)', () => {
    for (const d of [simpleDesign, mirrorDesign]) expect(parseDesign(writeDesign(d), { source: 'rt.yaml' })).toEqual({ ...d, name: d.name });
  });
});

describe('defaults are the library\'s', () => {
  it('rho may be left out of a design object (0), as in a design file', () => {
    const { rho: _r, ...n } = demoProcess.n;
    const st = compileStage({ ...simpleDesign, process: { n } });
    expect(st.design.process.n!.rho).toBe(0);
    expect(st.variables.every((v) => v.rho === 0)).toBe(true);
  });

  it('a design that needs no default is returned as given (not copied)', () => {
    expect(compileStage(simpleDesign).design).toBe(simpleDesign);
  });
});

describe('the registry', () => {
  it('lists each topology once, each with the input block first and an offset-like figure description', () => {
    const names = STAGES.map((s) => s.topology);
    expect(new Set(names).size).toBe(names.length);
    for (const s of STAGES) {
      expect(s.blocks[0]!.key).toBe('input');
      expect(['two', 'one']).toContain(s.figure.sided);
    }
  });
});

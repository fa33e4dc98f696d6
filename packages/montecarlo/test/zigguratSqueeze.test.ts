/**
 * The ziggurat's wedge squeeze (wedgeSqueeze in ziggurat.ts) against the comparison it stands in
 * for, y < e^{-x^2/2} as the generator computes it (Math.exp): wherever the squeeze gives a
 * verdict it must be that comparison's, or the generator's deviates would change. The layer edges
 * are rebuilt here from the published recursion (Marsaglia & Tsang, "The Ziggurat Method for
 * Generating Random Variables", J. Stat. Software 5(8), 2000, zigset with 128 layers), not read
 * from the module under test.
 */
import { describe, expect, it } from 'vitest';
import { chunkRng } from '../src/random/stream.js';
import { fillStandardNormals, takeWedgeExpCalls, wedgeSqueeze } from '../src/random/ziggurat.js';

const R = 3.442619855899;
const V = 9.91256303526217e-3;
const M1 = 2147483648;
const KN = new Float64Array(128);
const WN = new Float64Array(128);
const FN = new Float64Array(128);
{
  let dn = R;
  let tn = dn;
  const q = V / Math.exp(-0.5 * dn * dn);
  KN[0] = Math.floor((dn / q) * M1);
  KN[1] = 0;
  WN[0] = q / M1;
  WN[127] = dn / M1;
  FN[0] = 1;
  FN[127] = Math.exp(-0.5 * dn * dn);
  for (let i = 126; i >= 1; i--) {
    dn = Math.sqrt(-2 * Math.log(V / dn + Math.exp(-0.5 * dn * dn)));
    KN[i + 1] = Math.floor((dn / tn) * M1);
    tn = dn;
    FN[i] = Math.exp(-0.5 * dn * dn);
    WN[i] = dn / M1;
  }
}
/** Layer i's outer edge x_i and inner edge x_{i-1} (x_0 = 0). */
const outer = (i: number): number => WN[i]! * M1;
const inner = (i: number): number => (i === 1 ? 0 : WN[i - 1]! * M1);
const exact = (x: number, y: number): boolean => y < Math.exp(-0.5 * x * x);

describe('ziggurat wedge squeeze: the exp comparison\'s verdict wherever it gives one', () => {
  it('on a grid of every layer, and at points within 1e-15..1e-9 of the curve', () => {
    let verdicts = 0;
    let checked = 0;
    const wrong: string[] = [];
    for (let i = 1; i < 128; i++) {
      const a = inner(i);
      const b = outer(i);
      // x over the layer's wedge, both signs: from the inner edge to the outer one, and a few
      // points just inside the inner edge (the rectangle test's floor lets |x| fall up to
      // x_i / 2^31 short of it). y over the layer's own range [FN[i], FN[i-1]] (the only values
      // the generator forms), and at points within 1e-15..1e-9 of the curve.
      const xs: number[] = [];
      for (let p = 0; p <= 200; p++) xs.push(a + ((b - a) * p) / 200);
      for (let k = 1; k <= 4; k++) xs.push(a - (k * b) / M1);
      for (const x0 of xs) {
        for (const x of [x0, -x0]) {
          const f = Math.exp(-0.5 * x * x);
          const ys: number[] = [];
          for (let q = 0; q <= 40; q++) ys.push(FN[i]! + ((FN[i - 1]! - FN[i]!) * q) / 40);
          for (const e of [1e-9, 1e-11, 1e-12, 1e-13, 1e-14, 1e-15, 0]) ys.push(f * (1 + e), f * (1 - e));
          for (const y of ys) {
            if (!(y >= FN[i]! && y <= FN[i - 1]!)) continue;
            const v = wedgeSqueeze(i, x, y);
            checked++;
            if (v !== 0) {
              verdicts++;
              if (v > 0 !== exact(x, y)) wrong.push(`layer ${i}, x ${x}, y ${y}: verdict ${v}`);
            }
          }
        }
      }
    }
    expect(wrong).toEqual([]);
    // The grid is mostly away from the curve, so most points get a verdict (seen: 73.7% of
    // 2846866); a squeeze that never decided would fail here.
    expect(checked).toBeGreaterThan(127 * 205 * 2 * 41);
    expect(verdicts / checked).toBeGreaterThan(0.7);
  });

  it('never gives a verdict on the layer that holds x = 1 (neither concave nor convex there)', () => {
    const mixed = Array.from({ length: 127 }, (_, k) => k + 1).filter((i) => inner(i) < 1 && outer(i) > 1);
    expect(mixed.length).toBe(1);
    const i = mixed[0]!;
    for (let p = 0; p <= 100; p++) {
      const x = inner(i) + ((outer(i) - inner(i)) * p) / 100;
      for (let q = 0; q <= 10; q++) expect(wedgeSqueeze(i, x, FN[i]! + ((FN[i - 1]! - FN[i]!) * q) / 10)).toBe(0);
    }
  });

  it('decides 91.6% of the wedge tests of real draws without the exp call, and each as the exp comparison does', () => {
    // The generator's own rare-path inputs: a 32-bit word outside its layer's rectangle, then a
    // 53-bit uniform for y. Over 2e7 words, 539426 wedge tests; the squeeze's share is a property
    // of the tables (its sampling error here is about 0.04%), so a squeeze whose margins or
    // lines went wrong (every test left to exp) fails the 0.9 floor.
    const rng = chunkRng('squeeze', 'coverage', 0);
    let tests = 0;
    let decided = 0;
    for (let k = 0; k < 2e7; k++) {
      const hz = rng.int32();
      const iz = hz & 127;
      if (iz === 0 || Math.abs(hz) < KN[iz]!) continue;
      const x = hz * WN[iz]!;
      const y = FN[iz]! + rng.double() * (FN[iz - 1]! - FN[iz]!);
      tests++;
      const v = wedgeSqueeze(iz, x, y);
      if (v !== 0) {
        decided++;
        if (v > 0 !== exact(x, y)) expect.unreachable(`layer ${iz}, x ${x}, y ${y}: verdict ${v}`);
      }
    }
    expect(tests).toBeGreaterThan(5e5);
    expect(decided / tests).toBeGreaterThan(0.9);
  });

  it('leaves 9713 exp calls to 2^22 deviates of a fixed stream (budget 9900)', () => {
    // The squeeze's work, counted: a fixed seed gives a fixed count (9713 measured), so the
    // budget, 1.9% above, only leaves room for a change of the same cost. A weaker bound (one
    // tangent instead of the better of two, on either side) needs 10063-18950 calls, and the
    // exp comparison alone about 110000: they fail here although every deviate stays the same.
    const out = new Float64Array(1 << 22);
    takeWedgeExpCalls();
    fillStandardNormals(chunkRng('wedge', 'coverage', 0), out, 0, out.length);
    const calls = takeWedgeExpCalls();
    expect(calls).toBeGreaterThan(0);
    expect(calls).toBeLessThanOrEqual(9900);
  });
});

/**
 * The ziggurat deviate for deviate against an independent transcription of Marsaglia & Tsang's
 * published algorithm ("The Ziggurat Method for Generating Random Variables", J. Stat. Software
 * 5(8), 2000: zigset's 128-layer tables, RNOR, nfix and the base-strip tail method), fed by the
 * same xorwow stream: test/fixtures/ziggurat_reference.py, which wrote
 * test/fixtures/ziggurat-reference.json. The statistical tests (ziggurat.test.ts) show the
 * deviates are normal; this one shows they are the method's deviates, rejection step for
 * rejection step (a changed table entry, wedge test or tail acceptance moves a value or shifts
 * the stream).
 *
 * Tolerance 1e-12 relative on each deviate: the tables are built by 127 steps of exp, log and
 * sqrt, and Python's libm and V8's may differ in the last bit of each call (a few 1e-16 per step,
 * accumulated over the recursion: well below 1e-13). Which branch each draw takes (the count of
 * slow-path and tail draws, the indices beyond 3 sigma, the generator's next output) is exact.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ChunkRng } from '../src/random/stream.js';
import { fillStandardNormals, normalTail, standardNormal, ZIGGURAT_EDGE } from '../src/random/ziggurat.js';

interface Reference {
  state: { x: number; y: number; z: number; w: number; v: number; d: number };
  n: number;
  first: number[];
  far: [number, number][];
  sum: number;
  sumSquares: number;
  tails: number[];
  nextInt32: number;
}
const ref = JSON.parse(readFileSync(new URL('../../../test/fixtures/ziggurat-reference.json', import.meta.url), 'utf8')) as Reference;
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

function checkStream(xs: Float64Array, rng: ChunkRng): void {
  for (let i = 0; i < ref.first.length; i++) expect(rel(xs[i]!, ref.first[i]!), `deviate ${i}`).toBeLessThan(1e-12);
  const far: number[] = [];
  for (let i = 0; i < xs.length; i++) if (Math.abs(xs[i]!) > 3) far.push(i);
  expect(far).toEqual(ref.far.map(([i]) => i));
  for (const [i, x] of ref.far) expect(rel(xs[i]!, x), `deviate ${i}`).toBeLessThan(1e-12);
  let s = 0;
  let s2 = 0;
  for (const x of xs) {
    s += x;
    s2 += x * x;
  }
  // Each term agrees to 1e-12 relative (|x| < 6): the sums to 1e-12 * n * 6 < 1e-6; plain
  // summation adds n * 2^-53 * max partial sum (< 1e-8).
  expect(Math.abs(s - ref.sum)).toBeLessThan(1e-6);
  expect(Math.abs(s2 - ref.sumSquares)).toBeLessThan(1e-6);
  // The stream is where the reference left it: the same number of draws was consumed.
  expect(rng.int32()).toBe(ref.nextInt32);
}

describe('ziggurat against the published algorithm (Marsaglia & Tsang 2000), test/fixtures/ziggurat_reference.py', () => {
  it(`standardNormal: ${ref.n} deviates from a fixed xorwow state (1e-12 relative each; branches exact)`, () => {
    const rng = new ChunkRng(ref.state);
    const xs = new Float64Array(ref.n);
    for (let i = 0; i < ref.n; i++) xs[i] = standardNormal(rng);
    checkStream(xs, rng);
  });
  it('fillStandardNormals: the same deviates (in two calls, the second starting mid-array)', () => {
    const rng = new ChunkRng(ref.state);
    const xs = new Float64Array(ref.n);
    fillStandardNormals(rng, xs, 0, 1000);
    fillStandardNormals(rng, xs, 1000, ref.n);
    checkStream(xs, rng);
  });
  it('fillStandardNormals: the same deviates in calls of 1 to 7 draws (odd ends, and the rare path at either draw of a two-draw pass)', () => {
    const rng = new ChunkRng(ref.state);
    const xs = new Float64Array(ref.n);
    for (let i = 0, len = 1; i < ref.n; i += len, len = (len % 7) + 1) fillStandardNormals(rng, xs, i, Math.min(ref.n, i + len));
    checkStream(xs, rng);
  });
  it('normalTail: the first 32 tail draws from the same state (1e-12 relative), all beyond the edge r', () => {
    const rng = new ChunkRng(ref.state);
    for (const t of ref.tails) {
      const x = normalTail(rng);
      expect(x).toBeGreaterThan(ZIGGURAT_EDGE);
      expect(rel(x, t)).toBeLessThan(1e-12);
    }
    // Marsaglia & Tsang's r for 128 layers.
    expect(ZIGGURAT_EDGE).toBe(3.442619855899);
  });
});

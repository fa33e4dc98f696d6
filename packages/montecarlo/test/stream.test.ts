import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { ChunkRng, chunkRng } from '../src/random/stream.js';
import { fillStandardNormals, standardNormal } from '../src/random/ziggurat.js';

// Reference: seedrandom 3.0.5's xorwow (Marsaglia 2003), which the chunk streams used before
// the generator was written out for speed. The streams must be the same, bit for bit
// (tolerance zero: a different bit would change every seeded result).
describe('ChunkRng is seedrandom\'s xorwow', () => {
  const states = [
    { x: 1, y: 2, z: 3, w: 4, v: 5, d: 6 },
    { x: -1, y: 0, z: 0, w: 0, v: 0, d: 0 },
    { x: 0x7fffffff, y: -0x80000000, z: 0x12345678, w: -0x2468ace0, v: 0x0f0f0f0f, d: -362437 },
  ];

  it('int32 and double, interleaved, over 100000 steps from several states', () => {
    for (const state of states) {
      const ours = new ChunkRng(state);
      const theirs = seedrandom.xorwow('', { state: { ...state } });
      for (let i = 0; i < 100_000; i++) {
        const a = i % 3 === 2 ? ours.double() : ours.int32();
        const b = i % 3 === 2 ? theirs.double() : theirs.int32();
        if (a !== b) throw new Error(`step ${i} from ${JSON.stringify(state)}: ${a} vs seedrandom ${b}`);
      }
    }
  });

  it('the chunk streams: 32 outputs dropped from the hashed state, as before', () => {
    const rng = chunkRng('7', 'montecarlo', 3);
    const copy = new ChunkRng(rng);
    const theirs = seedrandom.xorwow('', { state: { x: copy.x, y: copy.y, z: copy.z, w: copy.w, v: copy.v, d: copy.d } });
    for (let i = 0; i < 1000; i++) expect(rng.int32()).toBe(theirs.int32());
  });
});

describe('fillStandardNormals', () => {
  it('gives exactly the numbers of repeated standardNormal calls, slow path included, and leaves the same state', () => {
    // 200000 draws take the slow path (2.8% of draws, counted) about 5500 times, the base strip's tail about 115 times (2 Phi(-3.4426) n).
    const n = 200_000;
    const a = new Float64Array(n);
    const ra = chunkRng('fill', 'coverage', 5);
    const rb = chunkRng('fill', 'coverage', 5);
    fillStandardNormals(ra, a, 0, n);
    let beyond = 0;
    for (let i = 0; i < n; i++) {
      const b = standardNormal(rb);
      if (!Object.is(a[i], b)) throw new Error(`draw ${i}: ${a[i]} vs ${b}`);
      if (Math.abs(b) > 3.442619855899) beyond++;
    }
    expect(beyond).toBeGreaterThan(0);
    expect(ra.int32()).toBe(rb.int32());
  });

  it('fills only out[start..end)', () => {
    const out = new Float64Array(10).fill(7);
    fillStandardNormals(chunkRng('x', 'coverage', 0), out, 3, 6);
    expect([out[2], out[6]]).toEqual([7, 7]);
    expect([3, 4, 5].every((i) => out[i] !== 7)).toBe(true);
  });
});

import seedrandom from 'seedrandom';

/** The generator every chunk uses: seedrandom's xorwow (Marsaglia, J. Stat. Software 8(14), 2003). */
export type ChunkRng = seedrandom.PRNG;

/** Independent purposes draw from disjoint stream families. */
export type StreamKind = 'montecarlo' | 'importance' | 'coverage' | 'response';

const STREAM_TAG: Record<StreamKind, number> = { montecarlo: 0x6d6f6e74, importance: 0x696d7073, coverage: 0x636f7665, response: 0x72657370 };

/** 32-bit finaliser of MurmurHash3 (Appleby): a bijection with full avalanche. */
function fmix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h | 0;
}

/** FNV-1a over the UTF-16 code units of a string, then finalised. */
function hashString(s: string, basis: number): number {
  let h = basis | 0;
  for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 0x01000193);
  return fmix32(h);
}

/**
 * The generator of chunk `chunk` of a run seeded with `seed`: a pure function of
 * (seed, kind, chunk), so a run's numbers never depend on how many workers ran it or in which
 * order chunks finished. The xorwow state words are filled from a hash of the three (never all
 * zero: the Weyl counter d keeps the sequence from sticking anyway), then 32 outputs are dropped.
 */
export function chunkRng(seed: string, kind: StreamKind, chunk: number): ChunkRng {
  if (!Number.isSafeInteger(chunk) || chunk < 0) throw new RangeError(`chunk must be a whole number >= 0, got ${chunk}`);
  const lo = chunk % 0x100000000;
  const hi = Math.floor(chunk / 0x100000000);
  const a = hashString(seed, 0x811c9dc5);
  const b = hashString(seed, 0x2b992ddf);
  const words: number[] = [];
  for (let i = 0; i < 6; i++) {
    words.push(fmix32(a ^ fmix32(b + Math.imul(i + 1, 0x9e3779b9)) ^ fmix32(lo ^ STREAM_TAG[kind]) ^ fmix32(hi + i)));
  }
  if ((words[0]! | words[1]! | words[2]! | words[3]! | words[4]!) === 0) words[0] = 0x1234567;
  const state = { x: words[0]!, y: words[1]!, z: words[2]!, w: words[3]!, v: words[4]!, d: words[5]! };
  const rng = seedrandom.xorwow('', { state }) as ChunkRng;
  for (let i = 0; i < 32; i++) rng.int32();
  return rng;
}

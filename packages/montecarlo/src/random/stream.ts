/**
 * The generator every chunk uses: xorwow (G. Marsaglia, "Xorshift RNGs", J. Stat. Software
 * 8(14), 2003), step for step seedrandom's `xorwow` (its int32 and double; a test checks the
 * two streams are identical). It is written out here so that the ziggurat's loop can keep the
 * state in local variables (seedrandom's generator reaches its state through a closure call
 * per draw, which made the draws about 40% slower). The state is public for that loop alone.
 */
export class ChunkRng {
  x: number;
  y: number;
  z: number;
  w: number;
  v: number;
  d: number;

  constructor(state: { readonly x: number; readonly y: number; readonly z: number; readonly w: number; readonly v: number; readonly d: number }) {
    this.x = state.x | 0;
    this.y = state.y | 0;
    this.z = state.z | 0;
    this.w = state.w | 0;
    this.v = state.v | 0;
    this.d = state.d | 0;
  }

  /** The next 32 random bits, as a signed integer. */
  int32(): number {
    const x = this.x | 0;
    const t = x ^ (x >>> 2);
    this.x = this.y;
    this.y = this.z;
    this.z = this.w;
    const v0 = this.v | 0;
    this.w = v0;
    const v = v0 ^ (v0 << 4) ^ (t ^ (t << 1));
    this.v = v;
    const d = ((this.d | 0) + 362437) | 0;
    this.d = d;
    return (d + v) | 0;
  }

  /** A uniform on (0, 1) with 53 random bits (two steps; 0 is redrawn). */
  double(): number {
    for (;;) {
      const top = this.int32() >>> 11;
      const bot = (this.int32() >>> 0) / 0x100000000;
      const result = (top + bot) / (1 << 21);
      if (result !== 0) return result;
    }
  }
}

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
  const rng = new ChunkRng({ x: words[0]!, y: words[1]!, z: words[2]!, w: words[3]!, v: words[4]!, d: words[5]! });
  for (let i = 0; i < 32; i++) rng.int32();
  return rng;
}

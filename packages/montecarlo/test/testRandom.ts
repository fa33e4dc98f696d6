/**
 * Test-only helpers shared by the statistics tests. The generator is deliberately NOT the
 * library's own (seedrandom + ziggurat): the statistics are checked on independent numbers.
 */

/** mulberry32 (a public-domain 32-bit generator), fixed seed: uniforms on [0, 1). */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** |actual - expected| / |expected|. */
export function relErr(actual: number, expected: number): number {
  return Math.abs(actual - expected) / Math.abs(expected);
}

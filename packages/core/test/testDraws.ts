/**
 * Deterministic standard-normal draws for per-sample checks: a seeded 32-bit generator
 * (mulberry32, common practice, no source) through Box-Muller (Box & Muller, Ann. Math.
 * Statist. 29(2), 1958). Deliberately not the library's own generator.
 */
export function draws(dim: number, count: number, seed: number): Float64Array[] {
  let a = seed >>> 0;
  const uniform = (): number => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (((t ^ (t >>> 14)) >>> 0) + 0.5) / 4294967296;
  };
  const normal = (): number => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
  return Array.from({ length: count }, () => Float64Array.from({ length: dim }, normal));
}

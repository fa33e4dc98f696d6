import jStat from 'jstat';
import { beforeAll, describe, expect, it } from 'vitest';
import { ksAsymptoticPValue, ksStatistic } from '../src/stats/ks.js';
import { normalUpperTail, twoSidedTail } from '../src/stats/normal.js';
import { chunkRng } from '../src/random/stream.js';
import { fillStandardNormals, normalTail, standardNormal, ZIGGURAT_EDGE } from '../src/random/ziggurat.js';

describe('standard-normal generator (ziggurat, Marsaglia & Tsang 2000)', () => {
  const n = 200_000;
  const sample = new Float64Array(n);
  fillStandardNormals(chunkRng('ks-test', 'coverage', 0), sample, 0, n);

  it('passes a Kolmogorov-Smirnov test against jStat\'s normal CDF (seeded; p > 0.01)', () => {
    // KS statistic against jStat.normal.cdf (an independent implementation of Phi).
    const d = ksStatistic(sample, (x) => jStat.normal.cdf(x, 0, 1));
    // Seeded, so repeatable; a correct generator gives p uniform on (0, 1): p > 0.01 fails
    // a correct generator 1% of the time over seeds, never for this fixed seed.
    expect(ksAsymptoticPValue(d, n)).toBeGreaterThan(0.01);
    // And the statistic itself: the 99% point of sqrt(n) D is 1.628 (Kolmogorov distribution).
    expect(Math.sqrt(n) * d).toBeLessThan(1.628);
  });

  it('mean 0 and variance 1 within 4 standard errors (common practice, no source)', () => {
    let m = 0;
    let v = 0;
    for (const x of sample) m += x;
    m /= n;
    for (const x of sample) v += (x - m) ** 2;
    v /= n - 1;
    expect(Math.abs(m)).toBeLessThan(4 / Math.sqrt(n));
    // SE of the sample variance of a normal sample: sqrt(2/(n-1)).
    expect(Math.abs(v - 1)).toBeLessThan(4 * Math.sqrt(2 / (n - 1)));
  });

  it('tail beyond 3.5 sigma at the Gaussian rate within 4 binomial standard errors (A&S 26)', () => {
    const big = 2_000_000;
    const rng = chunkRng('tail', 'coverage', 1);
    let hits = 0;
    for (let i = 0; i < big; i++) if (Math.abs(standardNormal(rng)) > 3.5) hits++;
    const p = twoSidedTail(3.5);
    expect(Math.abs(hits - big * p)).toBeLessThan(4 * Math.sqrt(big * p * (1 - p)));
  });

  it('is a pure function of (seed, kind, chunk): same stream, same bytes; different chunks differ', () => {
    const a = new Float64Array(1000);
    const b = new Float64Array(1000);
    fillStandardNormals(chunkRng('7', 'montecarlo', 3), a, 0, 1000);
    fillStandardNormals(chunkRng('7', 'montecarlo', 3), b, 0, 1000);
    expect(Buffer.from(a.buffer).equals(Buffer.from(b.buffer))).toBe(true);
    fillStandardNormals(chunkRng('7', 'montecarlo', 4), b, 0, 1000);
    expect(a.some((x, i) => x !== b[i])).toBe(true);
    fillStandardNormals(chunkRng('7', 'importance', 3), b, 0, 1000);
    expect(a.some((x, i) => x !== b[i])).toBe(true);
  });

  it('neighbouring chunk streams are uncorrelated (|r| < 4/sqrt(n), common practice, no source)', () => {
    const m = 100_000;
    const a = new Float64Array(m);
    const b = new Float64Array(m);
    fillStandardNormals(chunkRng('1', 'montecarlo', 0), a, 0, m);
    fillStandardNormals(chunkRng('1', 'montecarlo', 1), b, 0, m);
    let r = 0;
    for (let i = 0; i < m; i++) r += a[i]! * b[i]!;
    expect(Math.abs(r / m)).toBeLessThan(4 / Math.sqrt(m));
  });

  it('never sticks: an empty seed still gives a varying stream (a zero xor-shift state repeats 0 forever, Marsaglia 2003)', () => {
    const rng = chunkRng('', 'montecarlo', 0);
    const seen = new Set<number>();
    for (let i = 0; i < 100; i++) seen.add(rng.int32());
    expect(seen.size).toBe(100);
  });
});

describe('the tail beyond the base strip (Marsaglia & Tsang 2000, the tail method)', () => {
  // Beyond the base strip's edge r = 3.4426 every deviate comes from the tail sampler, so its
  // conditional law must be the normal tail: P(|Z| > x | |Z| > r) = Phi(-x) / Phi(-r), with
  // Phi(-x) = erfc(x / sqrt 2) / 2 (Abramowitz & Stegun 1964, 7.1.2 and 26.2.29).
  it('100000 tail draws follow the exact conditional normal tail (Kolmogorov-Smirnov, p > 0.01)', () => {
    const n = 100_000;
    const rng = chunkRng('tail-sampler', 'coverage', 0);
    const draws = new Float64Array(n);
    for (let i = 0; i < n; i++) draws[i] = normalTail(rng);
    // Exact: the sampler returns r + x with x > 0 (x = -ln(U)/r, U in (0, 1)).
    expect(draws.every((x) => x > ZIGGURAT_EDGE)).toBe(true);
    const qr = normalUpperTail(ZIGGURAT_EDGE);
    const d = ksStatistic(draws, (x) => 1 - normalUpperTail(x) / qr);
    // Kolmogorov's limit law (1933): P(sqrt(n) D > 1.628) = 0.01, n = 1e5 well in the
    // asymptotic regime. Seeded: a correct sampler fails this for 1% of seeds, never this one;
    // the acceptance y < x^2 in place of 2y < x^2 (density e^{-r t - t^2} instead of
    // e^{-r t - t^2/2}) gives sqrt(n) D = 9.8 (test/fixtures/ziggurat_tail_power.py).
    expect(Math.sqrt(n) * d).toBeLessThan(1.628);
    expect(ksAsymptoticPValue(d, n)).toBeGreaterThan(0.01);
  });

});

describe('the fraction of deviates beyond 4 and 5 sigma (the whole generator)', () => {
  // 2^27 deviates from one stream through the sampling loop the chunks use, counted once.
  // Expected N 2 Phi(-k) = 8501.7 at 4 sigma and 76.9 at 5 sigma (A&S 26.2, via erfc), with
  // binomial standard errors 92.2 (1.1%) and 8.8. The weakened tail acceptance y < x^2 (in place
  // of 2y < x^2) gives 6584 and 18.3 on average: 20.8 and 6.7 standard errors off. With 2^26
  // deviates the 5-sigma count would be off by only 4.7 standard errors, and that mutant would
  // pass for about 8% of seeds (all computed by test/fixtures/ziggurat_tail_power.py).
  // Under mutation testing (MUTATE_TESTS set, vitest.mutate.config.ts) the instrumented
  // generator is tens of times slower, so the count runs on 2^22 deviates there (the bounds
  // follow from N); the weakened acceptance is then also caught by the tail KS test above.
  const total = process.env['MUTATE_TESTS'] === undefined ? 2 ** 27 : 2 ** 22;
  const beyond = { 4: 0, 5: 0 };
  beforeAll(() => {
    const block = 1 << 20;
    const buf = new Float64Array(block);
    const rng = chunkRng('tail-fraction', 'coverage', 0);
    for (let done = 0; done < total; done += block) {
      fillStandardNormals(rng, buf, 0, block);
      for (let i = 0; i < block; i++) {
        const a = Math.abs(buf[i]!);
        if (a > 4) {
          beyond[4]++;
          if (a > 5) beyond[5]++;
        }
      }
    }
  });
  it.each([4, 5] as const)('of 2^27 deviates, the count beyond %i sigma is 2 Phi(-k) N within 4 binomial standard errors', (k) => {
    const p = twoSidedTail(k);
    const se = Math.sqrt(total * p * (1 - p));
    expect(Math.abs(beyond[k] - total * p), `beyond ${k} sigma: ${beyond[k]} of ${total}`).toBeLessThan(4 * se);
  });
});

/**
 * Statistical honesty: do the reported intervals cover the truth as often as they claim, is the
 * normal generator normal, and does the high-sigma estimate match the Gaussian closed form?
 *
 * Every run is seeded, so every count below is fixed and the file is repeatable. The truth comes
 * from a design whose offset is exactly linear in the draws (the beta term is ~1e-10 of the V_T
 * term), so the offset is Gaussian with the linearised sigma, and P(|Vos| > k sigma) = 2 Phi(-k)
 * (a Gaussian offset: Abramowitz & Stegun 1964, 26.2). For the sigma interval on non-Gaussian
 * offsets the truth is the Gauss-Hermite quadrature of the simple pair's closed form
 * (test/fixtures/simple_pair_sigma.py).
 *
 * Coverage thresholds: with R repeats a coverage estimate has standard error
 * sqrt(0.95 * 0.05 / R) = 0.69% at R = 1000, so 93% is 2.9 standard errors below the nominal 95%.
 */
import { createRequire } from 'node:module';
import { compileStage, linearisedSigma, type Design } from '@twinfet/core';
import {
  chunkRng,
  createExecutor,
  estimateHighSigma,
  fillStandardNormals,
  normalCdf,
  simulate,
  twoSidedTail,
} from '@twinfet/montecarlo';
// The KS test is a test helper of the montecarlo package, not public API.
import { ksAsymptoticPValue, ksStatistic } from '../packages/montecarlo/src/stats/ks.js';
import { afterAll, describe, expect, it } from 'vitest';
import { heavyTailPair, linearPair, nearGaussianPair } from './support/designs.js';

/** jStat 1.9.6, resolved from the package that depends on it (the workspace root does not). */
const jStat = createRequire(new URL('../packages/montecarlo/package.json', import.meta.url))('jstat') as {
  normal: { cdf(x: number, mean: number, sd: number): number };
};

const REPEATS = 1000;
const NOMINAL = 0.95;
/** 2.9 standard errors of a coverage estimate below the nominal level at R = 1000 (see above). */
const FLOOR = 0.93;

const sigma = linearisedSigma(compileStage(linearPair));
const at = (k: number): Design => ({ ...linearPair, spec: { offset: k * sigma, instances: 1 } });
const executor = createExecutor(1);
afterAll(() => executor.close());

/** Coverage results, printed once so a reader sees the measured values, not only the pass. */
const measured: Record<string, number> = {};
afterAll(() => {
  console.log(`honesty: measured coverage ${JSON.stringify(measured)}`);
});

describe('coverage of the 95% yield interval (1000 seeded runs of 1000 samples each)', () => {
  it.each([
    ['p = 2 Phi(-1.6) = 0.110', 1.6],
    ['p = 2 Phi(-2.8) = 0.0051', 2.8],
  ] as const)('%s: Clopper-Pearson >= 93%; Wilson measured and reported', async (label, k) => {
    const design = at(k);
    const truthYield = 1 - twoSidedTail(k); // A&S 26.2 via erfc, exact for the linear design
    let cp = 0;
    let wi = 0;
    for (let r = 0; r < REPEATS; r++) {
      const seed = `yield-${k}-${r}`;
      const a = await simulate(design, { samples: 1000, seed, executor, keepOffsets: false });
      const b = await simulate(design, { samples: 1000, seed, executor, keepOffsets: false, interval: 'wilson' });
      // Same seed, same draws: the two runs see the same failures (exact).
      expect(b.yield.failures).toBe(a.yield.failures);
      if (truthYield >= a.yield.interval[0] && truthYield <= a.yield.interval[1]) cp++;
      if (truthYield >= b.yield.interval[0] && truthYield <= b.yield.interval[1]) wi++;
    }
    measured[`clopper-pearson ${label}`] = cp / REPEATS;
    measured[`wilson ${label}`] = wi / REPEATS;
    // Clopper-Pearson guarantees coverage >= 95% (Clopper & Pearson 1934): 93% is 2.9 SE below.
    expect(cp / REPEATS).toBeGreaterThanOrEqual(FLOOR);
    // Wilson (1927) has no such guarantee and may sit slightly below 95%. For these fixed seeds
    // it is at or above 93% too (measured 0.949 at p = 0.110 and 0.966 at p = 0.0051, against
    // Clopper-Pearson's 0.956 and 0.982), so the same floor is asserted.
    expect(wi / REPEATS).toBeGreaterThanOrEqual(FLOOR);
  });
});

describe('coverage of the sigma intervals on a Gaussian offset (1000 seeded runs of 2000 samples each)', () => {
  it('the chi-square and the reported (Bonett) interval both cover the true sigma in >= 93% of runs', async () => {
    let chi = 0;
    let reported = 0;
    for (let r = 0; r < REPEATS; r++) {
      const rep = await simulate(linearPair, { samples: 2000, seed: `sigma-${r}`, executor, keepOffsets: false });
      expect(rep.offset.sigmaIntervalMethod).toBe('bonett');
      if (sigma >= rep.offset.sigmaIntervalChiSquare[0] && sigma <= rep.offset.sigmaIntervalChiSquare[1]) chi++;
      if (sigma >= rep.offset.sigmaInterval[0] && sigma <= rep.offset.sigmaInterval[1]) reported++;
    }
    measured['chi-square sigma'] = chi / REPEATS;
    measured['bonett sigma'] = reported / REPEATS;
    // Chi-square: exact 95% for normal data ((N-1) s^2 / sigma^2 ~ chi-square); Bonett (2006):
    // approximately 95% for any finite kurtosis. Floor 2.9 SE below.
    expect(chi / REPEATS).toBeGreaterThanOrEqual(FLOOR);
    expect(reported / REPEATS).toBeGreaterThanOrEqual(FLOOR);
  });
});

/**
 * Exact sigma and kurtosis by Gauss-Hermite quadrature of the simple pair's closed form,
 * test/fixtures/simple_pair_sigma.py (quadrature change from 160 to 240 nodes below 1e-15).
 */
const EXACT = {
  heavy: { sigma: 0.5065472738528337, kurtosis: 4.165151205885106 },
  nearGaussian: { sigma: 0.003583769658966459, kurtosis: 3.0000000223529395 },
} as const;

describe('coverage of the sigma interval when the offset is not Gaussian (1000 seeded runs of 20000 samples each)', () => {
  it.each([
    ['heavy-tailed pair (kurtosis 4.17)', heavyTailPair, EXACT.heavy],
    ['near-Gaussian pair (kurtosis 3.00)', nearGaussianPair, EXACT.nearGaussian],
  ] as const)('%s: Bonett covers the exact sigma in >= 93% of runs; the kurtosis is reported', async (label, design, exact) => {
    const samples = 20_000;
    let bonett = 0;
    let chi = 0;
    let sumSigma = 0;
    let sumK = 0;
    let sumK2 = 0;
    for (let r = 0; r < REPEATS; r++) {
      const rep = await simulate(design, { samples, seed: `kurtosis-${r}`, executor, keepOffsets: false });
      const o = rep.offset;
      if (exact.sigma >= o.sigmaInterval[0] && exact.sigma <= o.sigmaInterval[1]) bonett++;
      if (exact.sigma >= o.sigmaIntervalChiSquare[0] && exact.sigma <= o.sigmaIntervalChiSquare[1]) chi++;
      sumSigma += o.sigma;
      sumK += o.kurtosis;
      sumK2 += o.kurtosis * o.kurtosis;
    }
    measured[`bonett sigma, ${label}`] = bonett / REPEATS;
    measured[`chi-square sigma, ${label}`] = chi / REPEATS;
    // Bonett 2006: nominal 95% for non-normal data; floor 2.9 SE below.
    expect(bonett / REPEATS).toBeGreaterThanOrEqual(FLOOR);
    // The truth itself: the mean of the 1000 sample sigmas is within 4 standard errors of the
    // quadrature value. SE of one s by the delta method, sigma sqrt((kurtosis - 1) / (4 N))
    // (Bonett 2006's variance of ln s^2, halved), over sqrt(1000); the O(1/N) bias of s is
    // below 1e-4 relative, inside it.
    const seSigma = exact.sigma * Math.sqrt((exact.kurtosis - 1) / (4 * samples)) / Math.sqrt(REPEATS);
    expect(Math.abs(sumSigma / REPEATS - exact.sigma)).toBeLessThan(4 * seSigma);
    // The reported kurtosis: its mean over the repeats is within 4 standard errors (from the
    // repeats' own spread) plus 6/N for the estimator's O(1/N) bias (common practice, no source).
    const meanK = sumK / REPEATS;
    const sdK = Math.sqrt(Math.max(0, sumK2 / REPEATS - meanK * meanK));
    expect(Math.abs(meanK - exact.kurtosis)).toBeLessThan((4 * sdK) / Math.sqrt(REPEATS) + 6 / samples);
    if (exact.kurtosis > 4) {
      // The premise of the test: here the chi-square interval, which assumes a Gaussian offset,
      // falls short of its nominal 95% (measured 0.888 for these seeds) - below the floor.
      expect(chi / REPEATS).toBeLessThan(FLOOR);
    }
  });
});

describe('coverage of the importance-sampling interval (1000 seeded runs of 2000 samples at 4.5 sigma)', () => {
  it('covers 2 Phi(-4.5) in >= 93% of runs', async () => {
    const design = at(4.5);
    const truth = twoSidedTail(4.5); // 6.795e-6 (A&S 26.2, via erfc)
    let covered = 0;
    for (let r = 0; r < REPEATS; r++) {
      const rep = await estimateHighSigma(design, { samples: 2000, seed: `is-${r}`, executor });
      if (truth >= rep.interval[0] && truth <= rep.interval[1]) covered++;
    }
    measured['importance sampling'] = covered / REPEATS;
    // The interval is p +- z SE (normal approximation): nominal 95%; floor 2.9 SE below. The
    // skewed weights make it cover slightly less (measured 0.939 for these seeds).
    expect(covered / REPEATS).toBeGreaterThanOrEqual(FLOOR);
  });
});

describe('the normal generator (ziggurat on the chunk streams)', () => {
  // 16 chunks of 65536 from the stream family the Monte Carlo uses: 1,048,576 deviates.
  const CHUNKS = 16;
  const PER_CHUNK = 65_536;
  const n = CHUNKS * PER_CHUNK;
  const sample = new Float64Array(n);
  for (let c = 0; c < CHUNKS; c++) fillStandardNormals(chunkRng('honesty-ks', 'montecarlo', c), sample, c * PER_CHUNK, (c + 1) * PER_CHUNK);

  it('Kolmogorov-Smirnov against jStat\'s normal CDF: p-value above 0.001', () => {
    const d = ksStatistic(sample, (x) => jStat.normal.cdf(x, 0, 1));
    // Kolmogorov's limit law (1933): P(sqrt(n) D > 1.9495) = 0.001 (critical value from memory);
    // n = 1e6 is deep in the asymptotic regime.
    expect(Math.sqrt(n) * d).toBeLessThan(1.9495);
    expect(ksAsymptoticPValue(d, n)).toBeGreaterThan(0.001);
    // The project's own erfc-based CDF gives the same statistic: the two CDFs agree to ~1e-15
    // here, far below the statistic's 1e-3 scale (1e-9 allows for jStat's erfc series).
    expect(Math.abs(ksStatistic(sample, normalCdf) - d)).toBeLessThan(1e-9);
  });

  it('mean, variance and the tail beyond 4 sigma agree with N(0, 1) within 4 standard errors', () => {
    let s = 0;
    let s2 = 0;
    let beyond4 = 0;
    for (const x of sample) {
      s += x;
      s2 += x * x;
      if (Math.abs(x) > 4) beyond4++;
    }
    const mean = s / n;
    const variance = s2 / n - mean * mean;
    // SE of the mean 1/sqrt(n); of the variance sqrt(2/n) (normal data); common practice, no source.
    expect(Math.abs(mean)).toBeLessThan(4 / Math.sqrt(n));
    expect(Math.abs(variance - 1)).toBeLessThan(4 * Math.sqrt(2 / n));
    // Count beyond +-4: Poisson with mean n 2 Phi(-4) = 66.4 (A&S 26.2: 2 Phi(-4) = 6.3342e-5).
    const expected = n * 6.334248366623996e-5;
    expect(Math.abs(beyond4 - expected)).toBeLessThan(4 * Math.sqrt(expected));
  });
});

describe('high-sigma estimate against the Gaussian closed form', () => {
  it('at 6 sigma on the linear pair: within 4 standard errors of 2 Phi(-6) = 1.973175290e-9', async () => {
    const rep = await estimateHighSigma(at(6), { seed: 'six-sigma', executor });
    const truth = 1.97317529e-9; // A&S 1964 26.2, erfc(6/sqrt 2) (test/fixtures/check_values.py)
    expect(Math.abs(rep.failureProbability - truth)).toBeLessThan(4 * rep.standardError);
    expect(rep.interval[0]).toBeLessThanOrEqual(truth);
    expect(rep.interval[1]).toBeGreaterThanOrEqual(truth);
    // The default stop rule reached +-5% at 95% (tail.ts), so the estimate is within ~5% too.
    expect(rep.stopRule).toBe('relative-error');
    expect(rep.relativeHalfWidth!).toBeLessThanOrEqual(0.05);
    // Sigma level of the estimate: 6 to within what 4 SE of p allow (dk = dp / (2 phi(6)) ~ 0.01).
    expect(Math.abs(rep.sigmaLevel! - 6)).toBeLessThan(0.02);
  });
});

describe('the linear design really is linear (the premise of every truth above)', () => {
  it('the exact offset equals the linearised offset to 1e-9 relative at 6 sigma along every axis', () => {
    const stage = compileStage(linearPair);
    const u = new Float64Array(stage.dimension);
    for (let j = 0; j < stage.dimension; j++) {
      u.fill(0);
      u[j] = 6;
      const exact = stage.figure(u, 0);
      const lin = 6 * stage.sensitivities[j]!;
      // vt axes carry the offset; beta axes contribute ~1e-10 sigma, compared in absolute terms.
      expect(Math.abs(exact - lin)).toBeLessThan(1e-9 * sigma);
    }
  });
});

import { describe, it, expect } from 'vitest';
import { mulberry32, relErr } from './testRandom.js';
import jStat from 'jstat';
import {
  BONETT_MIN_COUNT,
  CHI_SQUARE_APPROXIMATION_DOF,
  chiSquareQuantile,
  chiSquareQuantileWilsonHilferty,
  sigmaIntervalBonett,
  sigmaIntervalChiSquare,
} from '../src/stats/sigmaInterval.js';
import { addSamples, emptyMoments, kurtosis } from '../src/stats/moments.js';


/** Test-only Box-Muller normal pair from two uniforms (Box & Muller, Ann. Math. Stat. 1958). */
function fillNormals(rand: () => number, out: Float64Array): void {
  for (let i = 0; i < out.length; i += 2) {
    const r = Math.sqrt(-2 * Math.log(1 - rand()));
    const t = 2 * Math.PI * rand();
    out[i] = r * Math.cos(t);
    if (i + 1 < out.length) out[i + 1] = r * Math.sin(t);
  }
}

describe('chiSquareQuantile: reference values', () => {
  it('chi2inv(0.95, 3) = 7.81472790325118 (A&S 1964 table 26.8 gives 7.81473)', () => {
    // The root of P(3/2, x/2) = 0.95 (regularised incomplete gamma, A&S 26.4.19), computed by
    // test/fixtures/check_values.py: 7.8147279032511799553; A&S 1964 table 26.8 gives 7.81473
    // (from memory). Tolerance 5e-11 relative, jStat's accuracy bound (next test).
    expect(relErr(chiSquareQuantile(0.95, 3), 7.8147279032511799553)).toBeLessThan(5e-11);
  });

  it('1 and 2 degrees of freedom match the closed forms Z^2 and -2 ln(1 - p)', () => {
    // chi2(1) = Z^2, so chi2inv(p, 1) = Phi^-1((1 + p)/2)^2; chi2(2) is exponential with
    // mean 2, so chi2inv(p, 2) = -2 ln(1 - p) (A&S 26.4). Values by mpmath 1.3.0, 30 digits.
    // Tolerance 5e-11 relative: jStat 1.9.6 is within 1.3e-11 of SciPy over dof 1..1e5 and
    // p 0.005..0.995 (measured worst case).
    expect(relErr(chiSquareQuantile(0.95, 1), 3.8414588206941236)).toBeLessThan(5e-11);
    expect(relErr(chiSquareQuantile(0.975, 1), 5.0238861873148889562)).toBeLessThan(5e-11);
    expect(relErr(chiSquareQuantile(0.025, 1), 0.00098206911717525591234)).toBeLessThan(5e-11);
    expect(relErr(chiSquareQuantile(0.975, 2), 7.3777589082278726057)).toBeLessThan(5e-11);
    expect(relErr(chiSquareQuantile(0.025, 2), 0.050635615968579750807)).toBeLessThan(5e-11);
  });

  it('large dof: SciPy 1.17.1 scipy.stats.chi2.ppf at 1e5 and 1e9 - 1 degrees of freedom', () => {
    // Computed with SciPy 1.17.1 (Boost gamma quantile). jStat at 1e5 dof: measured 5e-13,
    // tolerance 5e-11 as above. Wilson-Hilferty's error falls as dof^-1.5 (measured against
    // SciPy: 4.3e-11 at 1e6, ~1e-15 at 1e9): tolerances 1e-10 and 1e-13.
    expect(relErr(chiSquareQuantile(0.975, 1e5), 100878.41530566558)).toBeLessThan(5e-11);
    expect(relErr(chiSquareQuantile(0.025, 1e5), 99125.37330064735)).toBeLessThan(5e-11);
    expect(relErr(chiSquareQuantile(0.975, 1e6), 1002773.701467926)).toBeLessThan(1e-10);
    expect(relErr(chiSquareQuantile(0.975, 1e9 - 1), 1000087653.1483043)).toBeLessThan(1e-13);
    expect(relErr(chiSquareQuantile(0.025, 1e9 - 1), 999912348.6403074)).toBeLessThan(1e-13);
  });
});

describe('chiSquareQuantile: the switch to Wilson-Hilferty', () => {
  it('switches at 1e5 dof', () => {
    // Regression guard on the documented constant (no outside source: a design choice).
    expect(CHI_SQUARE_APPROXIMATION_DOF).toBe(1e5);
  });

  it('jStat and Wilson-Hilferty agree at the switch point to 1e-8 (95%, 99%) and 1e-4 (p = 1e-9)', () => {
    // Wilson-Hilferty's relative error at 1e5 dof, computed against SciPy: 1.4e-9 at
    // p = 0.025/0.975, 1.7e-7 at p = 1e-9; the brief's bound is 1e-4 relative, the tighter
    // 1e-8 holds at the usual confidence levels.
    const dof = CHI_SQUARE_APPROXIMATION_DOF;
    for (const p of [0.005, 0.025, 0.5, 0.975, 0.995]) {
      expect(relErr(chiSquareQuantileWilsonHilferty(p, dof), jStat.chisquare.inv(p, dof))).toBeLessThan(1e-8);
    }
    for (const p of [1e-9, 1 - 1e-9]) {
      expect(relErr(chiSquareQuantileWilsonHilferty(p, dof), jStat.chisquare.inv(p, dof))).toBeLessThan(1e-4);
    }
  });

  it('is continuous across the switch: the step from 1e5 to 1e5 + 1 dof is the exact one', () => {
    // Exact step, SciPy 1.17.1: chi2.ppf(0.975, 100001) - chi2.ppf(0.975, 100000) = 1.0043826095.
    // The approximation error on either side is < 1.4e-9 relative, i.e. < 1.4e-4 absolute at
    // 1e5; tolerance 1e-8 relative of the quantile (1e-3 absolute) would expose any jump.
    const a = chiSquareQuantile(0.975, 1e5);
    const b = chiSquareQuantile(0.975, 1e5 + 1);
    expect(Math.abs(b - a - 1.0043826095)).toBeLessThan(1e-8 * a);
  });
});

describe('sigmaIntervalChiSquare', () => {
  it('N = 11, s = 1, 95%: [0.69871704416342439, 1.7549335474133559]', () => {
    // Computed with mpmath 1.3.0 from chi2inv(0.975, 10) = 20.4831773508, chi2inv(0.025, 10)
    // = 3.24697278024 (standard table from memory: 20.483 and 3.247). Tolerance 3e-11 relative
    // (jStat's 5e-11 on the quantile, halved by the square root).
    const [lo, hi] = sigmaIntervalChiSquare(1, 11, 0.95);
    expect(relErr(lo, 0.69871704416342439)).toBeLessThan(3e-11);
    expect(relErr(hi, 1.7549335474133559)).toBeLessThan(3e-11);
  });

  it('N = 3 (2 dof) matches the closed form [1/sqrt(ln 40), 1/sqrt(-ln 0.975)] scaled by s', () => {
    // chi2(2) quantile -2 ln(1 - p) (A&S 26.4): sigma bounds s sqrt(2 / (-2 ln(1 - p))).
    // Tolerance 3e-11 relative (jStat's quantile, halved by the square root).
    const s = 2.5;
    const [lo, hi] = sigmaIntervalChiSquare(s, 3, 0.95);
    expect(relErr(lo, s / Math.sqrt(Math.log(40)))).toBeLessThan(3e-11);
    expect(relErr(hi, s / Math.sqrt(-Math.log(0.975)))).toBeLessThan(3e-11);
  });

  it('N = 1e9 works and gives [0.9999561758068122, 1.0000438280610702] for s = 1', () => {
    // SciPy 1.17.1 chi2.ppf at 1e9 - 1 dof. Relative half-width ~ z / sqrt(2 N) = 4.38e-5
    // (normal approximation, common practice). Tolerance 1e-12 relative.
    const [lo, hi] = sigmaIntervalChiSquare(1, 1e9, 0.95);
    expect(relErr(lo, 0.9999561758068122)).toBeLessThan(1e-12);
    expect(relErr(hi, 1.0000438280610702)).toBeLessThan(1e-12);
    expect(Math.abs((hi - lo) / 2 - 1.959963984540054 / Math.sqrt(2e9))).toBeLessThan(1e-8);
  });

  it('covers the true sigma in 95% +- 4 standard errors of seeded normal experiments', () => {
    // Statistical check of the definition: 4000 experiments of N = 8 draws from N(0, 2^2)
    // (test-local mulberry32 + Box-Muller, seed 12345). Coverage is binomial, SE =
    // sqrt(0.95 * 0.05 / 4000) = 0.00345; threshold 4 SE = 0.0138.
    const rand = mulberry32(12345);
    const draws = new Float64Array(8);
    const trueSigma = 2;
    const experiments = 4000;
    let covered = 0;
    for (let e = 0; e < experiments; e++) {
      fillNormals(rand, draws);
      let mean = 0;
      for (const v of draws) mean += v;
      mean /= draws.length;
      let ss = 0;
      for (const v of draws) ss += (v - mean) ** 2;
      const s = trueSigma * Math.sqrt(ss / (draws.length - 1));
      const [lo, hi] = sigmaIntervalChiSquare(s, draws.length, 0.95);
      if (lo <= trueSigma && trueSigma <= hi) covered++;
    }
    const se = Math.sqrt((0.95 * 0.05) / experiments);
    expect(Math.abs(covered / experiments - 0.95)).toBeLessThan(4 * se);
  });

  it('rejects bad arguments, naming the field', () => {
    expect(() => sigmaIntervalChiSquare(1, 1, 0.95)).toThrow(/count/);
    expect(() => sigmaIntervalChiSquare(-1, 10, 0.95)).toThrow(/sampleStdDev/);
    expect(() => sigmaIntervalChiSquare(1, 10, 0)).toThrow(/confidence/);
    expect(() => chiSquareQuantile(1, 10)).toThrow(/p must/);
  });
});

/** Test-only Laplace(0, 1) draw by inversion of its CDF (variance 2, kurtosis 6). */
function laplace(rand: () => number): number {
  const u = rand() - 0.5;
  return -Math.sign(u) * Math.log(1 - 2 * Math.abs(u));
}

describe('sigmaIntervalBonett (Bonett, Comput. Stat. Data Anal. 50(3), 2006)', () => {
  it('reference values from the published formula (test/fixtures/bonett_interval.py)', () => {
    // The script evaluates Bonett's formula in Python with statistics.NormalDist for z.
    // Tolerance 1e-12 relative: a few roundings on each side and normalQuantile's ~1e-15.
    const cases = [
      [1, 1000, 3, 0.95, 0.9579246470898307, 1.0459735178870566],
      [2.5, 20000, 4.2, 0.95, 2.469318044891539, 2.531311250774258],
      [0.01, 50, 9, 0.99, 0.0059198770775235445, 0.01780973962559003],
    ] as const;
    for (const [s, n, k, c, lo, hi] of cases) {
      const [a, b] = sigmaIntervalBonett(s, n, k, c);
      expect(relErr(a, lo)).toBeLessThan(1e-12);
      expect(relErr(b, hi)).toBeLessThan(1e-12);
    }
  });

  it('for a Gaussian kurtosis of 3 it is the chi-square interval to O(1/N)', () => {
    // Both are ln s^2 +- z sqrt(2/(N-1)) to first order (Bonett 2006, sec. 2); they differ in
    // the O(1/N) terms, so at N = 1e4 and 1e6 the ends agree to 0.2/N relative (measured at
    // most 0.04/N).
    for (const n of [1e4, 1e6]) {
      const [a, b] = sigmaIntervalBonett(1, n, 3, 0.95);
      const [c, d] = sigmaIntervalChiSquare(1, n, 0.95);
      expect(relErr(a, c)).toBeLessThan(0.2 / n);
      expect(relErr(b, d)).toBeLessThan(0.2 / n);
    }
  });

  it('a larger kurtosis widens the interval: half-width grows as sqrt(kurtosis - 1)', () => {
    // se = c sqrt((k - (n-3)/n) / (n-1)): at N = 1e6 the half-width on ln s^2 goes from
    // sqrt(2) to sqrt(8) units between kurtosis 3 and 9, a factor of 2 (tolerance 1e-4 for the
    // exp() curvature at half-width 0.006).
    const w = (k: number): number => {
      const [a, b] = sigmaIntervalBonett(1, 1e6, k, 0.95);
      return Math.log(b / a);
    };
    expect(Math.abs(w(9) / w(3) - 2)).toBeLessThan(1e-4);
  });

  it('on heavy-tailed data it keeps its coverage where the chi-square interval loses it', () => {
    // 2000 seeded experiments of N = 1000 Laplace draws (kurtosis 6, sigma sqrt 2, test-local
    // mulberry32, seed 99). Coverage is binomial, SE = sqrt(0.95 * 0.05 / 2000) = 0.0049:
    // Bonett within 4 SE of 95% (measured 0.9445); the chi-square interval, whose variance of
    // s^2 assumes kurtosis 3, covers far less (measured 0.8025), asserted below 85%.
    const rand = mulberry32(99);
    const n = 1000;
    const values = new Float64Array(n);
    const truth = Math.SQRT2;
    const experiments = 2000;
    let bonett = 0;
    let chi = 0;
    for (let e = 0; e < experiments; e++) {
      for (let i = 0; i < n; i++) values[i] = laplace(rand);
      const m = addSamples(emptyMoments(), values, 0, n);
      const s = Math.sqrt(m.m2 / (n - 1));
      const [a, b] = sigmaIntervalBonett(s, n, kurtosis(m), 0.95);
      const [c, d] = sigmaIntervalChiSquare(s, n, 0.95);
      if (a <= truth && truth <= b) bonett++;
      if (c <= truth && truth <= d) chi++;
    }
    const se = Math.sqrt((0.95 * 0.05) / experiments);
    expect(Math.abs(bonett / experiments - 0.95)).toBeLessThan(4 * se);
    expect(chi / experiments).toBeLessThan(0.85);
  });

  it('rejects bad arguments, naming the field', () => {
    expect(() => sigmaIntervalBonett(1, BONETT_MIN_COUNT - 1, 3, 0.95)).toThrow(/count/);
    expect(() => sigmaIntervalBonett(1, 100, 0.5, 0.95)).toThrow(/kurtosis/);
    expect(() => sigmaIntervalBonett(1, 100, Number.NaN, 0.95)).toThrow(/kurtosis/);
    expect(() => sigmaIntervalBonett(-1, 100, 3, 0.95)).toThrow(/sampleStdDev/);
    expect(() => sigmaIntervalBonett(1, 100, 3, 1)).toThrow(/confidence/);
  });
});

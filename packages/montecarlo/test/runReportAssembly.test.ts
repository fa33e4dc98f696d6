/**
 * assembleRunReport on a hand-made tally, in this thread (the simulate tests run the chunks on
 * worker threads, which load the built package): the mean interval, the sigma intervals, the
 * yield and the chip yield against formulas written out here from the twelve offsets below.
 * Normal quantiles from A&S 1964 table 26.1: z(0.975) = 1.959963984540054,
 * z(0.995) = 2.5758293035489004.
 */
import { compileStage } from '@twinfet/core';
import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import { assembleRunReport, type IntervalMethod, type RunTally } from '../src/analyses/runReport.js';
import { linearisedSummary } from '../src/analyses/linearisedSummary.js';
import { addSamples, emptyMoments } from '../src/stats/moments.js';
import { addToHistogram, createHistogram } from '../src/stats/histogram.js';
import { bigMirror } from './designs.js';

/** Invented offsets, volts: integers times 1 mV, mean 1 mV (sums below done by hand). */
const MV = [-4, -2, -1, 0, 0, 1, 1, 2, 2, 3, 4, 6];
// Deviations from the mean 1: -5 -3 -2 -1 -1 0 0 1 1 2 3 5.
// Sum of squares 80, of fourth powers 1448 (625 + 81 + 16 + 1 + 1 + 1 + 1 + 16 + 81 + 625).
const N = 12;
const MEAN = 1e-3;
const S = 1e-3 * Math.sqrt(80 / 11);
const KURTOSIS = (12 * 1448) / (80 * 80); // n M4 / M2^2 = 2.715

const stage = compileStage({ ...bigMirror, spec: { offset: 3e-3, instances: 4 } });

function tally(values: number[], confidence: number, method: IntervalMethod, kept: boolean, failuresHigh: number, failuresLow: number): RunTally {
  const x = Float64Array.from(values, (v) => v * 1e-3);
  return {
    samples: x.length,
    seed: 'hand-made',
    workers: 1,
    partial: false,
    spec: 3e-3,
    confidence,
    method,
    analytic: linearisedSummary(stage, 3e-3),
    range: 0.01,
    moments: addSamples(emptyMoments(), x, 0, x.length),
    histogram: addToHistogram(createHistogram(-0.01, 0.01, 100), x, 0, x.length),
    failuresHigh,
    failuresLow,
    nonConverged: 0,
    kept: kept ? x : undefined,
    importance: undefined,
    started: performance.now(),
  };
}

describe('assembleRunReport against hand computation (12 invented offsets)', () => {
  it.each([
    [0.95, 1.959963984540054],
    [0.99, 2.5758293035489004],
  ] as const)('at %f: mean +- z s / sqrt(n), s = sqrt(M2 / (n - 1)), Bonett sigma interval (1e-12 relative)', (confidence, z) => {
    const r = assembleRunReport(stage, tally(MV, confidence, 'clopper-pearson', true, 1, 1));
    const half = (z * S) / Math.sqrt(N);
    expect(r.evaluated).toBe(N);
    expect(Math.abs(r.offset.mean / MEAN - 1)).toBeLessThan(1e-12);
    expect(Math.abs(r.offset.sigma / S - 1)).toBeLessThan(1e-12);
    expect(Math.abs(r.offset.meanInterval[0] / (MEAN - half) - 1)).toBeLessThan(1e-12);
    expect(Math.abs(r.offset.meanInterval[1] / (MEAN + half) - 1)).toBeLessThan(1e-12);
    expect(Math.abs(r.offset.kurtosis / KURTOSIS - 1)).toBeLessThan(1e-12);
    // Bonett 2006 (n >= 10 here): c = n / (n - z), se = c sqrt((k - (n - 3)/n) / (n - 1)),
    // sigma in sqrt(c s^2 exp(-+ z se)).
    const c = N / (N - z);
    const se = c * Math.sqrt((KURTOSIS - (N - 3) / N) / (N - 1));
    expect(r.offset.sigmaIntervalMethod).toBe('bonett');
    expect(Math.abs(r.offset.sigmaInterval[0] / Math.sqrt(c * S * S * Math.exp(-z * se)) - 1)).toBeLessThan(1e-12);
    expect(Math.abs(r.offset.sigmaInterval[1] / Math.sqrt(c * S * S * Math.exp(z * se)) - 1)).toBeLessThan(1e-12);
    // Chi-square beside it: s sqrt((n - 1) / chi2inv), jStat as the independent quantile
    // (within ~1e-11 of SciPy, sigmaInterval.test.ts): 1e-10 relative.
    const a = 1 - confidence;
    expect(Math.abs(r.offset.sigmaIntervalChiSquare[0] / (S * Math.sqrt(11 / jStat.chisquare.inv(1 - a / 2, 11))) - 1)).toBeLessThan(1e-10);
    expect(Math.abs(r.offset.sigmaIntervalChiSquare[1] / (S * Math.sqrt(11 / jStat.chisquare.inv(a / 2, 11))) - 1)).toBeLessThan(1e-10);
    expect(r.offset.min).toBe(-4e-3);
    expect(r.offset.max).toBe(6e-3);
  });

  it('below 10 samples the sigma interval is the chi-square one, by name', () => {
    const r = assembleRunReport(stage, tally([-1, 0, 2, 3], 0.95, 'clopper-pearson', true, 0, 0));
    expect(r.offset.sigmaIntervalMethod).toBe('chi-square');
    expect(r.offset.sigmaInterval).toEqual(r.offset.sigmaIntervalChiSquare);
  });

  it('yield and chip yield, Clopper-Pearson: 1 - 3/12, 1 - reversed CP(3, 12), mapped through Y^4', () => {
    // Clopper & Pearson 1934: failure bounds BetaInv(a/2; x, n - x + 1), BetaInv(1 - a/2; x + 1, n - x);
    // jStat.beta.inv is an independent implementation, good to ~1e-6 relative at this n
    // (clopperPearson.test.ts), hence 1e-6.
    const r = assembleRunReport(stage, tally(MV, 0.95, 'clopper-pearson', true, 2, 1));
    const lo = jStat.beta.inv(0.025, 3, 10);
    const hi = jStat.beta.inv(0.975, 4, 9);
    expect(r.yield.failures).toBe(3);
    expect(r.yield.method).toBe('clopper-pearson');
    expect(Math.abs(r.yield.estimate - 0.75)).toBeLessThan(1e-15);
    expect(Math.abs(r.yield.interval[0] / (1 - hi) - 1)).toBeLessThan(1e-6);
    expect(Math.abs(r.yield.interval[1] / (1 - lo) - 1)).toBeLessThan(1e-6);
    // Chip of M = 4 independent stages: Y^4 (product of independent passes).
    expect(r.chip.instances).toBe(4);
    expect(Math.abs(r.chip.estimate / 0.75 ** 4 - 1)).toBeLessThan(1e-14);
    expect(Math.abs(r.chip.interval[0] / (1 - hi) ** 4 - 1)).toBeLessThan(4e-6);
    expect(Math.abs(r.chip.interval[1] / (1 - lo) ** 4 - 1)).toBeLessThan(4e-6);
  });

  it('yield with the Wilson interval: the roots of (x/n - p)^2 = z^2 p (1 - p) / n (Wilson 1927)', () => {
    // Textbook form: (x + z^2/2 -+ z sqrt(x (n - x)/n + z^2/4)) / (n + z^2); 1e-13 relative.
    const z = 1.959963984540054;
    const x = 3;
    const centre = x + (z * z) / 2;
    const w = z * Math.sqrt((x * (N - x)) / N + (z * z) / 4);
    const flo = (centre - w) / (N + z * z);
    const fhi = (centre + w) / (N + z * z);
    const r = assembleRunReport(stage, tally(MV, 0.95, 'wilson', true, 0, 3));
    expect(r.yield.method).toBe('wilson');
    expect(Math.abs(r.yield.interval[0] / (1 - fhi) - 1)).toBeLessThan(1e-13);
    expect(Math.abs(r.yield.interval[1] / (1 - flo) - 1)).toBeLessThan(1e-13);
  });

  it('design, exact quantiles from kept offsets, histogram quantiles without', () => {
    const r = assembleRunReport(stage, tally(MV, 0.95, 'clopper-pearson', true, 0, 0));
    expect(r.design).toEqual({ name: bigMirror.name, topology: 'mirror' });
    expect(r.offset.quantileMethod).toBe('exact');
    expect(r.offset.quantiles.signed).toHaveLength(5);
    expect(r.offset.quantiles.absolute).toHaveLength(5);
    // The median of the twelve is 1 mV (sixth and seventh values are both 1).
    expect(r.offset.quantiles.signed[2]).toEqual({ p: 0.5, value: 1e-3 });
    const h = assembleRunReport(stage, tally(MV, 0.95, 'clopper-pearson', false, 0, 0));
    expect(h.offset.quantileMethod).toBe('histogram');
  });
});

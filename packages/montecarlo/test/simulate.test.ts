import { compileStage, linearisedSigma } from '@twinfet/core';
import { describe, expect, it } from 'vitest';
import { twoSidedTail } from '../src/stats/normal.js';
import { createExecutor, poolExecutor, startingPoolExecutor } from '../src/engine/pool.js';
import type { MonteCarloTask } from '../src/engine/messages.js';
import { simulate, type RunReport } from '../src/analyses/simulate.js';
import { bigMirror, bigSimple } from './designs.js';

/** The statistics of a report without the timing and worker fields (which legitimately vary). */
function statistics(r: RunReport): string {
  const { seconds: _s, samplesPerSecond: _p, workers: _w, ...rest } = r;
  return JSON.stringify(rest);
}

describe('Monte Carlo against the linearised model (small mismatch)', () => {
  it.each([
    ['simple', bigSimple],
    ['mirror', bigMirror],
  ] as const)('%s: sigma within 4 standard errors of the linearised sigma (Kinget 2005 first-order model)', async (_n, design) => {
    const r = await simulate(design, { samples: 200_000, seed: 11, workers: 1 });
    const lin = linearisedSigma(compileStage(design));
    // SE of a normal sample's standard deviation: sigma / sqrt(2 (N - 1)).
    const se = r.offset.sigma / Math.sqrt(2 * (r.evaluated - 1));
    expect(Math.abs(r.offset.sigma - lin)).toBeLessThan(4 * se);
    expect(r.analytic.agreement.consistent).toBe(true);
    // The chi-square interval is about +-1.96 SE wide (95%): checks its scale, not its coverage.
    const [lo, hi] = r.offset.sigmaInterval;
    expect((hi - lo) / (2 * 1.96 * se)).toBeGreaterThan(0.95);
    expect((hi - lo) / (2 * 1.96 * se)).toBeLessThan(1.05);
  });

  it('yield agrees with 2 Phi(-spec/sigma) within 4 binomial standard errors (A&S 1964 26.2)', async () => {
    const r = await simulate(bigSimple, { samples: 200_000, seed: 12, workers: 1 });
    const p = twoSidedTail(bigSimple.spec.offset! / linearisedSigma(compileStage(bigSimple)));
    const se = Math.sqrt((p * (1 - p)) / r.evaluated);
    expect(Math.abs(r.yield.failure.estimate - p)).toBeLessThan(4 * se);
    // Failure interval contains the estimate; yield interval is its mirror image.
    expect(r.yield.interval[0]).toBeCloseTo(1 - r.yield.failure.interval[1], 15);
    expect(r.yield.interval[1]).toBeCloseTo(1 - r.yield.failure.interval[0], 15);
  });

  it('chip yield is the instance yield to the power M, interval mapped through (independent instances)', async () => {
    const r = await simulate(bigMirror, { samples: 20_000, seed: 2, workers: 1 });
    const m = bigMirror.spec.instances;
    // Exact identity up to rounding of exp(M log y): 1e-12 relative.
    expect(Math.abs(r.chip.estimate / r.yield.estimate ** m - 1)).toBeLessThan(1e-12);
    expect(Math.abs(r.chip.interval[0] / r.yield.interval[0] ** m - 1)).toBeLessThan(1e-12);
  });

  it('exact quantiles: the median of |Vos| is 0.6745 sigma for a Gaussian (A&S 26), within 1%', async () => {
    const r = await simulate(bigSimple, { samples: 200_000, seed: 5, workers: 1 });
    expect(r.offset.quantileMethod).toBe('exact');
    const med = r.offset.quantiles.absolute.find((q) => q.p === 0.5)!.value!;
    // SE of the |x| median at N = 2e5 is ~0.3% of sigma: 1% is > 3 SE.
    expect(Math.abs(med / r.offset.sigma / 0.6744897501960817 - 1)).toBeLessThan(0.01);
  });

  it('histogram quantiles agree with the exact ones within one bin width', async () => {
    const exact = await simulate(bigMirror, { samples: 100_000, seed: 9, workers: 1 });
    const approx = await simulate(bigMirror, { samples: 100_000, seed: 9, workers: 1, keepOffsets: false });
    expect(approx.offset.quantileMethod).toBe('histogram');
    for (const kind of ['signed', 'absolute'] as const) {
      exact.offset.quantiles[kind].forEach((q, i) => {
        const a = approx.offset.quantiles[kind][i]!.value!;
        // Documented bound of quantileFromHistogram: one bin width (plus the type-7 interpolation gap).
        expect(Math.abs(a - q.value!)).toBeLessThan(2 * exact.histogram.binWidth);
      });
    }
    expect(approx.offset.sigma).toBe(exact.offset.sigma);
  });
});

describe('determinism across worker counts', () => {
  it('the same seed gives byte-identical statistics with 1, 2 and 3 workers', async () => {
    const samples = 300_000; // 5 chunks, the last one short
    const runs = [];
    for (const workers of [1, 2, 3]) runs.push(statistics(await simulate(bigMirror, { samples, seed: 'det', workers })));
    // Pools that take every chunk (simulate's own executor may run a small job in this thread).
    for (const workers of [2, 3]) {
      const executor = poolExecutor(workers);
      try {
        runs.push(statistics(await simulate(bigMirror, { samples, seed: 'det', executor })));
      } finally {
        await executor.close();
      }
    }
    // A pool started before the first chunk (the run command's long runs), this thread working beside it.
    const eager = createExecutor(2, { chunks: 5, startNow: true });
    try {
      runs.push(statistics(await simulate(bigMirror, { samples, seed: 'det', executor: eager })));
    } finally {
      await eager.close();
    }
    for (const r of runs.slice(1)) expect(r).toBe(runs[0]);
    const other = statistics(await simulate(bigMirror, { samples, seed: 'det2', workers: 2 }));
    expect(other).not.toBe(runs[0]);
  });
});

describe('where chunks run (the pool-start policy)', () => {
  const task = (chunk: number): MonteCarloTask => ({
    kind: 'montecarlo', design: bigSimple, seed: 'where', chunk, count: 1000, spec: 1e-3,
    histogram: { lo: -0.01, hi: 0.01, bins: 20 }, keepOffsets: false, keepDraws: false,
  });

  it('a job of two chunks runs in this thread and never starts a pool', async () => {
    // The policy needs two chunks timed here before it may start one, so this is exact.
    const executor = startingPoolExecutor(2, 2);
    const results = await Promise.all([executor.run(task(0)), executor.run(task(1))]);
    expect(results.map((r) => r.count)).toEqual([1000, 1000]);
    expect(executor.liveThreads()).toBe(0);
    await executor.close();
  });

  it('startNow starts the pool threads at once, before any chunk, and close ends them', async () => {
    // A job's own executor: the pool has workers - 1 threads, this thread being the other.
    const executor = createExecutor(3, { chunks: 40, startNow: true });
    try {
      expect(executor.liveThreads()).toBe(2);
      expect((await executor.run(task(3))).count).toBe(1000);
    } finally {
      await executor.close();
    }
    expect(executor.liveThreads()).toBe(0);
  });

  it('a shared executor (no chunk count) starts its pool at its first chunk, and close ends it', async () => {
    // Three workers: this thread and a pool of two.
    const executor = startingPoolExecutor(3);
    try {
      expect((await executor.run(task(5))).count).toBe(1000);
      expect(executor.liveThreads()).toBe(2);
    } finally {
      await executor.close();
    }
    expect(executor.liveThreads()).toBe(0);
  });
});

describe('interval honesty (seeded repeats)', () => {
  it('the 95% Clopper-Pearson yield interval covers the true value in at least 93% of 300 runs', async () => {
    // Truth: 2 Phi(-spec/sigma) of the (linear to < 0.1%) big pair, at spec = 1.6 sigma (p ~ 0.11).
    const sigma = linearisedSigma(compileStage(bigSimple));
    const design = { ...bigSimple, spec: { offset: 1.6 * sigma, instances: 1 } };
    const truth = twoSidedTail(1.6);
    const executor = createExecutor(1);
    let covered = 0;
    const runs = 300;
    for (let k = 0; k < runs; k++) {
      const r = await simulate(design, { samples: 1000, seed: `cover-${k}`, executor });
      const [lo, hi] = r.yield.failure.interval;
      if (truth >= lo && truth <= hi) covered++;
    }
    await executor.close();
    // Clopper-Pearson is conservative (>= 95%); 93% leaves 2.5 binomial SE (sqrt(.95*.05/300) = 1.26%).
    expect(covered / runs).toBeGreaterThanOrEqual(0.93);
  });
});

describe('cancellation and faults', () => {
  /**
   * Aborts from inside the run, from its progress callback, once `chunks` chunks are done, and
   * remembers the count then and the largest count reported afterwards. Event order, not time:
   * how long the abort takes is measured by `pnpm bench`.
   */
  const abortAfter = (ac: AbortController, chunks: number) => {
    let at = -1;
    let last = 0;
    return {
      onProgress: (done: number): void => {
        last = Math.max(last, done);
        if (at < 0 && done >= chunks * CHUNK) {
          at = done;
          ac.abort();
        }
      },
      atAbort: () => at,
      last: () => last,
    };
  };
  const CHUNK = 65_536;

  it('an abort stops the run within one more chunk per worker and leaves no worker running', async () => {
    const executor = createExecutor(2);
    const ac = new AbortController();
    const probe = abortAfter(ac, 3);
    await expect(simulate(bigMirror, { samples: 1e9, executor, signal: ac.signal, onProgress: probe.onProgress })).rejects.toMatchObject({ name: 'AbortError' });
    expect(probe.atAbort()).toBeGreaterThanOrEqual(3 * CHUNK);
    // Piscina aborts the running chunks in their threads; a result already on its way may still
    // be reported: at most one per worker (exact integer counts).
    expect(probe.last() - probe.atAbort()).toBeLessThanOrEqual(2 * CHUNK);
    await executor.close();
    expect(executor.liveThreads()).toBe(0);
  });

  it('partialOnAbort returns the finished chunks, marked partial', async () => {
    const ac = new AbortController();
    const probe = abortAfter(ac, 2);
    const r = await simulate(bigMirror, { samples: 1e9, workers: 2, signal: ac.signal, partialOnAbort: true, onProgress: probe.onProgress });
    expect(r.partial).toBe(true);
    expect(r.evaluated % CHUNK).toBe(0); // whole chunks only
    expect(r.evaluated).toBeGreaterThanOrEqual(probe.atAbort());
    expect(r.evaluated - probe.atAbort()).toBeLessThanOrEqual(2 * CHUNK);
  });

  it('a worker that throws ends the run with a clear error and frees the pool', async () => {
    process.env['TWINFET_TEST_FAULTS'] = '1';
    try {
      const executor = createExecutor(2);
      await expect(simulate(bigSimple, { samples: 500_000, executor, fault: { chunk: 3, fault: 'throw' } })).rejects.toThrow(/injected worker fault/);
      await executor.close();
      expect(executor.liveThreads()).toBe(0);
      const crash = createExecutor(2);
      await expect(simulate(bigSimple, { samples: 500_000, executor: crash, fault: { chunk: 2, fault: 'exit' } })).rejects.toThrow(/worker/);
      await crash.close();
    } finally {
      delete process.env['TWINFET_TEST_FAULTS'];
    }
  });

  it('options are validated at the edge with the field named', async () => {
    await expect(simulate(bigSimple, { samples: 0 })).rejects.toThrow(/^samples: /);
    await expect(simulate(bigSimple, { samples: 1.5 })).rejects.toThrow(/^samples: /);
    await expect(simulate(bigSimple, { workers: 0 })).rejects.toThrow(/^workers: /);
    await expect(simulate(bigSimple, { confidence: 1 })).rejects.toThrow(/^confidence: /);
  });
});

/**
 * Faults and cancellation: a worker that crashes or throws ends the run with a clear error, frees
 * its pool and never hangs; SIGINT stops a long CLI run within a chunk per worker, with the
 * statistics of the finished chunks marked partial; cancelling through the API leaves no worker
 * thread alive. Nothing here is timed: each check is on the order of events (chunks finished
 * before and after the abort), so a loaded machine cannot make it fail; the latencies are
 * measured by `pnpm bench`.
 *
 * Fault injection is the test hook of montecarlo/src/worker.ts, honoured only in worker threads
 * started with TWINFET_TEST_FAULTS=1 (the in-thread executor of --workers 1 never sees it).
 * Worker threads are tracked through Node's process 'worker' event: piscina unreferences its
 * threads, so they never appear in process.getActiveResourcesInfo(), which is checked as well.
 * The library runs from its build (import '@twinfet/montecarlo' resolves to dist): `npx tsc -b`.
 */
import type { Worker } from 'node:worker_threads';
import { createExecutor, estimateHighSigma, simulate, type Executor } from '@twinfet/montecarlo';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { fileURLToPath } from 'node:url';
import { runCli, type CliResult } from './support/cli.js';
import { linearPair } from './support/designs.js';

/** The chunk probe preloaded into CLI children (see the file). */
const PROBE = fileURLToPath(new URL('./support/chunkProbe.mjs', import.meta.url));

/** Every worker thread this process starts, and whether it has exited. */
const started: { worker: Worker; exited: boolean }[] = [];
process.on('worker', (worker: Worker) => {
  const entry = { worker, exited: false };
  started.push(entry);
  worker.once('exit', () => (entry.exited = true));
});

/** Resolves when every tracked worker has exited, or rejects after `ms` (a hang guard, not a speed check). */
async function allWorkersExited(ms = 60_000): Promise<void> {
  const deadline = performance.now() + ms;
  while (started.some((s) => !s.exited)) {
    if (performance.now() > deadline) throw new Error(`${started.filter((s) => !s.exited).length} worker thread(s) still alive after ${ms} ms`);
    await new Promise((r) => setTimeout(r, 10));
  }
}

/** Rejects with a clear message instead of letting a hang run into vitest's timeout. */
function withinHangGuard<T>(p: Promise<T>, ms: number, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const guard = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${what} did not settle within ${ms} ms (hang)`)), ms);
  });
  return Promise.race([p, guard]).finally(() => clearTimeout(timer));
}

async function settle(p: Promise<unknown>): Promise<unknown> {
  try {
    await p;
  } catch (e) {
    return e;
  }
  return undefined;
}

const workerResources = (): string[] => process.getActiveResourcesInfo().filter((r) => /worker/i.test(r));

describe('injected worker faults (TWINFET_TEST_FAULTS=1)', () => {
  beforeEach(() => {
    process.env['TWINFET_TEST_FAULTS'] = '1';
    started.length = 0;
  });
  afterEach(() => {
    delete process.env['TWINFET_TEST_FAULTS'];
  });

  it.each([
    ['exit', /worker thread failed/],
    ['throw', /injected worker fault/],
  ] as const)('fault %s on a caller-owned pool: a clear error, the pool still closes, nothing hangs', async (fault, message) => {
    const executor: Executor = createExecutor(2);
    const e = await withinHangGuard(
      settle(simulate(linearPair, { samples: 500_000, executor, seed: 'fault', fault: { chunk: 3, fault } })),
      120_000,
      'the faulted run',
    );
    // The error is the pool's ChunkError with the worker's failure as its cause (pool.ts), one line.
    expect(e).toBeInstanceOf(Error);
    expect((e as Error).name).toBe('ChunkError');
    expect((e as Error).message).toMatch(message);
    expect((e as Error).message).not.toContain('\n');
    expect((e as Error & { cause?: unknown }).cause).toBeInstanceOf(Error);
    // The caller's pool survives the fault well enough to be closed (and the run did not close it).
    expect(executor.liveThreads()).toBeGreaterThan(0);
    await withinHangGuard(executor.close(), 60_000, 'closing the pool');
    expect(executor.liveThreads()).toBe(0);
    await allWorkersExited();
    // Two workers are this thread and a pool of one; the pool did start (the fault runs there),
    // and a thread that exited is replaced by piscina, so at least two started for 'exit'.
    expect(started.length).toBeGreaterThanOrEqual(fault === 'exit' ? 2 : 1);
    expect(workerResources()).toEqual([]);
  });

  it.each(['exit', 'throw'] as const)('fault %s when simulate owns its pool: rejects and leaves no thread alive', async (fault) => {
    const e = await withinHangGuard(
      settle(simulate(linearPair, { samples: 500_000, workers: 2, seed: 'fault-own', fault: { chunk: 1, fault } })),
      120_000,
      'the faulted run',
    );
    expect((e as Error).name).toBe('ChunkError');
    await allWorkersExited();
    // A run that owns its pool is one of its workers itself: 2 workers are this thread and a
    // pool of one (pool.ts, startingPoolExecutor), so at least one thread started (a crashed
    // one is replaced by piscina).
    expect(started.length).toBeGreaterThanOrEqual(1);
    expect(workerResources()).toEqual([]);
  });
});

describe('cancellation through the API', () => {
  beforeEach(() => {
    started.length = 0;
  });

  /**
   * Aborts `ac` from inside the run, from its progress callback, once `chunks` chunks are done;
   * remembers the count then and the largest count reported afterwards.
   */
  const abortAfter = (ac: AbortController, chunks: number): { onProgress: (done: number) => void; atAbort: () => number; last: () => number } => {
    let at = -1;
    let last = 0;
    return {
      onProgress: (done) => {
        last = Math.max(last, done);
        if (at < 0 && done >= chunks * 65_536) {
          at = done;
          ac.abort();
        }
      },
      atAbort: () => at,
      last: () => last,
    };
  };
  // After the abort at most one more chunk per worker can be reported: a result that had already
  // arrived when the abort was made; a chunk still running in a pool thread is answered with
  // the AbortError at once, and its result, when it comes, is dropped.
  const PER_WORKER = 65_536;

  it('an aborted simulate rejects with an AbortError, and its own pool is gone afterwards', async () => {
    const ac = new AbortController();
    const probe = abortAfter(ac, 2);
    const e = await withinHangGuard(
      settle(simulate(linearPair, { samples: 1e9, workers: 2, signal: ac.signal, onProgress: probe.onProgress })),
      120_000,
      'the aborted run',
    );
    expect((e as Error).name).toBe('AbortError');
    // Event order, not time: the abort came after 2 chunks at least, and at most one more chunk
    // per worker (2) was reported after it.
    expect(probe.atAbort()).toBeGreaterThanOrEqual(2 * 65_536);
    expect(probe.last() - probe.atAbort()).toBeLessThanOrEqual(2 * PER_WORKER);
    await allWorkersExited();
    // Two workers are this thread and at most one pool thread, which an abort does not end (its
    // chunk is dropped, not killed), so at most one started. None may have started at all: the
    // first chunks run in this thread until the pool's thread is ready, so a run aborted early
    // can finish before any thread starts.
    expect(started.length).toBeLessThanOrEqual(1);
    expect(workerResources()).toEqual([]);
  });

  it('partialOnAbort: the finished chunks, marked partial, with a caller pool that then closes to 0 threads', async () => {
    const executor = createExecutor(2);
    const ac = new AbortController();
    const probe = abortAfter(ac, 3);
    const r = await withinHangGuard(
      simulate(linearPair, { samples: 1e9, executor, signal: ac.signal, partialOnAbort: true, seed: 'partial', onProgress: probe.onProgress }),
      120_000,
      'the aborted run',
    );
    expect(r.partial).toBe(true);
    // The chunks consumed by the abort, and at most one more per worker (exact integer checks).
    expect(r.evaluated % 65_536).toBe(0);
    expect(r.evaluated).toBeGreaterThanOrEqual(probe.atAbort());
    expect(probe.atAbort()).toBeGreaterThanOrEqual(3 * 65_536);
    expect(r.evaluated - probe.atAbort()).toBeLessThanOrEqual(2 * PER_WORKER);
    await executor.close();
    expect(executor.liveThreads()).toBe(0);
    await allWorkersExited();
  });

  it('an aborted estimateHighSigma on its own pool rejects and leaves no thread alive', async () => {
    const ac = new AbortController();
    const probe = abortAfter(ac, 1);
    // 6 sigma at 1% relative error with a fixed 1e8 samples: far too long to finish, uses a pool.
    const d = { ...linearPair, spec: { offset: 6 * 3.5355e-4, instances: 1 } };
    const e = await withinHangGuard(
      settle(estimateHighSigma(d, { samples: 1e8, workers: 2, signal: ac.signal, onProgress: probe.onProgress })),
      120_000,
      'the aborted tail',
    );
    expect((e as Error).name).toBe('AbortError');
    // The abort was made from inside the sampling, after the first chunk (exact count).
    expect(probe.atAbort()).toBeGreaterThanOrEqual(65_536);
    expect(probe.last() - probe.atAbort()).toBeLessThanOrEqual(2 * PER_WORKER);
    // It did open a pool (the fixed 1e8 samples are far past the in-thread threshold): with two
    // workers, one pool thread beside this one.
    expect(started.length).toBeGreaterThanOrEqual(1);
    await allWorkersExited();
    expect(workerResources()).toEqual([]);
  });
});

/** The chunk probe's report (test/support/chunkProbe.mjs): chunks finished at SIGINT and at exit. */
function probeCounts(stderr: string): { atSigint: number; atExit: number } {
  const m = /^probe: sigint (-?\d+) exit (\d+)$/m.exec(stderr);
  if (m === null) throw new Error(`no probe report in stderr:\n${stderr}`);
  return { atSigint: Number(m[1]), atExit: Number(m[2]) };
}

/** stderr without the probe's own lines. */
const withoutProbe = (stderr: string): string => stderr.split('\n').filter((l) => !l.startsWith('probe: ')).join('\n');

/**
 * Runs a long CLI command with the chunk probe and sends SIGINT as soon as the probe reports the
 * first finished chunk: an event, not a delay, so the run is under way however loaded the machine.
 */
function interruptedCli(args: readonly string[]): Promise<CliResult> {
  let sent = false;
  return runCli(args, {
    timeoutMs: 120_000,
    nodeArgs: ['--import', PROBE],
    onStderr: (text, child) => {
      if (!sent && text.includes('probe: first chunk done')) {
        sent = true;
        child.kill('SIGINT');
      }
    },
  });
}

describe('SIGINT during a long CLI run', () => {
  // Promptness as an order of events (timings are in `pnpm bench`): after SIGINT at most one
  // more chunk per worker may finish, the one each was running if its result was already on
  // its way; the aborts end the others. 2 workers: at most 2 chunks after the signal.
  it.each([
    ['text', [] as string[]],
    ['json', ['--json']],
  ] as const)('%s output: stops within 2 more chunks, prints the finished chunks marked partial, exit code 130', async (_kind, extra) => {
    const r = await interruptedCli(['run', 'examples/comparator-demo.yaml', '--samples', '1e9', '--workers', '2', ...extra]);
    const { atSigint, atExit } = probeCounts(r.stderr);
    expect(atSigint).toBeGreaterThanOrEqual(1);
    expect(atExit - atSigint).toBeLessThanOrEqual(2);
    // Exit code 130 for an interrupted run (main.ts EXIT.interrupted; shell convention 128 + SIGINT).
    expect(r.signal).toBeNull();
    expect(r.code).toBe(130);
    expect(r.stderr).not.toContain('internal error');
    let evaluated: number;
    if (extra.length === 0) {
      expect(r.stdout).toContain('PARTIAL');
      const m = /Monte Carlo on the exact model: (\d+) samples/.exec(r.stdout);
      expect(m).not.toBeNull();
      evaluated = Number(m![1]);
    } else {
      const report = JSON.parse(r.stdout) as { partial: boolean; evaluated: number; samples: number; offset: { sigma: number } };
      expect(report.partial).toBe(true);
      expect(report.evaluated).toBeLessThan(report.samples);
      evaluated = report.evaluated;
      // The partial statistics are real statistics: the demo's linearised sigma is 3.85049 mV,
      // computed independently by test/fixtures/demo_sigma.py (Kinget's mirror form, IEEE JSSC
      // 40(6), 2005, with the EKV gm/I_D, AICSP 8, 1995). Tolerance: 4 standard errors of a
      // sample sigma, sigma / sqrt(2 (N - 1)), plus 1% for the offset's departure from the
      // linearised model at these small mismatches (common practice, no source).
      const se = 1 / Math.sqrt(2 * (report.evaluated - 1));
      expect(Math.abs(report.offset.sigma / 3.85049e-3 - 1)).toBeLessThan(4 * se + 0.01);
    }
    // Whole chunks only, at least one (exact integer checks). The probe sees the pool's chunks
    // only: the first chunks run in the calling thread while the pool's threads start, so the
    // report may hold more chunks than the probe counted.
    expect(evaluated % 65_536).toBe(0);
    expect(evaluated).toBeGreaterThan(0);
  });

  it('tail: SIGINT during a long high-sigma run ends with exit code 130 and a one-line note, not an internal error', async () => {
    const r = await interruptedCli(['tail', 'examples/comparator-demo.yaml', '--samples', '1e9', '--workers', '2']);
    const { atSigint, atExit } = probeCounts(r.stderr);
    expect(atSigint).toBeGreaterThanOrEqual(1);
    expect(atExit - atSigint).toBeLessThanOrEqual(2); // as above: at most one more chunk per worker
    // Exit code 130 is what main.ts documents for an interrupted run (EXIT.interrupted).
    expect(r.code).toBe(130);
    const own = withoutProbe(r.stderr);
    expect(own).not.toContain('internal error');
    expect(own.trimEnd().split('\n').at(-1)!.startsWith('twinfet: ')).toBe(true);
  });
});

import { once } from 'node:events';
import { availableParallelism } from 'node:os';
import type { Worker } from 'node:worker_threads';
import { createRequire } from 'node:module';
import type { Piscina as PiscinaPool } from 'piscina';
import type { ChunkResult, ChunkTask, WorkerReply } from './messages.js';
import { runChunk } from './chunk.js';

/**
 * Where chunks run: in this thread (workers = 1) or on a piscina pool of worker threads.
 * Either way `run` gives the same bytes for the same task (a chunk is a pure function).
 */
export interface Executor {
  /** Worker threads in use (0 when chunks run in this thread). */
  readonly threads: number;
  /** Runs one chunk; rejects with the worker's error (as `cause`) or an AbortError. */
  run(task: ChunkTask, signal?: AbortSignal): Promise<ChunkResult>;
  /** Frees the threads. Safe to call twice. */
  close(): Promise<void>;
  /** Live worker threads (for tests that check nothing is left running). */
  liveThreads(): number;
}

/** Default worker count: the machine's available parallelism. */
export function defaultWorkers(): number {
  return Math.max(1, availableParallelism());
}

/** An error raised inside a chunk, carried back across the thread boundary as data. */
export class ChunkError extends Error {
  constructor(message: string, options: { cause: unknown }) {
    super(message, options);
    this.name = 'ChunkError';
  }
}

function unwrap(reply: WorkerReply): ChunkResult {
  if (reply.kind === 'error') {
    const cause = new Error(reply.message);
    cause.name = reply.name;
    if (reply.stack !== undefined) cause.stack = reply.stack;
    throw new ChunkError(`a Monte Carlo chunk failed: ${reply.message}`, { cause });
  }
  return reply;
}

function abortError(): Error {
  const e = new Error('the run was cancelled');
  e.name = 'AbortError';
  return e;
}

/** Runs a chunk in this thread after yielding to the event loop; `timed` gets its compute time, ms. */
async function runHere(task: ChunkTask, signal: AbortSignal | undefined, timed?: (ms: number) => void): Promise<ChunkResult> {
  if (signal?.aborted) throw abortError();
  // Yield to the event loop between chunks so that an abort or SIGINT can be seen.
  await new Promise<void>((r) => setImmediate(r));
  if (signal?.aborted) throw abortError();
  const t = performance.now();
  try {
    return runChunk(task);
  } catch (e) {
    const err = e instanceof Error ? e : new Error(String(e));
    throw new ChunkError(`a Monte Carlo chunk failed: ${err.message}`, { cause: err });
  } finally {
    timed?.(performance.now() - t);
  }
}

/** Chunks run in the calling thread: for --workers 1, tests and small jobs. */
export function inThreadExecutor(): Executor {
  return {
    threads: 0,
    run: (task, signal) => runHere(task, signal),
    async close() {},
    liveThreads: () => 0,
  };
}

/** The worker flag that turns off require() of ES modules, where this Node version has it. */
const IMPORT_ONLY = process.allowedNodeEnvironmentFlags.has('--no-experimental-require-module')
  ? ['--no-experimental-require-module']
  : [];
// piscina (and worker_threads under it) is loaded with the first pool, not with this module, so a
// run in one thread, `inspect` or `--version` does not pay for it (about 10 ms of start-up).
let PiscinaClass: typeof PiscinaPool | undefined;
function piscinaClass(): typeof PiscinaPool {
  PiscinaClass ??= (createRequire(import.meta.url)('piscina') as typeof import('piscina')).Piscina;
  return PiscinaClass;
}

/**
 * A piscina pool of `workers` threads. Under vitest (sources) the worker is `worker.ts`, loaded
 * through tsx; built, it is `worker.js`.
 */
export function poolExecutor(workers: number): Executor & { readyThreads(): number } {
  const fromSource = import.meta.url.endsWith('.ts');
  const filename = new URL(fromSource ? './worker.ts' : './worker.js', import.meta.url).href;
  const Piscina = piscinaClass();
  const pool = new Piscina<ChunkTask, WorkerReply>({
    filename,
    minThreads: workers,
    maxThreads: workers,
    idleTimeout: 60_000,
    // Built workers need none of the parent's flags (a loader such as tsx would only slow
    // their start); from sources they need tsx to load TypeScript. Every worker loads its
    // module through import(), never require(): piscina tries require() first, and on Node 20
    // a thread terminated inside require() of an ES module (a replacement thread that close()
    // ends while it is still loading) fails an assertion in module_wrap.cc that aborts the
    // whole process. With require(esm) switched off piscina falls back to import().
    execArgv: [...(fromSource ? ['--import', 'tsx'] : []), ...IMPORT_ONLY],
  });
  let closed = false;
  // Every thread the pool has started, until it exits. piscina 5.3.2 drops a crashed worker, or
  // one whose task was aborted, at once but hears of its exit later; an exit that arrives after
  // destroy() has returned (destroy clears its `destroying` flag) makes it start replacements,
  // threads that outlive the pool. close() therefore waits for the dropped ones first.
  const alive = new Set<Worker>();
  // A thread's first message is piscina's "ready" (sent once it has loaded worker.js).
  const ready = new Set<Worker>();
  const track = (): void => {
    for (const w of pool.threads) {
      if (alive.has(w)) continue;
      alive.add(w);
      w.once('message', () => {
        if (alive.has(w)) ready.add(w);
      });
      w.once('exit', () => {
        alive.delete(w);
        ready.delete(w);
      });
    }
  };
  pool.on('workerCreate', track);
  track();
  return {
    threads: workers,
    async run(task, signal) {
      if (closed) throw new Error('internal: executor used after close');
      track();
      let reply: WorkerReply;
      try {
        reply = await pool.run(task, signal === undefined ? {} : { signal });
      } catch (e) {
        if (signal?.aborted) throw abortError();
        const err = e instanceof Error ? e : new Error(String(e));
        throw new ChunkError(`a worker thread failed: ${err.message}`, { cause: err });
      }
      return unwrap(reply);
    },
    async close() {
      if (closed) return;
      closed = true;
      track();
      const inPool = new Set(pool.threads);
      const dropped = [...alive].filter((w) => !inPool.has(w));
      for (const w of dropped) void w.terminate(); // already asked by piscina; harmless twice
      await Promise.all(dropped.map((w) => (alive.has(w) ? once(w, 'exit') : undefined)));
      await pool.destroy();
      // Replacements started while waiting were in the pool and are gone with it; anything
      // still tracked here would be a thread piscina no longer knows of: end it too.
      track();
      await Promise.all([...alive].map(async (w) => {
        const exited = once(w, 'exit');
        await w.terminate();
        if (alive.has(w)) await exited;
      }));
      pool.off('workerCreate', track);
    },
    liveThreads: () => {
      if (!closed) track();
      return alive.size;
    },
    readyThreads: () => {
      track();
      return closed ? 0 : ready.size;
    },
  };
}

/**
 * One-thread work a job must still have left before a pool is started for it, ms: starting
 * and closing 1-2 threads costs 40-80 ms, which only a longer remainder pays back.
 */
export const POOL_WORTH_MS = 100;

/**
 * An executor for `workers` threads that never makes a job wait for them. Chunks run in this
 * thread until pool threads have loaded, then go to the pool (at most 2 per ready thread in
 * flight, so this thread is left to merge). With `chunks`, the job's chunk count, the pool is
 * started only once the chunks timed here show that the rest would take longer than
 * POOL_WORTH_MS in one thread, so a small job never starts it; without, at the first chunk (an
 * executor shared by many runs). Where a chunk runs changes no result: chunks are pure and are
 * merged in order. A task with an injected fault always goes to the pool (the hook is in the
 * worker).
 */
export function startingPoolExecutor(workers: number, chunks?: number): Executor {
  let pool: ReturnType<typeof poolExecutor> | undefined;
  let closed = false;
  let dispatched = 0;
  // The fastest of the chunks run here (the first one also pays for compiling the hot loops).
  let timedHere = 0;
  let fastestMs = Infinity;
  const timed = (ms: number): void => {
    timedHere++;
    fastestMs = Math.min(fastestMs, ms);
  };
  let inPool = 0;
  // Chunks run here one after another, each in its own turn of the event loop, so that a
  // SIGINT or an abort between two of them is seen before the next starts (lanes waiting on
  // the same turn would otherwise run back to back).
  let hereTail: Promise<unknown> = Promise.resolve();
  const worthStarting = (): boolean => chunks === undefined || (timedHere >= 2 && fastestMs * (chunks - dispatched) > POOL_WORTH_MS);
  return {
    threads: workers,
    async run(task, signal) {
      if (closed) throw new Error('internal: executor used after close');
      dispatched++;
      if (pool === undefined && (task.fault !== undefined || worthStarting())) pool = poolExecutor(workers);
      const ready = pool === undefined ? 0 : pool.readyThreads();
      if (pool !== undefined && (task.fault !== undefined || inPool < 2 * ready)) {
        inPool++;
        try {
          return await pool.run(task, signal);
        } finally {
          inPool--;
        }
      }
      const mine = hereTail.then(() => runHere(task, signal, timed));
      hereTail = mine.catch(() => undefined);
      return mine;
    },
    async close() {
      closed = true;
      await pool?.close();
    },
    liveThreads: () => pool?.liveThreads() ?? 0,
  };
}

/**
 * An executor for `workers` (1 = in this thread). `job.chunks`, when given, lets a small job
 * skip starting the pool (see startingPoolExecutor).
 */
export function createExecutor(workers: number, job: { readonly chunks?: number } = {}): Executor {
  return workers <= 1 ? inThreadExecutor() : startingPoolExecutor(workers, job.chunks);
}

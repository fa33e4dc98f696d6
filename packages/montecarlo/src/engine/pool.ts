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

/** A promise that rejects when `signal` aborts, and a way to stop listening. */
function abortedBy(signal: AbortSignal): { promise: Promise<never>; dispose: () => void } {
  let onAbort = (): void => undefined;
  const promise = new Promise<never>((_, reject) => {
    onAbort = () => reject(abortError());
    signal.addEventListener('abort', onAbort, { once: true });
  });
  promise.catch(() => undefined); // a run that settles first leaves this one unobserved
  return { promise, dispose: () => signal.removeEventListener('abort', onAbort) };
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
    // Two chunks posted to each thread at once, so that a thread starts its next chunk the moment
    // it finishes one. With one, the next is posted only when this thread handles the reply, and
    // when this thread is itself running a chunk (startingPoolExecutor) that waits up to a whole
    // chunk: measured, the pool thread then sat idle a third of the time. piscina runs at most
    // one task with an abort signal per thread, so tasks go without one (see run below).
    concurrentTasksPerWorker: 2,
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
      if (signal?.aborted) throw abortError();
      // The signal is not handed to piscina (which would allow one task per thread and end the
      // thread of an aborted task): the task rejects here at once, and the chunk left running
      // finishes in its thread (one chunk's time) unless close() ends the thread first.
      const abort = signal === undefined ? undefined : abortedBy(signal);
      let reply: WorkerReply;
      try {
        reply = await (abort === undefined ? pool.run(task) : Promise.race([pool.run(task), abort.promise]));
      } catch (e) {
        if (signal?.aborted) throw abortError();
        const err = e instanceof Error ? e : new Error(String(e));
        throw new ChunkError(`a worker thread failed: ${err.message}`, { cause: err });
      } finally {
        abort?.dispose();
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
 * One-thread work a job must still have left before a pool is started for it, ms. A new thread
 * answers its first chunk about 100 ms after it is started (Node's start of the thread, loading
 * the worker module) and runs its first chunks several times slower than this thread, whose hot
 * loops are already compiled; while it does, this thread runs about 5% slower. Measured on a
 * 2-core machine (`pnpm bench --peer`, 2026-12-02), a job left with about 200 ms of work was
 * 30-55 ms slower with a second thread than without; one with about 850 ms was 25% faster.
 */
export const POOL_WORTH_MS = 300;

/**
 * An executor for `workers` threads that never makes a job wait for them. This thread is one
 * of the `workers`: the pool has workers - 1 threads and this thread keeps running chunks
 * beside them (its compiled hot loops are already warm, and on a machine with as many cores as
 * workers no thread waits for a core). Chunks run here until pool threads have loaded, then
 * also go to the pool (at most 2 per ready thread in flight), and here whenever this thread
 * has none queued. With `chunks`, the job's chunk count, the pool is started only once the
 * chunks timed here show that the rest would take longer than POOL_WORTH_MS in one thread, so a
 * small job never starts it (or at once with `startNow`), and at the job's end this thread also
 * runs the oldest chunks still in the pool, taking whichever answer comes first. Without
 * `chunks` (an executor shared by many runs) the pool starts at the first chunk and nothing is
 * run twice (a copy left running in a pool thread would delay the next run). Measured on 2
 * cores with a warm shared executor (2026-12-02), this thread working beside one pool thread
 * ran 6e6 samples 1.57x (simple pair) and 1.75x (mirror stage) faster than one thread, against
 * 1.28x and 1.65x with two pool threads and this thread only dispatching. Where a chunk runs
 * changes no result: chunks are pure and are merged in order. A task with an injected fault
 * always goes to the pool (the hook is in the worker).
 */
export function startingPoolExecutor(workers: number, chunks?: number, startNow = false): Executor {
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
  const poolThreads = Math.max(1, workers - 1);
  if (startNow) pool = poolExecutor(poolThreads);
  // Chunks run here one after another, each in its own turn of the event loop, so that a
  // SIGINT or an abort between two of them is seen before the next starts (lanes waiting on
  // the same turn would otherwise run back to back).
  let hereTail: Promise<unknown> = Promise.resolve();
  let waitingHere = 0;
  const queueHere = (task: ChunkTask, signal: AbortSignal | undefined): Promise<ChunkResult> => {
    waitingHere++;
    const mine = hereTail.then(() => runHere(task, signal, timed)).finally(() => {
      waitingHere--;
      setImmediate(stealIfIdle);
    });
    hereTail = mine.catch(() => undefined);
    return mine;
  };
  // Chunks in the pool, oldest first. When this thread is a worker and has nothing left to run,
  // it runs the oldest of them too and the first answer is taken: a chunk is pure, so both are
  // the same bits, and the job never waits at its end for a thread that is still slow (a fresh
  // thread runs its first chunks many times slower, before its hot loops are compiled).
  const inFlight: { task: ChunkTask; signal: AbortSignal | undefined; settled: boolean; copied: boolean; settle: (r: ChunkResult) => void }[] = [];
  const stealIfIdle = (): void => {
    if (chunks === undefined || closed || waitingHere > 0) return;
    const f = inFlight.find((x) => !x.settled && !x.copied && x.task.fault === undefined && x.signal?.aborted !== true);
    if (f === undefined) return;
    f.copied = true;
    queueHere(f.task, f.signal).then(f.settle, () => undefined); // the pool's own answer or error stands
  };
  const worthStarting = (): boolean => chunks === undefined || (timedHere >= 2 && fastestMs * (chunks - dispatched) > POOL_WORTH_MS);
  return {
    threads: workers,
    async run(task, signal) {
      if (closed) throw new Error('internal: executor used after close');
      dispatched++;
      if (pool === undefined && (task.fault !== undefined || worthStarting())) pool = poolExecutor(poolThreads);
      const ready = pool === undefined ? 0 : pool.readyThreads();
      // To the pool while it has room; here otherwise, or when this thread has nothing queued,
      // so that it is never idle while the pool is busy.
      const here = pool !== undefined && waitingHere === 0 && task.fault === undefined;
      if (pool !== undefined && (task.fault !== undefined || (!here && inPool < 2 * ready))) {
        inPool++;
        const running = pool;
        return new Promise<ChunkResult>((resolve, reject) => {
          const entry = {
            task,
            signal,
            settled: false,
            copied: false,
            settle: (r: ChunkResult): void => {
              if (entry.settled) return;
              entry.settled = true;
              inFlight.splice(inFlight.indexOf(entry), 1);
              resolve(r);
            },
          };
          inFlight.push(entry);
          // inPool drops before the answer is passed on, so that the lane it wakes sees the room.
          running.run(task, signal).then(
            (r) => {
              inPool--;
              entry.settle(r);
            },
            (e: unknown) => {
              inPool--;
              if (entry.settled) return;
              entry.settled = true;
              inFlight.splice(inFlight.indexOf(entry), 1);
              reject(e);
            },
          );
          setImmediate(stealIfIdle);
        });
      }
      return queueHere(task, signal);
    },
    async close() {
      closed = true;
      await pool?.close();
    },
    liveThreads: () => pool?.liveThreads() ?? 0,
  };
}

/**
 * Samples from which a caller that knows the sample count before it has the design (the `run`
 * command) starts the pool threads at once (`createExecutor(..., { startNow: true })`), so that
 * they load while the design is read and compiled instead of after the first chunks are timed.
 * At 4e6 samples even the cheapest stage (the simple pair, about 2.3 ms a chunk) holds 140 ms
 * of one-thread work. Measured (2 cores, 2026-12-02): 40 ms saved on a 6e6-sample mirror run
 * (0.72 -> 0.68 s), none lost on a 6e6-sample simple pair, while a 1.5e6-sample simple pair
 * lost 50 ms to a thread started that early, which is why smaller runs wait for the timing.
 */
export const EAGER_POOL_SAMPLES = 4_000_000;

/**
 * An executor for `workers` (1 = in this thread). `job.chunks`, when given, lets a small job
 * skip starting the pool (see startingPoolExecutor); `job.startNow` starts the pool threads at
 * once instead, for a caller that knows the job is large before it has the design (see
 * EAGER_POOL_SAMPLES): the threads then load while the caller reads and compiles the design.
 */
export function createExecutor(workers: number, job: { readonly chunks?: number; readonly startNow?: boolean } = {}): Executor {
  return workers <= 1 ? inThreadExecutor() : startingPoolExecutor(workers, job.chunks, job.startNow === true);
}

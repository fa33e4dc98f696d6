import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
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

/** Chunks run in the calling thread: for --workers 1, tests and small jobs. */
export function inThreadExecutor(): Executor {
  return {
    threads: 0,
    async run(task, signal) {
      if (signal?.aborted) throw abortError();
      // Yield to the event loop between chunks so that an abort or SIGINT can be seen.
      await new Promise<void>((r) => setImmediate(r));
      if (signal?.aborted) throw abortError();
      try {
        return runChunk(task);
      } catch (e) {
        const err = e instanceof Error ? e : new Error(String(e));
        throw new ChunkError(`a Monte Carlo chunk failed: ${err.message}`, { cause: err });
      }
    },
    async close() {},
    liveThreads: () => 0,
  };
}

/**
 * A piscina pool of `workers` threads. Under vitest (sources) the worker is `worker.ts`, loaded
 * through tsx; built, it is `worker.js`.
 */
export function poolExecutor(workers: number): Executor {
  const fromSource = import.meta.url.endsWith('.ts');
  const filename = new URL(fromSource ? './worker.ts' : './worker.js', import.meta.url).href;
  const pool = new Piscina<ChunkTask, WorkerReply>({
    filename,
    minThreads: workers,
    maxThreads: workers,
    idleTimeout: 60_000,
    // Built workers need none of the parent's flags (a loader such as tsx would only slow
    // their start); from sources they need tsx to load TypeScript.
    execArgv: fromSource ? ['--import', 'tsx'] : [],
  });
  let closed = false;
  return {
    threads: workers,
    async run(task, signal) {
      if (closed) throw new Error('internal: executor used after close');
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
      await pool.destroy();
    },
    liveThreads: () => (closed ? 0 : pool.threads.length),
  };
}

/** An executor for `workers` (1 = in this thread). */
export function createExecutor(workers: number): Executor {
  return workers <= 1 ? inThreadExecutor() : poolExecutor(workers);
}

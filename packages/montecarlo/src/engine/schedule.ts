import type { ChunkResult, ChunkTask, ImportanceResult, ImportanceTask, MonteCarloResult, MonteCarloTask } from './messages.js';
import type { Executor } from './pool.js';

/** Samples per chunk: big enough that a worker round trip (~50 us) is noise. */
export const CHUNK_SIZE = 65_536;

/** Number of fixed-size chunks for `samples`; the last may be short. */
export function chunkCount(samples: number, chunkSize = CHUNK_SIZE): number {
  return Math.ceil(samples / chunkSize);
}

/** Samples in chunk `index` of a run of `samples`. */
export function chunkLength(samples: number, index: number, chunkSize = CHUNK_SIZE): number {
  return Math.min(chunkSize, samples - index * chunkSize);
}

/**
 * Thrown by `runChunks` when cancelled. By then `consume` has seen chunks 0..chunksDone-1, the
 * contiguous finished prefix, so a partial answer built from them is repeatable.
 */
export class RunAborted extends Error {
  readonly chunksDone: number;
  constructor(chunksDone: number) {
    super('the run was cancelled');
    this.name = 'AbortError';
    this.chunksDone = chunksDone;
  }
}

/** The result a task of kind T answers with. */
export type ResultOf<T extends ChunkTask> = T extends MonteCarloTask ? MonteCarloResult : T extends ImportanceTask ? ImportanceResult : never;

/**
 * The tasks of a run, made on demand so that a 1e12-sample run never holds millions of task
 * objects: `at(i)` for i < length, and the samples they hold in all.
 */
export interface TaskList<T extends ChunkTask> {
  readonly length: number;
  readonly at: (index: number) => T;
  readonly samples: number;
}

/** A task list over tasks made already. */
export function taskList<T extends ChunkTask>(tasks: readonly T[]): TaskList<T> {
  return { length: tasks.length, at: (i) => tasks[i]!, samples: tasks.reduce((a, t) => a + t.count, 0) };
}

/**
 * Runs the tasks on the executor, at most 2 per thread in flight, and hands the results to
 * `consume` strictly in chunk order (so floating-point merges are the same for any number of
 * workers). Cancels on `signal`: throws RunAborted with the finished prefix.
 */
export async function runChunks<T extends ChunkTask>(
  executor: Executor,
  tasks: TaskList<T>,
  consume: (r: ResultOf<T>) => void,
  options: { signal?: AbortSignal | undefined; onProgress?: ((done: number, total: number) => void) | undefined } = {},
): Promise<void> {
  const { signal, onProgress } = options;
  const inFlight = Math.max(1, executor.threads * 2);
  const pending = new Map<number, ResultOf<T>>();
  let next = 0;
  let nextToConsume = 0;
  let samplesDone = 0;
  const samplesTotal = tasks.samples;
  let failure: unknown;
  let aborted = false;

  const local = new AbortController();
  const onAbort = (): void => local.abort();
  signal?.addEventListener('abort', onAbort, { once: true });
  if (signal?.aborted) local.abort();

  const lane = async (): Promise<void> => {
    while (next < tasks.length && failure === undefined && !local.signal.aborted) {
      const index = next++;
      const task = tasks.at(index);
      let r: ResultOf<T>;
      try {
        r = answerOf(task, await executor.run(task, local.signal));
      } catch (e) {
        if (local.signal.aborted && failure === undefined) aborted = true;
        else if (failure === undefined) {
          failure = e;
          local.abort(); // stop the other lanes' tasks too
        }
        return;
      }
      pending.set(index, r);
      while (pending.has(nextToConsume)) {
        const res = pending.get(nextToConsume)!;
        pending.delete(nextToConsume);
        consume(res);
        samplesDone += res.count;
        nextToConsume++;
      }
      onProgress?.(samplesDone, samplesTotal);
    }
  };

  try {
    await Promise.all(Array.from({ length: Math.min(inFlight, tasks.length) }, lane));
  } finally {
    signal?.removeEventListener('abort', onAbort);
  }
  if (failure !== undefined) throw failure;
  if (aborted || (signal?.aborted ?? false)) {
    if (nextToConsume < tasks.length) throw new RunAborted(nextToConsume);
  }
}

/** The result, checked to be of the task's kind (a mismatch is a bug, never a user error). */
function answerOf<T extends ChunkTask>(task: T, r: ChunkResult): ResultOf<T> {
  if (r.kind !== task.kind || r.chunk !== task.chunk) throw new Error(`internal: chunk ${task.chunk} (${task.kind}) answered as chunk ${r.chunk} (${r.kind})`);
  return r as ResultOf<T>;
}

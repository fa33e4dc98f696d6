import type { ChunkResult, ChunkTask } from './messages.js';
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

/**
 * Runs the tasks on the executor, at most 2 per thread in flight, and hands the results to
 * `consume` strictly in chunk order (so floating-point merges are the same for any number of
 * workers). Cancels on `signal`: throws RunAborted with the finished prefix.
 */
export async function runChunks(
  executor: Executor,
  tasks: readonly ChunkTask[] | { readonly length: number; readonly at: (index: number) => ChunkTask; readonly samples: number },
  consume: (r: ChunkResult) => void,
  options: { signal?: AbortSignal | undefined; onProgress?: ((done: number, total: number) => void) | undefined } = {},
): Promise<void> {
  const { signal, onProgress } = options;
  const inFlight = Math.max(1, executor.threads * 2);
  const pending = new Map<number, ChunkResult>();
  let next = 0;
  let nextToConsume = 0;
  let samplesDone = 0;
  // Tasks may be made on demand, so a 1e12-sample run never holds millions of task objects.
  const taskAt = Array.isArray(tasks) ? (i: number) => (tasks as readonly ChunkTask[])[i]! : (tasks as { at: (i: number) => ChunkTask }).at;
  const samplesTotal = Array.isArray(tasks) ? (tasks as readonly ChunkTask[]).reduce((a, t) => a + t.count, 0) : (tasks as { samples: number }).samples;
  let failure: unknown;
  let aborted = false;

  const local = new AbortController();
  const onAbort = (): void => local.abort();
  signal?.addEventListener('abort', onAbort, { once: true });
  if (signal?.aborted) local.abort();

  const lane = async (): Promise<void> => {
    while (next < tasks.length && failure === undefined && !local.signal.aborted) {
      const index = next++;
      let r: ChunkResult;
      try {
        r = await executor.run(taskAt(index), local.signal);
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

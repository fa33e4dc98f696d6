import type { Io } from './output.js';
import { progressBar } from './progress.js';

/**
 * Runs a long job with Ctrl-C wired to an AbortSignal and a progress bar on stderr (a terminal
 * only). Resolves to the job's value, or to `interrupted` when SIGINT aborted it and the job
 * rejected; a job that returns a partial answer on abort resolves to that value.
 */
export async function withInterrupt<T>(
  io: Io,
  label: string,
  work: (signal: AbortSignal, onProgress: (done: number, total: number) => void) => Promise<T>,
): Promise<{ readonly value: T } | { readonly interrupted: true }> {
  const ac = new AbortController();
  const onSigint = (): void => ac.abort();
  process.once('SIGINT', onSigint);
  const bar = progressBar(io, label);
  try {
    return { value: await work(ac.signal, bar.update) };
  } catch (e) {
    if (ac.signal.aborted) return { interrupted: true };
    throw e;
  } finally {
    bar.stop();
    process.removeListener('SIGINT', onSigint);
  }
}

import { move, transferableSymbol, valueSymbol } from 'piscina';
import { runChunk } from './chunk.js';
import type { ChunkTask, WorkerReply } from './messages.js';

/**
 * Worker-thread entry: runs one chunk and answers with its result, its typed arrays moved (not
 * copied), or with the error as data so the main thread can re-throw it with its cause.
 */
export default function work(task: ChunkTask): WorkerReply {
  if (task.fault !== undefined && process.env['TWINFET_TEST_FAULTS'] === '1') {
    if (task.fault === 'exit') process.exit(70);
    if (task.fault === 'throw') throw new Error('injected worker fault (test hook)');
  }
  try {
    const result = runChunk(task);
    const buffers: ArrayBuffer[] = [];
    const atConditions = result.kind === 'montecarlo' ? result.conditions : undefined;
    const arrays = [
      result.histogram?.counts,
      result.offsets,
      result.draws,
      atConditions?.drift?.histogram.counts,
      atConditions?.drift?.values,
      ...(atConditions?.perCondition.map((c) => c.figures) ?? []),
    ];
    for (const a of arrays) {
      if (a !== undefined) buffers.push(a.buffer as ArrayBuffer);
    }
    // piscina's Transferable protocol: the buffers listed are moved, the value is what arrives.
    return move({ [transferableSymbol]: buffers, [valueSymbol]: result } as never) as unknown as WorkerReply;
  } catch (e) {
    const err = e instanceof Error ? e : new Error(String(e));
    return { kind: 'error', name: err.name, message: err.message, ...(err.stack === undefined ? {} : { stack: err.stack }) };
  }
}

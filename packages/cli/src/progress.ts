import cliProgress from 'cli-progress';
import type { Io } from './output.js';

/**
 * A progress bar on stderr, shown only when stderr is a terminal and the job is long enough
 * to be worth it (started lazily after `delayMs`). Returns the callback and a stop function.
 */
export function progressBar(io: Io, label: string, delayMs = 800): { update: (done: number, total: number) => void; stop: () => void } {
  if (!io.errIsTty) return { update: () => {}, stop: () => {} };
  const started = Date.now();
  let bar: cliProgress.SingleBar | undefined;
  return {
    update(done, total) {
      if (bar === undefined) {
        if (Date.now() - started < delayMs || done >= total) return;
        bar = new cliProgress.SingleBar(
          { format: `${label} [{bar}] {percentage}% | {value}/{total} samples | eta {eta_formatted}`, stream: process.stderr, hideCursor: true, clearOnComplete: true },
          cliProgress.Presets.shades_classic,
        );
        bar.start(total, done);
      }
      bar.update(done);
    },
    stop() {
      bar?.stop();
      bar = undefined;
    },
  };
}

import type cliProgressModule from 'cli-progress';
import type { Io } from './output.js';

/**
 * A progress bar on stderr, shown only when stderr is a terminal and the job is long enough
 * to be worth it (started lazily after `delayMs`). Returns the callback and a stop function.
 */
export function progressBar(io: Io, label: string, delayMs = 800): { update: (done: number, total: number) => void; stop: () => void } {
  if (!io.errIsTty) return { update: () => {}, stop: () => {} };
  const started = Date.now();
  // Loaded only for a terminal, while the job starts; the bar appears after `delayMs` anyway.
  let cliProgress: typeof cliProgressModule | undefined;
  void import('cli-progress').then((m) => (cliProgress = m.default));
  let bar: cliProgressModule.SingleBar | undefined;
  return {
    update(done, total) {
      if (bar === undefined) {
        if (cliProgress === undefined || Date.now() - started < delayMs || done >= total) return;
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

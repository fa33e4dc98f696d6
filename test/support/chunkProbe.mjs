/**
 * Test probe preloaded into a CLI child (`node --import ./test/support/chunkProbe.mjs ...`):
 * counts the chunks the worker pool finishes, in the child's own order of events, so that a
 * test can check what happened after SIGINT without timing anything.
 *
 * It writes to stderr, each on its own line starting "probe: ":
 *   "probe: first chunk done"      once, when the first chunk given to the pool has finished
 *                                  (the run is under way, the command's SIGINT handler is
 *                                  installed, and, chunks being given out in order, the finished
 *                                  prefix that a partial report is made of is not empty);
 *   "probe: sigint <a> exit <b>"   at exit: chunks finished when SIGINT arrived, and in all.
 * Every chunk of the pool goes through Piscina.prototype.run, which is wrapped here (piscina is
 * resolved from the montecarlo package, as the library itself resolves it).
 */
import { createRequire } from 'node:module';

const require = createRequire(new URL('../../packages/montecarlo/package.json', import.meta.url));
const { Piscina } = require('piscina');

let done = 0;
let atSigint = -1;
let first;
const run = Piscina.prototype.run;
Piscina.prototype.run = function probedRun(task, ...rest) {
  const result = run.call(this, task, ...rest);
  first ??= task?.chunk;
  result.then(
    () => {
      done++;
      if (task?.chunk === first) process.stderr.write('probe: first chunk done\n');
    },
    () => {},
  );
  return result;
};
// Registered before the command's own handler, so it sees the count the command saw.
process.on('SIGINT', () => {
  if (atSigint < 0) atSigint = done;
});
process.on('exit', () => {
  process.stderr.write(`probe: sigint ${atSigint} exit ${done}\n`);
});

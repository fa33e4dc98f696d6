/**
 * How busy the machine's cores are with other work (part of `pnpm bench`): a fixed integer loop
 * (2e7 steps of a xorshift, no memory traffic), timed in a fresh process pinned to each core in
 * turn with `taskset` where it exists, best and worst of 20 runs of the loop.
 *
 * On a shared virtual machine a core can be slowed by load that no process here can see (on
 * 2026-12-03 one of the two cores ran this loop in 34 ms and the other in 47-52 ms, and a
 * simple-pair chunk pinned there took 64-82 ns a sample instead of 51): every other figure of
 * the benchmark is only as good as these. Equal best times on every core, and worst times close
 * to them, mean the figures around them were taken on a quiet machine.
 */
import { spawnSync } from 'node:child_process';
import { availableParallelism } from 'node:os';

const LOOP = `
function work() {
  let x = 1, y = 2, s = 0;
  for (let i = 0; i < 2e7; i++) { const t = x ^ (x << 11); x = y; y = y ^ (y >>> 19) ^ t ^ (t >>> 8); s = (s + y) | 0; }
  return s;
}
for (let i = 0; i < 3; i++) work();
const t = [];
for (let r = 0; r < 20; r++) { const a = performance.now(); work(); t.push(performance.now() - a); }
t.sort((a, b) => a - b);
console.log(t[0].toFixed(1) + ' ' + t[t.length - 1].toFixed(1));
`;

/** Whether `taskset` can pin a process here. */
function canPin(): boolean {
  return spawnSync('taskset', ['-c', '0', 'true']).status === 0;
}

/** One line per core: the loop's best and worst time there, ms. */
export function hostFigures(label: string): void {
  const cores = availableParallelism();
  const pin = canPin();
  const parts: string[] = [];
  for (let c = 0; c < (pin ? cores : 1); c++) {
    const args = ['-e', LOOP];
    const r = pin ? spawnSync('taskset', ['-c', String(c), process.execPath, ...args], { encoding: 'utf8' }) : spawnSync(process.execPath, args, { encoding: 'utf8' });
    if (r.status !== 0) throw new Error(`host loop failed: ${r.stderr}`);
    const [best, worst] = r.stdout.trim().split(' ');
    parts.push(`${pin ? `core ${c}` : 'unpinned'} ${best}-${worst} ms`);
  }
  console.log(`host (${label}): a fixed integer loop, best-worst of 20, ${parts.join(', ')}${pin ? '' : ' (taskset not found: not pinned)'}`);
}

/**
 * Start-up of the command line (part of `pnpm bench`): wall time of whole processes, Node's
 * own start included, best and median of several runs, interleaved.
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../../../', import.meta.url));
const bin = `${root}packages/cli/bin/twinfet.js`;

/** Prints the start-up figures. */
export function startupFigures(rounds = 9): void {
  const cases = [
    { label: 'node -e 0 (Node alone)', args: ['-e', '0'] },
    { label: 'twinfet --version', args: [bin, '--version'] },
    ...['weak-inversion-wta', 'comparator-demo'].map((e) => ({
      label: `twinfet run ${e} --samples 1000 --json`,
      args: [bin, 'run', `${root}examples/${e}.yaml`, '--samples', '1000', '--json'],
    })),
  ];
  const times = cases.map(() => [] as number[]);
  for (let k = 0; k < rounds; k++) {
    cases.forEach((c, i) => {
      const t = performance.now();
      const r = spawnSync(process.execPath, c.args, { encoding: 'utf8' });
      if (r.status !== 0) throw new Error(`${c.label} failed: ${r.stderr}`);
      times[i]!.push((performance.now() - t) / 1000);
    });
  }
  console.log(`start-up: whole processes, best and median of ${rounds}, interleaved`);
  cases.forEach((c, i) => {
    const s = times[i]!.sort((a, b) => a - b);
    console.log(`  ${c.label.padEnd(52)} ${s[0]!.toFixed(3)} s best, ${s[Math.floor(s.length / 2)]!.toFixed(3)} s median`);
  });
}

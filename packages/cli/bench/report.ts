/**
 * Report benchmark (part of `pnpm bench`): wall time of `twinfet report` on each example design
 * at 1e6 Monte Carlo samples, through the CLI with Node start-up included, best and median of
 * three runs, and the analyses' own time from the page's data. It prints figures and asserts
 * nothing; the target is at most 3 s on this 2-core machine.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../../../', import.meta.url));
const bin = join(root, 'packages/cli/bin/twinfet.js');
const EXAMPLES = ['comparator-demo', 'sense-amp-pmos', 'weak-inversion-wta'];

/** Runs the report benchmark and prints one line per design. */
export function reportBench(quick: boolean): void {
  const samples = quick ? '1e5' : '1e6';
  const dir = mkdtempSync(join(tmpdir(), 'twinfet-bench-report-'));
  try {
    console.log('');
    console.log(`report: twinfet report at ${samples} samples (wall time through the CLI, Node start-up included; 3 runs)`);
    for (const name of EXAMPLES) {
      const times: number[] = [];
      let analyses = 0;
      let kb = 0;
      for (let i = 0; i < 3; i++) {
        const out = join(dir, `${name}.html`);
        const t = performance.now();
        const text = execFileSync(process.execPath, [bin, 'report', join(root, `examples/${name}.yaml`), '--out', out, '--samples', samples, '--seed', `bench-${i}`], { encoding: 'utf8' });
        times.push(performance.now() - t);
        const m = /, (\d+) kB \(.*, ([\d.]+) s\)/.exec(text);
        if (m === null) throw new Error(`unexpected report output: ${text}`);
        kb = Number(m[1]);
        analyses = Math.max(analyses, Number(m[2]));
      }
      times.sort((a, b) => a - b);
      console.log(`${name.padStart(20)}  best ${(times[0]! / 1000).toFixed(2)} s, median ${(times[1]! / 1000).toFixed(2)} s, worst ${(times[2]! / 1000).toFixed(2)} s; analyses up to ${analyses.toFixed(2)} s; page ${kb} kB`);
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[1] !== undefined && fileURLToPath(import.meta.url) === process.argv[1]) reportBench(process.argv.includes('--quick'));

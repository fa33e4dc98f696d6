/**
 * Report benchmark (part of `pnpm bench`): `twinfet report` on each example design at 1e6 Monte
 * Carlo samples through the CLI, Node start-up included, three runs. It prints the wall time and
 * the process's CPU time (user + system, every thread): one thread of the process is always
 * running (the main thread waits only on its own workers), so on an otherwise idle machine the
 * wall time is at most the CPU time, and the CPU time is the figure that does not depend on what
 * else the shared machine is doing. It asserts nothing; the target is at most 3 s.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../../../', import.meta.url));
const bin = join(root, 'packages/cli/bin/twinfet.js');
const EXAMPLES = ['comparator-demo', 'comparator-conditions', 'resistor-pair', 'sense-amp-pmos', 'weak-inversion-wta'];
/** GNU time reports a child's CPU time; without it only the wall time is printed. */
const TIME = '/usr/bin/time';

interface Timing {
  wall: number;
  cpu: number | null;
  analyses: number;
  kb: number;
}

function once(name: string, samples: string, out: string, seed: string): Timing {
  const args = [bin, 'report', join(root, `examples/${name}.yaml`), '--out', out, '--samples', samples, '--seed', seed];
  const t = performance.now();
  let text: string;
  let cpu: number | null = null;
  if (existsSync(TIME)) {
    const r = spawnSync(TIME, ['-f', 'cpu %U %S', process.execPath, ...args], { encoding: 'utf8' });
    if (r.status !== 0) throw new Error(`report failed: ${r.stderr}`);
    text = r.stdout;
    const m = /cpu ([\d.]+) ([\d.]+)\s*$/.exec(r.stderr);
    if (m !== null) cpu = Number(m[1]) + Number(m[2]);
  } else {
    text = execFileSync(process.execPath, args, { encoding: 'utf8' });
  }
  const wall = (performance.now() - t) / 1000;
  const m = /, (\d+) kB \(.*, ([\d.]+) s\)/.exec(text);
  if (m === null) throw new Error(`unexpected report output: ${text}`);
  return { wall, cpu, analyses: Number(m[2]), kb: Number(m[1]) };
}

/** Runs the report benchmark and prints one line per design. */
export function reportBench(quick: boolean): void {
  const samples = quick ? '1e5' : '1e6';
  const dir = mkdtempSync(join(tmpdir(), 'twinfet-bench-report-'));
  try {
    console.log('');
    console.log(`report: twinfet report at ${samples} samples through the CLI, Node start-up included; best and median of 3 runs (load average ${loadavg()[0]!.toFixed(1)})`);
    for (const name of EXAMPLES) {
      const runs = [0, 1, 2].map((i) => once(name, samples, join(dir, `${name}.html`), `bench-${i}`));
      const sorted = (xs: number[]): number[] => [...xs].sort((a, b) => a - b);
      const wall = sorted(runs.map((r) => r.wall));
      const cpus = runs.every((r) => r.cpu !== null) ? sorted(runs.map((r) => r.cpu!)) : null;
      const cpuText = cpus === null ? '' : `; CPU ${cpus[0]!.toFixed(2)} s, median ${cpus[1]!.toFixed(2)} s`;
      console.log(`${name.padStart(20)}  wall ${wall[0]!.toFixed(2)} s, median ${wall[1]!.toFixed(2)} s${cpuText}; page ${runs[0]!.kb} kB`);
    }
    console.log('  On an idle machine the wall time is at most the CPU time (one of the process\'s threads always runs).');
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[1] !== undefined && fileURLToPath(import.meta.url) === process.argv[1]) reportBench(process.argv.includes('--quick'));

/**
 * `pnpm bench --peer`: whole `twinfet run` processes against the numpy script bench/peer.py of
 * the same exact model and sample count, interleaved (numpy, twinfet 1 worker, twinfet default
 * workers, three times over), best of 3 wall times per column. Prints numpy time / twinfet
 * time: above 1 means twinfet is faster. Skipped with a note when python3 or numpy is missing.
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { compileStage, specLimit, type Design, type Stage } from '@twinfet/core';
import { defaultWorkers, linearisedSummary } from '@twinfet/montecarlo';
import { loadDesign } from '../../cli/dist/designFile.js';
import { HISTOGRAM_BINS, HISTOGRAM_SIGMAS } from '../src/analyses/simulate.js';

const root = fileURLToPath(new URL('../../../', import.meta.url));
const script = fileURLToPath(new URL('./peer.py', import.meta.url));
const bin = `${root}packages/cli/bin/twinfet.js`;

/** The constants peer.py needs, read off the compiled stage (no model code is repeated here). */
function peerModel(design: Design, stage: Stage): Record<string, number | string> {
  const ut = stage.thermalVoltage;
  const op = stage.operatingPoint;
  const slope = (k: number): number => design.process[op[k]!.polarity]!.slope;
  const device = (k: number) => {
    const o = op[k]!;
    const rho = stage.variables[2 * k]!.rho;
    return { o, betaFromVt: o.sigmaBeta * rho, betaOwn: o.sigmaBeta * Math.sqrt(1 - rho * rho) };
  };
  const spec = specLimit(design);
  const sigma = linearisedSummary(stage).sigma;
  const common = {
    topology: stage.topology,
    dimension: stage.dimension,
    spec,
    range: Math.max(HISTOGRAM_SIGMAS * sigma, 1.2 * spec),
    bins: HISTOGRAM_BINS,
    sign: op[0]!.polarity === 'n' ? 1 : -1,
    nut: slope(0) * ut,
    sigmaVt: op[0]!.sigmaVt,
    betaFromVt: device(0).betaFromVt,
    betaOwn: device(0).betaOwn,
  };
  if (stage.topology === 'simple') return { ...common, s0: Math.sqrt(op[0]!.ic) };
  const load = device(2);
  const tail = 2 * op[0]!.current;
  return {
    ...common,
    betaFromVtLoad: load.betaFromVt,
    betaOwnLoad: load.betaOwn,
    a0: load.o.specificCurrent / tail,
    c0: Math.sqrt(load.o.specificCurrent / op[0]!.specificCurrent),
    gamma: -Math.expm1(-Math.sqrt(load.o.ic)),
    dScale: load.o.sigmaVt / (slope(2) * ut),
  };
}

/** Wall time of one process, seconds, and its standard output. */
function timed(command: string, args: readonly string[]): { seconds: number; out: string } {
  const t = performance.now();
  const r = spawnSync(command, args, { encoding: 'utf8', maxBuffer: 1 << 26 });
  const seconds = (performance.now() - t) / 1000;
  if (r.status !== 0) throw new Error(`${command} ${args.slice(0, 2).join(' ')} failed (${r.status}): ${r.stderr}`);
  return { seconds, out: r.stdout };
}

const CASES = [
  { label: 'simple pair', example: 'weak-inversion-wta', samples: 1.5e6 },
  { label: 'simple pair', example: 'weak-inversion-wta', samples: 6e6 },
  { label: 'mirror stage', example: 'comparator-demo', samples: 1.5e6 },
  { label: 'mirror stage', example: 'comparator-demo', samples: 6e6 },
] as const;

/** Runs the comparison and prints the table. */
export async function peerComparison(rounds = 3): Promise<void> {
  const probe = spawnSync('python3', ['-c', 'import numpy; print(numpy.__version__)'], { encoding: 'utf8' });
  if (probe.status !== 0) {
    console.log('peer comparison skipped: python3 with numpy is not available on this machine');
    return;
  }
  const workers = defaultWorkers();
  console.log(`whole processes against numpy ${probe.stdout.trim()}: run --samples N --seed 1 --json, best of ${rounds}, interleaved; ratio = numpy time / twinfet time`);
  const head = ['case', 'samples', 'numpy s', '1 worker s', `${workers} workers s`, '1w / numpy', `${workers}w / numpy`, 'sigma mV (np/tf)'];
  const widths = [14, 9, 9, 11, 12, 11, 11, 19];
  const row = (cells: string[]): string => cells.map((c, i) => (i === 0 ? c.padEnd(widths[i]!) : c.padStart(widths[i]!))).join('');
  console.log(row(head));
  for (const c of CASES) {
    const design = await loadDesign(`${root}examples/${c.example}.yaml`);
    const model = JSON.stringify(peerModel(design, compileStage(design)));
    const file = `${root}examples/${c.example}.yaml`;
    const args = ['run', file, '--samples', String(c.samples), '--seed', '1', '--json'];
    const best = { numpy: Infinity, one: Infinity, all: Infinity };
    let npSigma = 0;
    let tfSigma = 0;
    for (let k = 0; k < rounds; k++) {
      const np = timed('python3', [script, model, String(c.samples), '1']);
      best.numpy = Math.min(best.numpy, np.seconds);
      npSigma = (JSON.parse(np.out) as { sigma: number }).sigma;
      const one = timed(process.execPath, [bin, ...args, '--workers', '1']);
      best.one = Math.min(best.one, one.seconds);
      tfSigma = (JSON.parse(one.out) as { offset: { sigma: number } }).offset.sigma;
      best.all = Math.min(best.all, timed(process.execPath, [bin, ...args]).seconds);
    }
    console.log(row([
      c.label,
      c.samples.toExponential(1).replace('e+', 'e'),
      best.numpy.toFixed(3),
      best.one.toFixed(3),
      best.all.toFixed(3),
      `${(best.numpy / best.one).toFixed(2)}x`,
      `${(best.numpy / best.all).toFixed(2)}x`,
      `${(npSigma * 1e3).toFixed(4)}/${(tfSigma * 1e3).toFixed(4)}`,
    ]));
  }
  console.log(`  ${CASES[0].example}: ${CASES[0].label} in weak inversion; ${CASES[2].example}: five-transistor stage, input pair in moderate inversion.`);
  console.log('  The two sigmas differ by sampling error only (different normal generators, same model).');
}

// The library API in one script (README "Library API"). From the repository root, after a build:
//   node examples/library.mjs
// Outside the repository the same imports work once the three packages are installed.
import { readFileSync } from 'node:fs';
import { compileStage, linearisedSigma, parseDesign } from '@twinfet/core';
import { createExecutor, estimateHighSigma, simulate, sizeDesign, sweepDesigns } from '@twinfet/montecarlo';

const text = readFileSync('examples/comparator-demo.yaml', 'utf8');
const design = parseDesign(text, { format: 'yaml', source: 'comparator-demo.yaml' }); // SI units, frozen

const stage = compileStage(design); // validates; throws InputError naming the field
console.log(stage.variables.map((v) => v.name).join(' '));
console.log('linearised sigma', linearisedSigma(stage)); // volts
const u = new Float64Array(stage.dimension);
u[0] = 1; // M1.dVT one sigma high, everything else at 0
console.log('offset for M1.dVT = +1 sigma', stage.figure(u, 0));

const ac = new AbortController(); // ac.abort() cancels: the promise rejects with an AbortError
let progress = '';
const run = await simulate(design, {
  samples: 200_000,
  seed: 7,
  workers: 2,
  signal: ac.signal,
  onProgress: (done, total) => (progress = `${done}/${total}`),
});
console.log('progress', progress);
console.log('sigma', run.offset.sigma, run.offset.sigmaInterval, 'kurtosis', run.offset.kurtosis);
console.log('yield', run.yield.estimate, run.yield.interval);

const pool = createExecutor(2); // one pool for several analyses; the caller closes it
try {
  const tail = await estimateHighSigma(design, { spec: 25e-3, relError: 0.05, executor: pool });
  console.log('P(|Vos| > 25 mV)', tail.failureProbability, tail.interval, tail.sigmaLevel, tail.method);

  const sized = await sizeDesign(design, { target: { kind: 'sigma', sigma: 2e-3 }, vary: 'both', executor: pool });
  console.log('sized input', sized.design.input.w, sized.design.input.l, 'load', sized.design.load.w, sized.design.load.l, 'met', sized.confirmed.met);

  const widths = [2e-6, 4e-6, 8e-6];
  const points = await sweepDesigns(
    widths.map((w) => ({ ...design, input: { ...design.input, w } })),
    { samples: 20_000, executor: pool },
  );
  for (const p of points) console.log('w', widths[p.index], 'sigma', p.analyticSigma, p.monteCarlo.sigma, 'yield', p.yield.estimate);
} finally {
  await pool.close();
}

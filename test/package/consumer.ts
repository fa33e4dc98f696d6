/**
 * A consumer of the published packages, as another tool would write it (TypeScript, NodeNext,
 * strict, no skipLibCheck). test/package.test.ts installs the packed tarballs into an empty
 * project, compiles this file there with tsconfig.consumer.json and runs it; it prints one JSON
 * line that the test checks. consumer.mjs is the same program in plain JavaScript.
 */
import { compileStage, linearisedSigma, parseDesign, type Design } from '@twinfet/core';
import { estimateHighSigma, simulate, sizeDesign, type HighSigmaReport, type RunReport, type SizeReport } from '@twinfet/montecarlo';
import { histogramSvg, loadDesign } from '@twinfet/cli';

// An invented process; the current-factor mismatch is negligible, so the offset is Gaussian with
// the linearised sigma A_VT / sqrt(W L) (Pelgrom 1989).
const text = `
name: consumer pair (invented process)
temperature: 27 C
topology: simple
tail: 10 uA
input: { polarity: n, w: 2 um, l: 1 um }
process:
  n: { vt0: 0.45 V, slope: 1.3, kp: 300 uA/V^2, avt: 5 mV*um, abeta: 0.0001 %*um }
spec: { offset: 10 mV, instances: 1 }
`;

const design: Design = parseDesign(text, { format: 'yaml', source: 'consumer.yaml' });
const sigmaLin = linearisedSigma(compileStage(design));

let progressCalls = 0;
let lastProgress: [number, number] = [0, 0];
const running = new AbortController();
const report: RunReport = await simulate(design, {
  samples: 200_000,
  seed: 'consumer',
  workers: 2,
  signal: running.signal,
  onProgress: (done, total) => {
    progressCalls++;
    lastProgress = [done, total];
  },
});

const cancelled = new AbortController();
cancelled.abort();
let abortError = '';
try {
  await simulate(design, { samples: 1e6, workers: 2, signal: cancelled.signal });
} catch (e) {
  abortError = e instanceof Error ? e.name : String(e);
}

const tail: HighSigmaReport = await estimateHighSigma(design, { spec: 6 * sigmaLin, seed: 'consumer', workers: 1 });
const sized: SizeReport = await sizeDesign(design, { target: { kind: 'sigma', sigma: sigmaLin / 2 }, vary: 'input.area', samples: 20_000, workers: 2 });

console.log(
  JSON.stringify({
    cliExports: [typeof loadDesign, typeof histogramSvg],
    sigmaLin,
    sigma: report.offset.sigma,
    sigmaInterval: report.offset.sigmaInterval,
    kurtosis: report.offset.kurtosis,
    evaluated: report.evaluated,
    workers: report.workers,
    progressCalls,
    lastProgress,
    abortError,
    tail: { method: tail.method, p: tail.failureProbability, se: tail.standardError },
    sized: {
      met: sized.confirmed.met,
      sigmaHi: sized.confirmed.sigmaInterval?.[1] ?? null,
      target: sigmaLin / 2,
      areaRatio: (sized.result.pairs[0]?.gateArea ?? Number.NaN) / (sized.original.pairs[0]?.gateArea ?? Number.NaN),
    },
  }),
);

import { InputError } from '@twinfet/core';
import { DEFAULT_SEED } from '@twinfet/montecarlo';
import type { Command } from 'commander';
import { readCommon, readSpec, withCommonOptions, type CommonFlags } from '../commonOptions.js';
import { figureJson } from '../describe.js';
import { loadDesign } from '../designFile.js';
import { warnUnitSlips } from '../unitWarnings.js';
import { writeOutputFile } from '../files.js';
import { VERSION } from '../version.js';
import { withInterrupt } from '../interrupt.js';
import { parseCount, parseFraction } from '../options.js';
import { assertFinite, printJson, type Io } from '../output.js';

interface ReportFlags extends CommonFlags {
  out?: string;
  samples?: string;
  chipYield?: string;
}


/** Fewest samples a page is made from: its quantiles and the transfer curve's 400 instances need them. */
export const REPORT_MIN_SAMPLES = 1000;
/** Default chip-yield target of the area study. */
export const DEFAULT_CHIP_YIELD = 0.99;

/** Registers `twinfet report`. */
export function registerReport(program: Command, io: Io, setExit: (code: number) => void): void {
  withCommonOptions(
    program
      .command('report')
      .description('one self-contained HTML page for a design review: the design, operating point, distribution, budget, yield, area cost and transfer curve')
      .argument('<design>', 'design file (YAML or JSON)')
      .option('--out <FILE.html>', 'the page to write')
      .option('--samples <N>', `Monte Carlo samples (default 100000, at least ${REPORT_MIN_SAMPLES})`)
      .option('--spec <V>', "limit overriding the design's spec, e.g. 20mV (an offset) or 1% (a current error)")
      .option('--chip-yield <Y>', `chip-yield target the area study sizes for (default ${DEFAULT_CHIP_YIELD})`),
  ).action(async (file: string, flags: ReportFlags) => {
    const common = readCommon(flags);
    if (flags.out === undefined) throw new InputError('--out', 'missing; give the page to write, e.g. --out review.html');
    if (!/\.html?$/i.test(flags.out)) throw new InputError('--out', `expected a file name ending in .html, got "${flags.out}"`);
    const samples = flags.samples === undefined ? 100_000 : parseCount(flags.samples, '--samples', REPORT_MIN_SAMPLES, 1e12);
    const chipYield = flags.chipYield === undefined ? DEFAULT_CHIP_YIELD : parseFraction(flags.chipYield, '--chip-yield', '0.99');
    const design = await loadDesign(file);
    const spec = readSpec(flags, design);
    warnUnitSlips(io, design, spec);
    // Loaded on demand: the other commands do not pay for the report's modules at start-up.
    const [{ collectReport }, { renderReport }] = await Promise.all([import('../report/collect.js'), import('../report/page.js')]);
    const seed = common.seed ?? DEFAULT_SEED;
    const command = [
      'twinfet', 'report', file, '--out', flags.out,
      '--samples', String(samples), '--seed', seed, '--confidence', String(common.confidence),
      ...(flags.spec === undefined ? [] : ['--spec', flags.spec]),
      '--chip-yield', String(chipYield),
    ];
    const done = await withInterrupt(io, 'report', (signal, onProgress) =>
      collectReport(design, {
        samples,
        seed,
        workers: common.workers,
        confidence: common.confidence,
        chipYield,
        source: file,
        command,
        version: VERSION,
        signal,
        onProgress,
        ...(spec === undefined ? {} : { spec }),
      }),
    );
    if (!('value' in done)) {
      io.err('twinfet: report interrupted; nothing was written');
      setExit(130);
      return;
    }
    const data = done.value;
    assertFinite(data);
    const html = renderReport(data);
    await writeOutputFile(flags.out, '--out', html);
    // The run under the figure's own name, as `twinfet run --json` prints it.
    if (flags.json === true) printJson(io, { ...data, run: figureJson(data.run) });
    else {
      const sections = (html.match(/<section id=/g) ?? []).length;
      const figures = (html.match(/<figure class="plot"/g) ?? []).length;
      io.out(`wrote ${flags.out}: ${sections} sections, ${figures} figures, ${Math.round(html.length / 1024)} kB (${data.run.evaluated} samples, seed ${data.run.seed}, ${data.meta.seconds.toFixed(2)} s)`);
    }
    setExit(0);
  });
}

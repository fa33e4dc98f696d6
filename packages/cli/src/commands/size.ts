import { readFileSync } from 'node:fs';
import { closestWord, compileStage, formatQuantity, InputError, isInputError, parseQuantity, stageDefinition, writeDesign, type Design } from '@twinfet/core';
import { figureLaw, SIZE_VARIATIONS, sizeDesign, type Confirmation, type SizedPoint, type SizeReport, type SizeTarget, type SizeVary } from '@twinfet/montecarlo';
import type { Command } from 'commander';
import { readCommon, withCommonOptions, type CommonFlags } from '../commonOptions.js';
import { figureText, headerLine, pct, sci, type FigureText } from '../describe.js';
import { loadDesign } from '../designFile.js';
import { warnUnitSlips } from '../unitWarnings.js';
import { writeOutputFile } from '../files.js';
import { parseCount, parseFraction } from '../options.js';
import { assertFinite, printJson, type Io } from '../output.js';
import { withInterrupt } from '../interrupt.js';
import { renderPairs, renderTable } from '../table.js';
import { yieldText } from './inspect.js';

interface SizeFlags extends CommonFlags {
  sigma?: string;
  yield?: string;
  chipYield?: string;
  vary?: string;
  samples?: string;
  write?: string;
}

const version = (JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string }).version;

/** Library option names as the command line spells them. */
const OPTION_OF: Readonly<Record<string, string>> = {
  sigma: '--sigma',
  yield: '--yield',
  'chip-yield': '--chip-yield',
  vary: '--vary',
  spec: '--spec',
  samples: '--samples',
  confidence: '--confidence',
  seed: '--seed',
  workers: '--workers',
};

function parseTarget(flags: SizeFlags): SizeTarget {
  const given = [flags.sigma, flags.yield, flags.chipYield].filter((x) => x !== undefined).length;
  if (given !== 1) {
    throw new InputError('--sigma', `give exactly one target: --sigma (e.g. 1.5mV), --yield (e.g. 0.999) or --chip-yield (e.g. 0.99); got ${given}`);
  }
  if (flags.sigma !== undefined) {
    const sigma = parseQuantity(flags.sigma, 'voltage', '--sigma');
    if (!(sigma > 0)) throw new InputError('--sigma', `expected a positive offset sigma such as 1.5mV, got "${flags.sigma}"`);
    return { kind: 'sigma', sigma };
  }
  if (flags.yield !== undefined) return { kind: 'yield', yield: parseFraction(flags.yield, '--yield', '0.999') };
  return { kind: 'chip-yield', chipYield: parseFraction(flags.chipYield!, '--chip-yield', '0.99') };
}

function parseVary(text: string | undefined): SizeVary {
  if (text === undefined) return 'input.w';
  const found = SIZE_VARIATIONS.find((v) => v === text);
  if (found !== undefined) return found;
  const guess = closestWord(text, SIZE_VARIATIONS);
  throw new InputError('--vary', `expected one of ${SIZE_VARIATIONS.join(', ')}, got "${text}"${guess === undefined ? '' : `; did you mean "${guess}"?`}`);
}

const mv = (v: number): string => formatQuantity(v, 'V', 4);
const um2 = (a: number): string => `${Number((a * 1e12).toPrecision(4))} um^2`;
const conf = (c: number): string => `${Math.round(c * 1000) / 10}%`;

/** How the design's figure is written (`offset`, `|Vos|`; a selector's `required lead`, `L`). */
function figureOf(design: Design): FigureText {
  return figureText(stageDefinition(design.topology).figure);
}

function targetText(r: SizeReport, f: FigureText): string {
  const t = r.target;
  if (t.kind === 'sigma') return `${f.label} sigma <= ${f.format(t.sigma)}`;
  const p = t.allowedFailure === null ? '' : `, allowed failure ${sci(t.allowedFailure, 4)} per instance`;
  if (t.kind === 'yield') return `instance yield >= ${t.yield} at ${f.magnitude} <= ${f.format(r.spec)}${p}`;
  return `chip yield >= ${t.chipYield} over ${r.instances} instance${r.instances === 1 ? '' : 's'} at ${f.magnitude} <= ${f.format(r.spec)}${p}`;
}

function varyText(v: SizeVary): string {
  if (v === 'both') return 'both (input pair and load, W/L of each kept, area split for the least total)';
  return v.endsWith('.area') ? `${v} (W/L kept)` : v;
}

function pairRows(label: string, p: SizedPoint): string[][] {
  return p.pairs.map((x) => [
    x.role,
    label,
    formatQuantity(x.w, 'm', 4),
    formatQuantity(x.l, 'm', 4),
    um2(x.gateArea),
    x.ic === null ? '-' : sci(x.ic, 3),
    x.region ?? 'resistor',
    x.gmOverId === null ? '-' : `${x.gmOverId.toPrecision(4)} /V`,
    x.gateCapacitance === null ? '-' : formatQuantity(x.gateCapacitance, 'F', 3),
  ]);
}

function figure(c: Confirmation, r: SizeReport): string {
  const cl = conf(r.confidence);
  if (c.sigma !== null && c.sigmaInterval !== null && r.target.kind === 'sigma') {
    return `${mv(c.sigma)}   ${cl} [${mv(c.sigmaInterval[0])}, ${mv(c.sigmaInterval[1])}]`;
  }
  return `failure ${sci(c.failure, 4)}   ${cl} [${sci(c.failureInterval[0], 4)}, ${sci(c.failureInterval[1], 4)}]`;
}

/** A yield or interval end: exactly 1 prints as 1 (an interval end or an estimate from no failures). */
const bound = (y: number): string => (y === 1 ? '1' : y < 1e-3 ? sci(y, 4) : yieldText(y));

/** Text form of a sizing report. */
export function renderSize(r: SizeReport, source: string, design: Design): string {
  const f = figureOf(design);
  const lawName = figureLaw(compileStage(design)).name;
  const c = r.confirmed;
  const cl = conf(r.confidence);
  const header = ['pair', 'design', 'W', 'L', 'W*L', 'IC', 'region', 'gm/I_D', 'C_gate'];
  const rows = [...pairRows('original', r.original), ...pairRows('sized', r.result)].sort((a, b) => (a[0] === b[0] ? 0 : a[0] === 'input' ? -1 : 1));
  const method = `${c.method === 'monte-carlo' ? 'Monte Carlo' : 'importance sampling'}, ${c.samples} samples, seed ${c.seed}`;
  const input = r.result.pairs.find((p) => p.role === 'input')!;
  const pairs: [string, string][] = [
    ['linearised sigma', `${mv(r.original.sigmaLinearised)} original -> ${mv(r.linearised.sigmaLinearised)} linearised solution -> ${mv(r.result.sigmaLinearised)} sized`],
  ];
  if (c.sigma !== null && c.sigmaInterval !== null) {
    pairs.push(['confirmed sigma', `${mv(c.sigma)}   ${cl} [${mv(c.sigmaInterval[0])}, ${mv(c.sigmaInterval[1])}] (exact model, ${method})`]);
  }
  pairs.push(
    ['failure at spec', `${sci(c.failure, 4)}   ${cl} [${sci(c.failureInterval[0], 4)}, ${sci(c.failureInterval[1], 4)}] (${f.magnitude} > ${f.format(r.spec)}${c.sigma === null ? `; ${method}` : ''})`],
    ['instance yield', `${c.failure === 0 ? `1 (no failures in ${c.samples} samples)` : bound(1 - c.failure)}   ${lawName} estimate ${yieldText(1 - r.result.gaussianFailure)}`],
    [`chip yield (${r.instances})`, `${bound(c.chipYield)}   ${cl} [${bound(c.chipYieldInterval[0])}, ${bound(c.chipYieldInterval[1])}]`],
    ['target', c.met ? `met: ${r.rule}` : `NOT met (${r.rule})`],
    ['gate area', `varied devices ${um2(r.original.variedArea)} -> ${um2(r.result.variedArea)}; whole stage ${um2(r.original.totalGateArea)} -> ${um2(r.result.totalGateArea)}`],
    [
      'area rule',
      `area x sigma^2 is constant when V_T dominates (Kinget 2005): ${um2(r.areaCost.originalArea)} x (${mv(r.areaCost.sigmaOriginal)} / ${mv(r.areaCost.sigmaTarget)})^2 = ${um2(r.areaCost.ruleArea)}; sized ${um2(r.areaCost.resultArea)} (${r.areaCost.ratio.toFixed(2)}x the rule)`,
    ],
    ['input capacitance', input.gateCapacitance === null ? 'not available: the process gives no cox' : `${formatQuantity(input.gateCapacitance, 'F', 3)} per input (Cox W L of one input device)`],
  );
  if (r.split !== null) {
    const s = r.split;
    pairs.push([
      'area split',
      `optimum (W*L of one input + one load device) ${um2(s.optimum.input)} + ${um2(s.optimum.load)} = ${um2(s.optimum.total)}; both scaled by one factor (x${s.equal.factor.toPrecision(4)}) ${um2(s.equal.input)} + ${um2(s.equal.load)} = ${um2(s.equal.total)}; saving ${pct(s.saving, 3)} (linearised)`,
    ]);
  }
  const steps = r.confirmations.map((x, i) => [
    String(i + 1),
    x.point.pairs.map((p) => `${p.role} ${formatQuantity(p.w, 'm', 4)}/${formatQuantity(p.l, 'm', 4)}`).join(', '),
    mv(x.point.sigmaLinearised),
    figure(x, r),
    x.seed,
    x.met ? 'yes' : 'no',
  ]);
  const lines = [
    `${headerLine(design)} from ${source}`,
    '',
    renderPairs([
      ['target', targetText(r, f)],
      ['varying', varyText(r.vary)],
    ]),
    '',
    renderTable(header, rows, header.map((_, i) => (i <= 1 || i === 6 ? 'left' : 'right'))),
    '',
    renderPairs(pairs),
    '',
    'confirmations on the exact model (each on its own random stream)',
    renderTable(['#', 'geometry W/L', 'linearised', 'confirmed', 'seed', 'met'], steps, ['right', 'left', 'right', 'left', 'left', 'left']),
  ];
  for (const n of r.notes) lines.push(`note: ${n}`);
  for (const w of r.warnings) lines.push(`warning: ${w}`);
  return lines.join('\n');
}

/** The header comment of a written design file. */
function fileHeader(r: SizeReport, source: string, design: Design): string[] {
  const c = r.confirmed;
  const method = `${c.method === 'monte-carlo' ? 'Monte Carlo' : 'importance sampling'}, ${c.samples} samples, seed ${c.seed}`;
  const fig = c.sigma !== null && c.sigmaInterval !== null && r.target.kind === 'sigma'
    ? `sigma ${mv(c.sigma)}, ${conf(r.confidence)} [${mv(c.sigmaInterval[0])}, ${mv(c.sigmaInterval[1])}]`
    : `failure ${sci(c.failure, 4)}, ${conf(r.confidence)} [${sci(c.failureInterval[0], 4)}, ${sci(c.failureInterval[1], 4)}]`;
  return [
    `Sized by twinfet ${version} from ${source} for ${targetText(r, figureOf(design))}, varying ${r.vary}.`,
    `Confirmed on the exact model: ${fig} (${method}).`,
    `Linearised sigma ${mv(r.result.sigmaLinearised)}. Process parameters and bias are copied unchanged from ${source}.`,
  ];
}

/** Registers `twinfet size`. */
export function registerSize(program: Command, io: Io, setExit: (code: number) => void): void {
  withCommonOptions(
    program
      .command('size')
      .description('size the pair (or load) for an offset sigma or yield target: linearised solve, confirmed on the exact model')
      .argument('<design>', 'design file (YAML or JSON)')
      .option('--sigma <V>', 'target offset sigma, e.g. 1.5mV')
      .option('--yield <Y>', "target instance yield at the design's spec (or --spec), e.g. 0.999")
      .option('--chip-yield <Y>', 'target chip yield over spec.instances instances, e.g. 0.99')
      .option('--vary <WHAT>', `what may change: ${SIZE_VARIATIONS.join(', ')} (default input.w; area keeps W/L)`)
      .option('--spec <V>', "offset limit overriding the design's spec, e.g. 20mV")
      .option('--samples <N>', 'Monte Carlo samples per confirmation (default 200000; yield targets use at least 384/p)')
      .option('--write <FILE.yaml>', 'save the sized design as a design file'),
  ).action(async (file: string, flags: SizeFlags) => {
    const common = readCommon(flags);
    const target = parseTarget(flags);
    const vary = parseVary(flags.vary);
    const samples = flags.samples === undefined ? undefined : parseCount(flags.samples, '--samples', 1000, 1e9);
    if (flags.write !== undefined && !/\.ya?ml$/i.test(flags.write)) {
      throw new InputError('--write', `expected a file name ending in .yaml, got "${flags.write}"`);
    }
    const design = await loadDesign(file);
    warnUnitSlips(io, design, common.spec);
    let done: Awaited<ReturnType<typeof withInterrupt<SizeReport>>>;
    try {
      done = await withInterrupt(io, 'size', (signal) =>
        sizeDesign(design, {
          target,
          vary,
          workers: common.workers,
          confidence: common.confidence,
          signal,
          ...(common.seed === undefined ? {} : { seed: common.seed }),
          ...(common.spec === undefined ? {} : { spec: common.spec }),
          ...(samples === undefined ? {} : { samples }),
        }),
      );
    } catch (e) {
      if (isInputError(e) && Object.hasOwn(OPTION_OF, e.field)) {
        throw new InputError(OPTION_OF[e.field]!, e.message.slice(e.field.length + 2));
      }
      throw e;
    }
    if (!('value' in done)) {
      io.err('twinfet: size interrupted; nothing was written');
      setExit(130);
      return;
    }
    const report = done.value;
    const sized: Design = { ...report.design, name: `${design.name}, sized` };
    const out = { source: file, ...report, design: sized, written: flags.write ?? null };
    assertFinite(out);
    if (flags.write !== undefined) await writeOutputFile(flags.write, '--write', writeDesign(sized, fileHeader(report, file, design)));
    if (flags.json === true) printJson(io, out);
    else {
      io.out(renderSize(report, file, design));
      if (flags.write !== undefined) io.out(`wrote ${flags.write}`);
    }
    setExit(0);
  });
}

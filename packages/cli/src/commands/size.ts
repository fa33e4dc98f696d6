import { closestWord, compileStage, formatQuantity, InputError, isInputError, parseQuantity, stageDefinition, writeDesign, type Design } from '@twinfet/core';
import { figureLaw, SIZE_VARIATIONS, sizeDesign, type Confirmation, type SizedPoint, type SizeReport, type SizeTarget, type SizeVary } from '@twinfet/montecarlo';
import type { Command } from 'commander';
import { readCommon, readSpec, withCommonOptions, type CommonFlags } from '../commonOptions.js';
import { figureSummary, figureText, headerLine, parseFigureOption, pct, sci, type FigureText } from '../describe.js';
import { loadDesign } from '../designFile.js';
import { warnUnitSlips } from '../unitWarnings.js';
import { writeOutputFile } from '../files.js';
import { parseCount, parseFraction } from '../options.js';
import { assertFinite, printJson, type Io } from '../output.js';
import { withInterrupt } from '../interrupt.js';
import { renderPairs, renderTable } from '../table.js';
import { yieldBound, yieldDigits, yieldText } from './inspect.js';
import { VERSION } from '../version.js';

interface SizeFlags extends CommonFlags {
  sigma?: string;
  yield?: string;
  chipYield?: string;
  vary?: string;
  samples?: string;
  write?: string;
}

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

function checkTargetCount(flags: SizeFlags): void {
  const given = [flags.sigma, flags.yield, flags.chipYield].filter((x) => x !== undefined).length;
  if (given !== 1) {
    throw new InputError('--sigma', `give exactly one target: --sigma (e.g. 1.5mV, or 0.2% for a current error), --yield (e.g. 0.999) or --chip-yield (e.g. 0.99); got ${given}`);
  }
}

/** The target; --sigma is in the unit of the design's figure (a voltage, or a percentage). */
function parseTarget(flags: SizeFlags, design: Design): SizeTarget {
  checkTargetCount(flags);
  if (flags.sigma !== undefined) return { kind: 'sigma', sigma: parseFigureOption(flags.sigma, '--sigma', design, 'sigma', '1.5mV') };
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

const um2 = (a: number): string => `${Number((a * 1e12).toPrecision(4))} um^2`;
const conf = (c: number): string => `${Math.round(c * 1000) / 10}%`;

function targetText(r: SizeReport, f: FigureText): string {
  const t = r.target;
  const mv = f.format;
  if (t.kind === 'sigma') return `${f.label} sigma <= ${mv(t.sigma)}`;
  const p = t.allowedFailure === null ? '' : `, allowed failure ${sci(t.allowedFailure, 4)} per instance`;
  if (t.kind === 'yield') return `instance yield >= ${t.yield} at ${f.magnitude} <= ${mv(r.spec)}${p}`;
  return `chip yield >= ${t.chipYield} over ${r.instances} instance${r.instances === 1 ? '' : 's'} at ${f.magnitude} <= ${mv(r.spec)}${p}`;
}

/** `a`, `a and b`, `a, b and c`. */
function listText(items: readonly string[]): string {
  return items.length <= 1 ? (items[0] ?? '') : `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]!}`;
}

/** The sizable blocks in words: "input pair and load", "input pair, sources and load", "input and output". */
function blocksText(design: Design): string {
  const blocks = stageDefinition(design.topology).blocks.filter((b) => b.sizable);
  return listText(blocks.map((b) => (b.key === 'input' && b.elements.length === 2 ? 'input pair' : b.key)));
}

function varyText(v: SizeVary, design: Design): string {
  if (v === 'both') return `both (${blocksText(design)}, W/L of each kept, area split for the least total)`;
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

function figure(c: Confirmation, r: SizeReport, mv: (x: number) => string): string {
  const cl = conf(r.confidence);
  if (c.sigma !== null && c.sigmaInterval !== null && r.target.kind === 'sigma') {
    return `${mv(c.sigma)}   ${cl} [${mv(c.sigmaInterval[0])}, ${mv(c.sigmaInterval[1])}]`;
  }
  return `failure ${sci(c.failure, 4)}   ${cl} [${sci(c.failureInterval[0], 4)}, ${sci(c.failureInterval[1], 4)}]`;
}

/** A yield or interval end: exactly 1 prints as 1 (an interval end or an estimate from no failures). */
const bound = (y: number): string => yieldBound(y, yieldDigits(y));

/** Text form of a sizing report. */
export function renderSize(r: SizeReport, source: string, design: Design): string {
  const c = r.confirmed;
  const cl = conf(r.confidence);
  const f = figureText(stageDefinition(design.topology).figure);
  const mv = f.format;
  const def = stageDefinition(design.topology);
  const header = [def.blocks.every((b) => b.elements.length === 2) ? 'pair' : 'block', 'design', 'W', 'L', 'W*L', 'IC', 'region', 'gm/I_D', 'C_gate'];
  // Each block's original row, then its sized row, blocks in the stage's order.
  const order = r.original.pairs.map((p) => p.role);
  const rows = [...pairRows('original', r.original), ...pairRows('sized', r.result)].sort((a, b) => order.indexOf(a[0]!) - order.indexOf(b[0]!));
  const single = def.blocks[0]!.elements.length === 1;
  const method = `${c.method === 'monte-carlo' ? 'Monte Carlo' : 'importance sampling'}, ${c.samples} samples, seed ${c.seed}`;
  const input = r.result.pairs.find((p) => p.role === 'input')!;
  const pairs: [string, string][] = [
    ['linearised sigma', `${mv(r.original.sigmaLinearised)} original -> ${mv(r.linearised.sigmaLinearised)} linearised solution -> ${mv(r.result.sigmaLinearised)} sized`],
  ];
  if (c.sigma !== null && c.sigmaInterval !== null) {
    pairs.push(['confirmed sigma', `${mv(c.sigma)}   ${cl} [${mv(c.sigmaInterval[0])}, ${mv(c.sigmaInterval[1])}] (exact model, ${method})`]);
  }
  pairs.push(
    ['failure at spec', `${sci(c.failure, 4)}   ${cl} [${sci(c.failureInterval[0], 4)}, ${sci(c.failureInterval[1], 4)}] (${f.magnitude} > ${mv(r.spec)}${c.sigma === null ? `; ${method}` : ''})`],
    ['instance yield', `${c.failure === 0 ? `1 (no failures in ${c.samples} samples)` : bound(1 - c.failure)}   ${figureLaw(compileStage(design)).name} estimate ${yieldText(1 - r.result.gaussianFailure)}`],
    [`chip yield (${r.instances})`, `${bound(c.chipYield)}   ${cl} [${bound(c.chipYieldInterval[0])}, ${bound(c.chipYieldInterval[1])}]`],
    ['target', c.met ? `met: ${r.rule}` : `NOT met (${r.rule})`],
    ...(c.condition === null
      ? []
      : ([[
          'limited by',
          `condition ${c.condition} on the exact model (${r.target.kind === 'sigma' ? 'largest sigma' : 'lowest yield'}; the target holds at every one of ${design.conditions?.length ?? 0} conditions); ${r.result.condition ?? '-'} has the largest linearised sigma`,
        ]] as [string, string][])),
    ['gate area', `varied devices ${um2(r.original.variedArea)} -> ${um2(r.result.variedArea)}; whole stage ${um2(r.original.totalGateArea)} -> ${um2(r.result.totalGateArea)}`],
    [
      'area rule',
      `area x sigma^2 is constant when V_T dominates (Kinget 2005): ${um2(r.areaCost.originalArea)} x (${mv(r.areaCost.sigmaOriginal)} / ${mv(r.areaCost.sigmaTarget)})^2 = ${um2(r.areaCost.ruleArea)}; sized ${um2(r.areaCost.resultArea)} (${r.areaCost.ratio.toFixed(2)}x the rule)`,
    ],
    ['input capacitance', input.gateCapacitance === null ? 'not available: the process gives no cox' : `${formatQuantity(input.gateCapacitance, 'F', 3)} ${single ? '(Cox W L of the input device)' : 'per input (Cox W L of one input device)'}`],
  );
  if (r.split !== null) {
    // Every sizable block: per-element areas at the optimum, and with all scaled by one factor.
    const s = r.split;
    const keys = s.blocks.map((b) => b.block);
    const sum = (xs: readonly number[]): string => xs.map(um2).join(' + ');
    pairs.push([
      'area split',
      `optimum (W*L of one ${keys.join(' + one ')} device) ${sum(s.blocks.map((b) => b.optimum))} = ${um2(s.optimum.total)}; ${keys.length === 2 ? 'both' : 'all'} scaled by one factor (x${s.equal.factor.toPrecision(4)}) ${sum(s.blocks.map((b) => b.equal))} = ${um2(s.equal.total)}; saving ${pct(s.saving, 3)} (linearised)`,
    ]);
  }
  const steps = r.confirmations.map((x, i) => [
    String(i + 1),
    x.point.pairs.map((p) => `${p.role} ${formatQuantity(p.w, 'm', 4)}/${formatQuantity(p.l, 'm', 4)}`).join(', '),
    mv(x.point.sigmaLinearised),
    figure(x, r, mv),
    x.seed,
    x.met ? 'yes' : 'no',
  ]);
  const lines = [
    `${headerLine(design)} from ${source}`,
    '',
    renderPairs([
      ['target', targetText(r, f)],
      ['varying', varyText(r.vary, design)],
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
  const f = figureText(stageDefinition(design.topology).figure);
  const mv = f.format;
  const method = `${c.method === 'monte-carlo' ? 'Monte Carlo' : 'importance sampling'}, ${c.samples} samples, seed ${c.seed}`;
  const fig = c.sigma !== null && c.sigmaInterval !== null && r.target.kind === 'sigma'
    ? `sigma ${mv(c.sigma)}, ${conf(r.confidence)} [${mv(c.sigmaInterval[0])}, ${mv(c.sigmaInterval[1])}]`
    : `failure ${sci(c.failure, 4)}, ${conf(r.confidence)} [${sci(c.failureInterval[0], 4)}, ${sci(c.failureInterval[1], 4)}]`;
  return [
    `Sized by twinfet ${VERSION} from ${source} for ${targetText(r, f)}, varying ${r.vary}.`,
    `Confirmed on the exact model: ${fig} (${method}).`,
    `Linearised sigma ${mv(r.result.sigmaLinearised)}. Process parameters and bias are copied unchanged from ${source}.`,
  ];
}

/** Registers `twinfet size`. */
export function registerSize(program: Command, io: Io, setExit: (code: number) => void): void {
  withCommonOptions(
    program
      .command('size')
      .description('size the pair (or load, sources, output) for a sigma or yield target of the figure: linearised solve, confirmed on the exact model')
      .argument('<design>', 'design file (YAML or JSON)')
      .option('--sigma <V>', 'target sigma of the figure, e.g. 1.5mV (an offset) or 0.2% (a current error)')
      .option('--yield <Y>', "target instance yield at the design's spec (or --spec), e.g. 0.999")
      .option('--chip-yield <Y>', 'target chip yield over spec.instances instances, e.g. 0.99')
      .option('--vary <WHAT>', `what may change: ${SIZE_VARIATIONS.join(', ')} (default input.w; area keeps W/L)`)
      .option('--spec <V>', "limit overriding the design's spec, e.g. 20mV (an offset) or 1% (a current error)")
      .option('--samples <N>', 'Monte Carlo samples per confirmation (default 200000; yield targets use at least 384/p)')
      .option('--write <FILE.yaml>', 'save the sized design as a design file'),
  ).action(async (file: string, flags: SizeFlags) => {
    const common = readCommon(flags);
    checkTargetCount(flags);
    const vary = parseVary(flags.vary);
    const samples = flags.samples === undefined ? undefined : parseCount(flags.samples, '--samples', 1000, 1e9);
    if (flags.write !== undefined && !/\.ya?ml$/i.test(flags.write)) {
      throw new InputError('--write', `expected a file name ending in .yaml, got "${flags.write}"`);
    }
    const design = await loadDesign(file);
    const target = parseTarget(flags, design);
    const spec = readSpec(flags, design);
    warnUnitSlips(io, design, spec);
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
          ...(spec === undefined ? {} : { spec }),
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
    const out = { source: file, figure: figureSummary(design), ...report, design: sized, written: flags.write ?? null };
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

/**
 * What each stage definition tells the rest of the program: its one-line summary, its fields and
 * blocks (element names, labels, polarity rules, the inline examples that error messages suggest,
 * the words for first-order terms) and its figure. The wording is this project's (the design-file
 * vocabulary of README.md; no outside source); the examples are also checked by behaviour: a
 * design file written from nothing but a definition's own examples reads and compiles, with the
 * values the examples state (10 uA = 1e-5 A, 2 um = 2e-6 m, SI prefixes).
 */
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import { parseDesign } from '../src/parse/parseDesign.js';
import type { StageDefinition } from '../src/stages/definition.js';
import { STAGES } from '../src/stages/registry.js';

type FieldRow = [key: string, what: string, example: string, unit: string, required: boolean, dimension: string, integer: boolean];
type BlockRow = [key: string, kind: string, elements: string, label: string, polarity: string, exampleForN: string, sizable: boolean, fields: FieldRow[], terms: Record<string, string> | null];
interface Row {
  topology: string;
  summary: string;
  fields: FieldRow[];
  blocks: BlockRow[];
  figure: [name: string, specKey: string, label: string, symbol: string, unit: string, sided: string, example: string, dimension: string, note: string | null];
}

const TAIL: FieldRow = ['tail', 'tail current', 'tail: 10 uA', 'A', true, 'current', false];
const INPUT: BlockRow = ['input', 'mos', 'M1 M2', 'input pair', 'any', '{ polarity: n, w: 2 um, l: 1 um }', true, [], null];
const OFFSET: Row['figure'] = ['offset', 'offset', 'offset', 'Vos', 'V', 'two', 'offset: 10 mV', 'voltage', null];

const EXPECTED: Row[] = [
  { topology: 'simple', summary: 'differential pair with ideal equal loads', fields: [TAIL], blocks: [INPUT], figure: OFFSET },
  {
    topology: 'mirror',
    summary: 'five-transistor stage: input pair with a current-mirror load',
    fields: [TAIL],
    blocks: [INPUT, ['load', 'mos', 'M3 M4', 'mirror load', 'opposite-to-input', '{ polarity: p, w: 4 um, l: 2 um }', true, [], null]],
    figure: OFFSET,
  },
  {
    topology: 'resistor',
    summary: 'differential pair with resistor loads',
    fields: [TAIL],
    blocks: [INPUT, ['load', 'resistor', 'R1 R2', 'load resistors', 'any', '{ w: 2 um, l: 10 um, r: 20 kohm }', true, [['r', 'resistance', 'r: 20 kohm', 'ohm', false, 'resistance', false]], null]],
    figure: OFFSET,
  },
  {
    topology: 'folded',
    summary: 'folded-cascode input stage: input pair, folding current sources, mirror under the folded branches',
    fields: [TAIL],
    blocks: [
      INPUT,
      [
        'sources', 'mos', 'M5 M6', 'folding current sources', 'opposite-to-input', '{ polarity: p, w: 4 um, l: 2 um, current: 20 uA }', true,
        [['current', 'folding source current', 'current: 20 uA', 'A', true, 'current', false]],
        { vt: '(gm_sources/gm_in) A_VT/sqrt(WL_sources)', beta: '(I_sources/gm_in) A_beta/sqrt(WL_sources)' },
      ],
      ['load', 'mos', 'M7 M8', 'bottom mirror', 'same-as-input', '{ polarity: n, w: 4 um, l: 2 um }', true, [], { vt: '(gm_load/gm_in) A_VT/sqrt(WL_load)', beta: '(I_load/gm_in) A_beta/sqrt(WL_load)' }],
    ],
    figure: OFFSET,
  },
  {
    topology: 'current-mirror',
    summary: 'two-device current mirror: relative error of the copied current',
    fields: [],
    blocks: [
      [
        'input', 'mos', 'M1', 'diode-connected input device', 'any', '{ polarity: n, w: 4 um, l: 4 um, current: 10 uA }', true,
        [['current', 'reference current', 'current: 10 uA', 'A', true, 'current', false]],
        { vt: '(gm/I_D) A_VT/sqrt(2 WL_input)', beta: 'A_beta/sqrt(2 WL_input)' },
      ],
      ['output', 'mos', 'M2', 'output device', 'same-as-input', '{ polarity: n, w: 8 um, l: 4 um }', true, [], { vt: '(gm/I_D) A_VT/sqrt(2 WL_output)', beta: 'A_beta/sqrt(2 WL_output)' }],
    ],
    figure: ['currentError', 'error', 'current error', 'e', '', 'two', 'error: 0.5 %', 'dimensionless', null],
  },
  {
    topology: 'selector',
    summary: 'N-input selector (winner-take-all): cells with joined sources on one tail current',
    fields: [['cells', 'input cells', 'cells: 16', '', true, 'dimensionless', true], TAIL],
    blocks: [['input', 'mos', 'M1 M2 ... MN', 'cells', 'any', '{ polarity: n, w: 4 um, l: 4 um }', true, [], null]],
    figure: [
      'lead', 'separation', 'required lead', 'L', 'V', 'one', 'separation: 10 mV', 'voltage',
      'the required lead is a maximum over the competitors, so its distribution is not symmetric (skewed to large leads): read its quantiles, not mean +- k sigma',
    ],
  },
];

function row(s: StageDefinition): Row {
  const field = (f: StageDefinition['fields'][number]): FieldRow => [f.key, f.what, f.example, f.unit, f.required, f.dimension, f.integer === true];
  return {
    topology: s.topology,
    summary: s.summary,
    fields: s.fields.map(field),
    blocks: s.blocks.map((b) => [b.key, b.kind, b.elements.join(' '), b.label, b.polarity, b.example('n'), b.sizable, b.fields.map(field), b.terms === undefined ? null : { ...b.terms }]),
    figure: [s.figure.name, s.figure.specKey, s.figure.label, s.figure.symbol, s.figure.unit, s.figure.sided, s.figure.example, s.figure.dimension, s.figure.note ?? null],
  };
}

/** A design file made of nothing but the definition's own examples (an invented demo process). */
function fromExamples(s: StageDefinition): string {
  return [
    'temperature: 300 K',
    `topology: ${s.topology}`,
    ...s.fields.map((f) => f.example),
    ...s.blocks.map((b) => `${b.key}: ${b.example('n')}`),
    'process:',
    '  n: { vt0: 0.45 V, slope: 1.3, kp: 300 uA/V^2, avt: 5 mV*um, abeta: 1 %*um }',
    '  p: { vt0: 0.5 V, slope: 1.35, kp: 90 uA/V^2, avt: 6.5 mV*um, abeta: 1.2 %*um }',
    ...(s.blocks.some((b) => b.kind === 'resistor') ? ['  resistor: { ar: 1 %*um }'] : []),
    `spec: { ${s.figure.example} }`,
  ].join('\n');
}

describe('stage definitions', () => {
  it('the registry lists the six stage types in help order, each as documented', () => {
    expect(STAGES.map(row)).toEqual(EXPECTED);
  });
  it('the mirror and folded examples of a p input pair flip the complementary blocks\' polarity', () => {
    const ex = (t: string, key: string): string => STAGES.find((s) => s.topology === t)!.blocks.find((b) => b.key === key)!.example('p');
    expect(ex('mirror', 'load')).toBe('{ polarity: n, w: 4 um, l: 2 um }');
    expect(ex('folded', 'sources')).toBe('{ polarity: n, w: 4 um, l: 2 um, current: 20 uA }');
    expect(ex('folded', 'load')).toBe('{ polarity: p, w: 4 um, l: 2 um }');
    expect(ex('current-mirror', 'output')).toBe('{ polarity: p, w: 8 um, l: 4 um }');
  });
  it.each(STAGES.map((s) => [s.topology, s] as const))('%s: a design file written from its examples reads and compiles, with the stated values', (_t, s) => {
    const d = parseDesign(fromExamples(s), { source: 'examples.yaml' });
    const st = compileStage(d);
    expect(st.topology).toBe(s.topology);
    // Every example block is on the same 1e-6 grid as written (2 um, 4 um, 10 um ...).
    for (const b of s.blocks) {
      const g = (b.key === 'input' ? d.input : d[b.key]) as { w: number; l: number };
      expect(g.w / 1e-6).toBeCloseTo(Number(/w: (\d+) um/.exec(b.example('n'))![1]), 12);
      expect(g.l / 1e-6).toBeCloseTo(Number(/l: (\d+) um/.exec(b.example('n'))![1]), 12);
    }
    if (s.fields.some((f) => f.key === 'tail')) expect(d.tail).toBeCloseTo(10e-6, 18);
  });
});

/**
 * Unit slips that used to pass silently: a bare number is in SI units, so `spec.offset: 7.8125`
 * is 7.8 V. Each is warned on stderr, one line naming the field, the SI value and a hint; the
 * run itself goes on (the value is valid). Thresholds are this project's (common practice, no source).
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { compileStage, unitSlips } from '@twinfet/core';
import { describe, expect, it } from 'vitest';
import { runCli } from './support/cli.js';
import { baseDesign } from './support/designs.js';

const dir = mkdtempSync(join(tmpdir(), 'twinfet-slips-'));
const file = (name: string, text: string): string => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};
const BASE = [
  'temperature: 27 C',
  'topology: simple',
  'tail: 10 uA',
  'input: { polarity: n, w: 2 um, l: 1 um }',
  'process: { n: { vt0: 0.45 V, slope: 1.3, kp: 300 uA/V^2, avt: 5 mV*um, abeta: 1 %*um } }',
].join('\n');

describe('unit slips are warned, one line on stderr each', () => {
  it('a bare spec.offset of 7.8125 (volts) is warned with the field, the value and a hint; exit 0', async () => {
    const r = await runCli(['inspect', file('bare-spec.yaml', `${BASE}\nspec: { offset: 7.8125 }\n`)]);
    expect(r.code).toBe(0);
    const lines = r.stderr.trimEnd().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toBe('twinfet: warning: spec.offset = 7.8125 V is above 1 V; if millivolts were meant, write "7.8125 mV" (a number without a unit is in volts)');
  });

  it('a spec written with its unit (2 V) gets the same warning without claiming the number was bare', async () => {
    const r = await runCli(['inspect', file('volt-spec.yaml', `${BASE}\nspec: { offset: 2 V }\n`)]);
    expect(r.code).toBe(0);
    expect(r.stderr.trimEnd()).toBe('twinfet: warning: spec.offset = 2 V is above 1 V; if millivolts were meant, write "2 mV" (a number without a unit is in volts)');
    expect(r.stderr).not.toContain('bare');
  });

  it('--spec 20 (volts) is warned naming --spec', async () => {
    const r = await runCli(['run', file('ok.yaml', `${BASE}\nspec: { offset: 10 mV }\n`), '--spec', '20', '--samples', '2000']);
    expect(r.code).toBe(0);
    expect(r.stderr).toContain('twinfet: warning: --spec = 20 V is above 1 V');
  });

  it('a spec beyond 50 linearised sigma is warned even below 1 V; a sensible design gives no warning', async () => {
    const far = await runCli(['inspect', file('far.yaml', `${BASE}\nspec: { offset: 0.5 }\n`)]);
    // sigma_lin of this pair is about 3.6 mV, so 0.5 V is about 140 sigma.
    expect(far.stderr).toMatch(/spec\.offset = 0\.5 V is [\d.]+ linearised sigma, beyond 50/);
    const fine = await runCli(['inspect', file('fine.yaml', `${BASE}\nspec: { offset: 10 mV }\n`)]);
    expect(fine.stderr).toBe('');
  });

  it('a tail above 10 mA and a device side above 1 mm are warned by the library function', () => {
    const st = compileStage({ ...baseDesign('simple'), tail: 0.05, input: { polarity: 'n', w: 2e-3, l: 1e-6 } });
    const w = unitSlips(st, 0.01, 'spec.offset');
    expect(w.some((x) => x.startsWith('tail = 0.05 A is above 10 mA'))).toBe(true);
    expect(w.some((x) => x.startsWith('input.w = 0.002 m is above 1 mm'))).toBe(true);
  });
});

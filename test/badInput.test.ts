/**
 * Bad input through the real command line: every broken design file and command line in
 * test/corpus/cases.json must end with exit code 2, one line on stderr that starts "twinfet: "
 * and names the field (or the file and line), no stack trace, and nothing on stdout.
 *
 * The rules checked are this project's own (packages/cli/src/main.ts: exit code 2 for bad input;
 * one line naming the field and the bad value, no stack traces): common practice, no outside
 * source. Every check is exact (string and integer comparisons, no tolerance).
 */
import { readdirSync, readFileSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { mapLimit, REPO_ROOT, runCli, type CliResult } from './support/cli.js';

const CORPUS = 'test/corpus';
const VALID = `${CORPUS}/valid-simple.yaml`;
const COMMANDS = ['inspect', 'run', 'tail'] as const;

interface CaseEntry {
  readonly id: string;
  readonly file?: string;
  readonly commands?: readonly string[];
  readonly extra?: readonly string[];
  readonly args?: readonly string[];
  readonly expect: readonly string[];
}

/** One CLI invocation to make. */
interface Invocation {
  readonly label: string;
  readonly args: readonly string[];
  readonly expect: readonly string[];
}

const fill = (s: string): string => s.replaceAll('{valid}', VALID).replaceAll('{corpus}', CORPUS);

const corpus = JSON.parse(readFileSync(join(REPO_ROOT, CORPUS, 'cases.json'), 'utf8')) as { cases: CaseEntry[] };

const invocations: Invocation[] = corpus.cases.flatMap((c): Invocation[] => {
  const expectText = c.expect.map(fill);
  if (c.file !== undefined) {
    const commands = c.commands ?? COMMANDS;
    return commands.map((cmd) => ({
      label: `${c.id} (${cmd})`,
      args: [cmd, `${CORPUS}/${c.file}`, ...(c.extra ?? [])],
      expect: expectText,
    }));
  }
  if (c.args === undefined) throw new Error(`cases.json: case ${c.id} has neither file nor args`);
  return [{ label: c.id, args: c.args.map(fill), expect: expectText }];
});

// Spawned up front, as many at once as there are cores, then checked one case per test. The
// hook's limit is a hang guard, not a speed check: the ~250 CLI runs take about 40 s unloaded
// and took over 120 s on this shared machine under load (each run also has its own 30 s guard).
const results = new Map<string, CliResult>();
beforeAll(async () => {
  const done = await mapLimit(invocations, availableParallelism(), (inv) => runCli(inv.args));
  invocations.forEach((inv, i) => results.set(inv.label, done[i]!));
}, 900_000);

describe('the corpus itself', () => {
  it('holds at least 30 broken design files, each used by a case, and every case file exists', () => {
    const files = readdirSync(join(REPO_ROOT, CORPUS)).filter((f) => f !== 'cases.json' && f !== 'valid-simple.yaml');
    const used = new Set(corpus.cases.flatMap((c) => (c.file === undefined ? [] : [c.file])));
    // Exact counts and set membership: a file nobody runs, or a case naming a missing file, is a corpus bug.
    expect(files.length).toBeGreaterThanOrEqual(30);
    expect(files.filter((f) => !used.has(f))).toEqual([]);
    expect([...used].filter((f) => !files.includes(f))).toEqual([]);
    // Every command is exercised on design files, not only on options.
    for (const cmd of COMMANDS) expect(invocations.filter((i) => i.args[0] === cmd).length).toBeGreaterThanOrEqual(10);
    expect(new Set(corpus.cases.map((c) => c.id)).size).toBe(corpus.cases.length);
  });

  it('control: the valid base file of the option cases is accepted (exit 0, a report on stdout)', async () => {
    // Without this, an option case could pass only because the file itself was refused.
    const r = await runCli(['inspect', VALID, '--json']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const report = JSON.parse(r.stdout) as { analytic: { sigma: number } };
    // Linearised sigma of this invented design: 3.58378253 mV, computed independently by
    // test/fixtures/demo_sigma.py (pair sigma A / sqrt(W L), Pelgrom et al., IEEE JSSC 24(5),
    // 1989; Kinget's simple-stage form, IEEE JSSC 40(6), 2005; EKV gm/I_D, AICSP 8, 1995).
    // Quoted to 9 figures: 1e-8 relative covers that and the rounding of both computations.
    expect(Math.abs(report.analytic.sigma / 3.58378253e-3 - 1)).toBeLessThan(1e-8);
  });
});

describe('bad input: exit 2, one line naming the field, no stack, nothing on stdout', () => {
  it.each(invocations.map((inv) => [inv.label, inv] as const))('%s', (_label, inv) => {
    const r = results.get(inv.label);
    expect(r, 'the case was not run').toBeDefined();
    const { code, signal, stdout, stderr } = r!;
    const detail = `twinfet ${inv.args.join(' ')}\nstderr: ${stderr}`;
    expect(signal, detail).toBeNull();
    expect(code, detail).toBe(2);
    expect(stdout, detail).toBe('');
    const lines = stderr.trimEnd().split('\n');
    expect(lines, detail).toHaveLength(1);
    const line = lines[0]!;
    expect(line.startsWith('twinfet: '), detail).toBe(true);
    expect(/^\s+at /m.test(stderr), detail).toBe(false);
    expect(line, detail).not.toContain('internal error');
    for (const fragment of inv.expect) expect(line, detail).toContain(fragment);
  });
});

import { describe, expect, it } from 'vitest';
import { reportError } from '../src/main.js';
import { assertFinite, NonFiniteResultError, type Io } from '../src/output.js';
import { yieldBound, yieldText } from '../src/commands/inspect.js';

describe('the last guard before a report is printed', () => {
  it('passes finite numbers and null (not available), at any depth', () => {
    expect(() => assertFinite({ a: 1, b: [0, -2.5e-300, null], c: { d: Float64Array.of(1, 2) } })).not.toThrow();
  });
  it.each([
    [{ offset: { sigma: Number.NaN } }, 'report.offset.sigma'],
    [{ q: [1, Number.POSITIVE_INFINITY] }, 'report.q[1]'],
    [{ h: Float64Array.of(0, Number.NEGATIVE_INFINITY) }, 'report.h[1]'],
  ])('refuses %o, naming %s', (value, path) => {
    expect(() => assertFinite(value)).toThrow(NonFiniteResultError);
    expect(() => assertFinite(value)).toThrow(path);
  });
  it('turns into an internal-error line with exit code 1, nothing on stdout', () => {
    const out: string[] = [];
    const err: string[] = [];
    const io: Io = { out: (t) => out.push(t), err: (t) => err.push(t), errIsTty: false };
    let code = -1;
    try {
      assertFinite({ yield: { estimate: Number.NaN } });
    } catch (e) {
      code = reportError(io, e);
    }
    expect(code).toBe(1);
    expect(out).toEqual([]);
    expect(err).toHaveLength(1);
    expect(err[0]).toMatch(/^twinfet: internal error: report\.yield\.estimate is NaN; nothing was printed/);
  });
});

describe('yield text', () => {
  it('shows small yields with their digits, never as 0.0000 (format rule, no source)', () => {
    expect(yieldText(8e-8)).toBe('8.000e-8');
    expect(yieldText(0.0023)).toBe('0.0023');
    expect(yieldText(0.02301)).toBe('0.02301');
    expect(yieldText(0.99021)).toBe('0.99021');
    // A computed yield of exactly 1 (failure below double precision), and an interval end of 1.
    expect(yieldText(1)).toBe('1 (failure below double precision)');
    expect(yieldBound(1, 6)).toBe('1');
    expect(yieldBound(0.999631180085381, 6)).toBe('0.999631');
  });
});

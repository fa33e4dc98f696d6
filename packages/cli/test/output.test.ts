import { describe, expect, it } from 'vitest';
import { reportError } from '../src/main.js';
import { assertFinite, NonFiniteResultError, type Io } from '../src/output.js';

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

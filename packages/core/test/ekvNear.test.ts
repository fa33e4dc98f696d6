import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ekvInverseDifference, ekvInverseDifferenceNear, NEAR_HALF_WIDTH } from '../src/ekv.js';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';

interface Row {
  s0: number;
  x1: number;
  x2: number;
  dv: number;
}
// Reference: v(s1^2) - v(s2^2) = 2 ln(expm1(s1)/expm1(s2)) at s_i = s0 e^{x_i}, from the EKV
// inverse (Enz, Krummenacher & Vittoz 1995), in 60-digit decimal arithmetic by
// test/fixtures/ekv-near-reference.py (re-run it to regenerate the JSON).
const { rows } = JSON.parse(readFileSync(new URL('../../../test/fixtures/ekv-near-reference.json', import.meta.url), 'utf8')) as { rows: Row[] };

describe('ekvInverseDifferenceNear (series in the current-factor exponents)', () => {
  it('matches the 60-digit reference to 4 ulp of v1 - v2 over s0 = 0.14..0.95 and |x| <= 1/32', () => {
    // Tolerance 1e-15 relative (4.5 ulp): the cut is below 2e-20 of v1 - v2 and each of the
    // series' few roundings is relative to x1 - x2, not to ln(expm1(s)/s). Seen: 2.7e-16.
    expect(rows.length).toBe(360);
    let worst = 0;
    for (const r of rows) {
      const near = ekvInverseDifferenceNear(r.s0);
      expect(near).toBeDefined();
      worst = Math.max(worst, Math.abs(near!(r.x1, r.x2) - r.dv) / Math.abs(r.dv));
    }
    expect(worst).toBeLessThan(1e-15);
  });

  it('is more accurate than the closed form through exp, which loses digits on small differences', () => {
    // The closed form rounds s_i = s0 e^{x_i} before subtracting: for x1 - x2 of 1e-9 its
    // relative error is of order 1e-16 / 1e-9 (a measurement of the old path, not a bound).
    let worstClosed = 0;
    for (const r of rows) {
      const closed = ekvInverseDifference(r.s0 * Math.exp(r.x1), r.s0 * Math.exp(r.x2), r.x1 - r.x2);
      worstClosed = Math.max(worstClosed, Math.abs(closed - r.dv) / Math.abs(r.dv));
    }
    expect(worstClosed).toBeGreaterThan(1e-12);
  });

  it('is not offered where its series does not hold: s0 e^{1/32} > 1, s0 <= 0, NaN', () => {
    expect(ekvInverseDifferenceNear(0.97)).toBeUndefined(); // 0.97 e^{1/32} = 1.0008
    expect(ekvInverseDifferenceNear(0.969)).toBeDefined();
    expect(ekvInverseDifferenceNear(0)).toBeUndefined();
    expect(ekvInverseDifferenceNear(Number.NaN)).toBeUndefined();
  });
});

describe('simple stage: series for small exponents, closed form beyond', () => {
  // An invented weak-inversion pair (the process is a demo process, not foundry data).
  const design: Design = {
    name: 'series check',
    temperature: 300,
    topology: 'simple',
    tail: 20e-9,
    input: { polarity: 'n', w: 4e-6, l: 4e-6 },
    process: { n: { vt0: 0.45, slope: 1.3, kp: 300e-6, avt: 5e-9, abeta: 1e-8, rho: 0 } },
    spec: { offset: 5e-3, instances: 1 },
  };
  const stage = compileStage(design);
  const op = stage.operatingPoint[0]!;
  const s0 = Math.sqrt(op.ic);
  const sb = op.sigmaBeta;
  const nut = design.process.n!.slope * stage.thermalVoltage;

  it('a draw inside the series range: Vos = n U_T times the series at the stage\'s s0, exactly', () => {
    // u_vt = 0 on both sides, so Vos is n U_T (v1 - v2) alone; the exponents are within 1/32.
    const u = Float64Array.of(0, (-2 * 0.0117) / sb, 0, (2 * 0.019) / sb);
    const x1 = -0.5 * (sb * u[1]!);
    const x2 = -0.5 * (sb * u[3]!);
    expect(Math.max(Math.abs(x1), Math.abs(x2))).toBeLessThanOrEqual(NEAR_HALF_WIDTH);
    expect(stage.figure(u, 0)).toBe(nut * ekvInverseDifferenceNear(s0)!(x1, x2));
    // And the closed form agrees to its own rounding (1e-13 relative: the difference of two
    // rounded e^{x_i}, 3e-2 apart, loses about two digits).
    const closed = nut * ekvInverseDifference(s0 * Math.exp(x1), s0 * Math.exp(x2), x1 - x2);
    expect(Math.abs(stage.figure(u, 0) / closed - 1)).toBeLessThan(1e-13);
  });

  it('a draw beyond the series range takes the closed form, bit for bit', () => {
    const u = Float64Array.of(0.3, (-2 * 2 * NEAR_HALF_WIDTH) / sb, -0.1, 0.5);
    const z1 = sb * u[1]!;
    const z2 = sb * u[3]!;
    const sign = op.polarity === 'n' ? 1 : -1;
    const vos = sign * (op.sigmaVt * (u[0]! - u[2]!) + nut * ekvInverseDifference(s0 * Math.exp(-0.5 * z1), s0 * Math.exp(-0.5 * z2), -0.5 * (z1 - z2)));
    expect(stage.figure(u, 0)).toBe(vos);
  });
});

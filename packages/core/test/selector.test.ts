import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compileStage } from '../src/compileStage.js';
import type { Design } from '../src/design.js';
import { normalisedGmOverId, specificCurrent } from '../src/ekv.js';
import { linearisedSigma, varianceBudget } from '../src/linearised.js';
import { deviceSigmaBeta, deviceSigmaVt } from '../src/pelgrom.js';
import { cellCurrents } from '../src/stages/selector.js';
import { thermalVoltage } from '../src/thermal.js';
import { bruteLead } from './selectorBrute.js';
import { demoProcess, selectorDesign, simpleDesign } from './designs.js';

/** A selector of `cells` cells (invented demo process, not foundry data). */
const selector = selectorDesign;

const ut = thermalVoltage(300);
const n = demoProcess.n;
/** I_S of a 4/4 um n cell of the demo process, A. */
const IS = specificCurrent(n.slope, n.kp, 4e-6, 4e-6, ut);
const unit = fc.double({ min: -4, max: 4, noNaN: true });
const draws = (cells: number) => fc.array(unit, { minLength: 2 * cells, maxLength: 2 * cells }).map((a) => Float64Array.from(a));

describe('selector: identities', () => {
  it.each([
    ['weak (IC 0.02)', 2 * 0.02 * IS],
    ['moderate (IC 2)', 2 * 2 * IS],
    ['strong (IC 20)', 2 * 20 * IS],
  ])('N = 2 gives the simple pair offset for the same draws, %s, to 1e-12 relative (identity: the tie of two cells is the pair balance)', (_name, tail) => {
    const sel = compileStage(selector(2, tail));
    const pair = compileStage({ ...simpleDesign, tail, input: { polarity: 'n', w: 4e-6, l: 4e-6 } });
    // Both evaluate the same EKV expression from equal roots (the pair's at I_B/2, the selector's
    // solved at the node to rounding). Where the dV_T and current-factor parts cancel, rounding is
    // relative to the parts, of the order of the pair sigma, not to their difference: the
    // tolerance is 1e-12 of max(|Vos|, sigma).
    const sigma = linearisedSigma(pair);
    fc.assert(
      fc.property(draws(2), (u) => {
        const vos = pair.figure(u, 0);
        return Math.abs(sel.figure(u, 0) - vos) <= 1e-12 * Math.max(Math.abs(vos), sigma);
      }),
      { seed: 17, numRuns: 2000 },
    );
  });

  it('a p selector: the lead is written in magnitudes, so for N = 2 it is minus the p pair offset (1e-12 of max(|Vos|, sigma))', () => {
    const tail = 2e-6;
    const sel = compileStage(selector(2, tail, 6e-6, 1e-6, 'p'));
    const pair = compileStage({ ...simpleDesign, tail, input: { polarity: 'p', w: 6e-6, l: 1e-6 } });
    const sigma = linearisedSigma(pair);
    fc.assert(
      fc.property(draws(2), (u) => Math.abs(sel.figure(u, 0) + pair.figure(u, 0)) <= 1e-12 * Math.max(Math.abs(pair.figure(u, 0)), sigma)),
      { seed: 5, numRuns: 500 },
    );
  });

  it('no mismatch gives zero lead; exchanging two competitors leaves the lead unchanged (identity, exact)', () => {
    const st = compileStage(selector(6, 6 * 0.5 * IS));
    expect(st.figure(new Float64Array(12), 0)).toBe(0);
    fc.assert(
      fc.property(draws(6), fc.integer({ min: 1, max: 5 }), fc.integer({ min: 1, max: 5 }), (u, a, b) => {
        const v = Float64Array.from(u);
        v[2 * a] = u[2 * b]!;
        v[2 * a + 1] = u[2 * b + 1]!;
        v[2 * b] = u[2 * a]!;
        v[2 * b + 1] = u[2 * a + 1]!;
        // The node sum is taken in cell order, so an exchange can move the last bit: 1e-13 of sigma.
        return Math.abs(st.figure(v, 0) - st.figure(u, 0)) <= 1e-13 * 5e-3;
      }),
      { seed: 23, numRuns: 300 },
    );
  });

  it('the required lead is the largest of the pairwise leads (L > D exactly when some competitor beats cell 1 at D)', () => {
    const st = compileStage(selector(8, 8 * 1 * IS));
    const regions = st.failureComponents(10e-3);
    expect(regions).toHaveLength(7);
    expect(regions[0]!.label).toBe('M2 beats M1');
    fc.assert(
      fc.property(draws(8), (u) => {
        const pairwise = Math.max(...regions.map((r) => r.evaluate(u, 0)));
        // Same node solve with the tie term fixed instead of chosen: equal to rounding (1e-13 of sigma).
        return Math.abs(pairwise - st.figure(u, 0)) <= 1e-13 * 5e-3;
      }),
      { seed: 29, numRuns: 200 },
    );
  });

  it('sensitivities are those of cell 1 input offset: sigma_c^2 = sigma^2(dV_T) + (I_D/gm)^2 sigma^2(dbeta/beta) per device at I_B/N (Pelgrom 1989; Kinget 2005), 1e-12', () => {
    const d = selector(16, 16 * 2 * IS);
    const st = compileStage(d);
    const idOverGm = (n.slope * ut) / normalisedGmOverId(2);
    const expected = Math.hypot(deviceSigmaVt(n.avt, 4e-6, 4e-6), idOverGm * deviceSigmaBeta(n.abeta, 4e-6, 4e-6));
    expect(Math.abs(linearisedSigma(st) / expected - 1)).toBeLessThan(1e-12);
    expect(st.dimension).toBe(32);
    expect(st.linearisedLaw).toEqual({ kind: 'selection', populations: 16 });
    // The budget is of sigma_c^2: M1's two variables carry all of it.
    const shares = varianceBudget(st).filter((e) => e.share > 0).map((e) => e.device);
    expect(shares).toEqual(['M1', 'M1']);
    expect(st.operatingPoint.map((o) => o.device)).toEqual(['M1', 'M2..M16']);
    expect(Math.abs(st.operatingPoint[0]!.ic / 2 - 1)).toBeLessThan(1e-12);
  });

  it('a draw so far out that a current factor overflows is NaN and counted, never a number', () => {
    const d = { ...selector(4, 4 * IS, 0.1e-6, 0.1e-6), process: { n: { ...n, abeta: 1.4e-7 } } }; // sigma(dbeta/beta) 99%
    const st = compileStage(d);
    const u = new Float64Array(8 * 3);
    u[8 + 3] = 800; // M2 of the second sample: beta x e^792
    const out = new Float64Array(3);
    expect(st.figures(u, 3, out, 0)).toBe(1);
    expect(Number.isNaN(out[1]!)).toBe(true);
    expect(out[0]).toBe(0);
    expect(out[2]).toBe(0);
  });
});

describe('selector: against the exponential law in weak inversion (Mead, Analog VLSI and Neural Systems, 1989)', () => {
  it('nominal currents follow I_i/I_B = exp(kappa V_i/U_T) / sum_j exp(kappa V_j/U_T) within 0.5%, every cell at IC 0.3e-4 .. 1e-4 (computed from the exponential law)', () => {
    const kappa = 1 / n.slope;
    const cells = 8;
    // Gates spread over (U_T/kappa) ln(10/3), so the largest and smallest cell differ by 10/3 in
    // current; the tail puts the largest at IC = 1e-4. The EKV current is the exponential times
    // r(t) = (ln(1+t)/t)^2, t = expm1(sqrt IC), so each share is off by at most
    // r(t_min)/r(t_max) - 1 = 0.45% here (t from 0.0055 to 0.0101).
    fc.assert(
      fc.property(fc.array(fc.double({ min: 0, max: (ut / kappa) * Math.log(10 / 3), noNaN: true }), { minLength: cells, maxLength: cells }), (gates) => {
        const hiGate = Math.max(...gates);
        const loGate = Math.min(...gates);
        if (hiGate - loGate < 1e-3) return true; // the spread is what is tested; a flat input is trivially equal
        const weights = gates.map((v) => Math.exp((kappa * (v - hiGate)) / ut));
        const sum = weights.reduce((a, b) => a + b, 0);
        const tail = (1e-4 * IS * sum) / 1; // largest share weights[max]/sum = 1/sum of the tail
        const d = selector(cells, tail);
        const currents = cellCurrents(d, gates);
        return weights.every((wi, i) => Math.abs(currents[i]! / tail / (wi / sum) - 1) <= 0.005);
      }),
      { seed: 31, numRuns: 200 },
    );
  });

  it('N = 2: I_1 - I_2 = I_B tanh(kappa dV / 2 U_T) within 0.5% over |dV| <= 4 U_T/kappa at IC 1e-4 per device at balance (Mead 1989, the tanh law)', () => {
    const kappa = 1 / n.slope;
    const d = selector(2, 2 * 1e-4 * IS);
    for (let k = -40; k <= 40; k++) {
      if (k === 0) continue;
      const dv = ((k / 10) * ut) / kappa;
      const c = cellCurrents(d, [dv, 0]);
      const law = Math.tanh((kappa * dv) / (2 * ut));
      expect(Math.abs((c[0]! - c[1]!) / d.tail! / law - 1)).toBeLessThan(0.005);
    }
  });

  it('the required lead equals max_j [(V_T1 - V_Tj) + n U_T ln(beta_j/beta_1)] to the first-order term n U_T sqrt(IC) of the current-factor part (computed from the exponential law)', () => {
    const cells = 8;
    const tail = cells * 1e-4 * IS;
    const d = selector(cells, tail);
    const st = compileStage(d);
    const sVt = deviceSigmaVt(n.avt, 4e-6, 4e-6);
    const sB = deviceSigmaBeta(n.abeta, 4e-6, 4e-6);
    const nut = n.slope * ut;
    fc.assert(
      fc.property(draws(cells), (u) => {
        let weak = -Infinity;
        let tol = 0;
        for (let j = 1; j < cells; j++) {
          const lnRatio = sB * (u[2 * j + 1]! - u[1]!); // ln(beta_j / beta_1)
          weak = Math.max(weak, sVt * (u[0]! - u[2 * j]!) + nut * lnRatio);
          // The exact tie adds n U_T 2 [g(s_1) - g(s_j)], g(s) = ln(expm1(s)/s), |g'| <= 1/2 + s/6,
          // with s_1 - s_j = s_j expm1(ln ratio / 2) and s_j <= sqrt(I_B / (2 I_S,j)) (the two
          // tying cells share at most the tail). A maximum moves by at most the largest term.
          const sj = Math.sqrt(tail / (2 * IS * Math.exp(sB * u[2 * j + 1]!)));
          tol = Math.max(tol, nut * (1 + sj / 3) * sj * Math.abs(Math.expm1(lnRatio / 2)) * Math.max(1, Math.exp(lnRatio / 2)));
        }
        return Math.abs(st.figure(u, 0) - weak) <= tol + 1e-15;
      }),
      { seed: 37, numRuns: 300 },
    );
  });

  it('the winner share at lead D follows the exponential law e^{D/nU_T} / (e^{D/nU_T} + N - 1) within 0.5% at IC 1e-4 per cell at the tie', () => {
    const cells = 16;
    const st = compileStage(selector(cells, cells * 1e-4 * IS));
    const zero = new Float64Array(2 * cells);
    const nut = n.slope * ut;
    expect(Math.abs(st.response!.evaluate(zero, 0, 0) * cells - 1)).toBeLessThan(1e-12);
    for (const lead of [5e-3, 10e-3, 20e-3]) {
      const e = Math.exp(lead / nut);
      // The winner reaches IC 1e-4 e^{D/nU_T} N/(e^{D/nU_T} + N - 1) <= 1.7e-4 here (t = 0.0131
      // against 0.0095 for the others), so r(t) of the share check above moves it by 0.36% at most.
      expect(Math.abs(st.response!.evaluate(zero, 0, lead) / (e / (e + cells - 1)) - 1)).toBeLessThan(0.005);
    }
  });
});

describe('selector: the exact model against an independent brute-force solve', () => {
  it.each([
    ['moderate inversion (IC 2 per cell)', 2],
    ['strong inversion (IC 30 per cell)', 30],
  ])('%s: the lead agrees per sample to 1e-10 V (the brute force bisects to ~1e-14 V)', (_name, ic) => {
    const cells = 6;
    const d = { ...selector(cells, cells * ic * IS, 2e-6, 2e-6), process: { n: { ...n, abeta: 3e-8 } } }; // 1.06% dbeta per device
    const st = compileStage(d);
    fc.assert(
      fc.property(draws(cells), (u) => Math.abs(st.figure(u, 0) - bruteLead(d, u)) <= 1e-10),
      { seed: 41, numRuns: 40 },
    );
  });
});

import type { DeviceGeometry } from '../src/design.js';
/**
 * Reference checks of the stages that do not go through the code's own formulas: the linearised
 * sigma with a V_T / current-factor correlation in closed form, the sign of the offset for a
 * one-sigma V_T shift of each device derived from the sign convention, and the mirror's
 * orientation from two limits of the device law where its balance solves by hand.
 *
 * Everything is computed here from the published device law (EKV: Enz, Krummenacher & Vittoz,
 * AICSP 8:83-114, 1995; U_T = kT/q with the exact 2019 SI constants) and the per-device Pelgrom
 * convention sigma = A / sqrt(2 W L) (Pelgrom, Duinmaijer & Welbers, IEEE JSSC 24(5), 1989),
 * never from the stage's operating point or sensitivities.
 */
import { describe, expect, it } from 'vitest';
import { compileStage, linearisedSigma, type Design, type ProcessParams } from '../src/index.js';
import { correlatedSigma, idOverGm, thermal } from './closedForms.js';
import { demoProcess, mirrorDesign, simpleDesign } from './designs.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

/** A design with both polarities' rho set (the load's is given its own value). */
function withRho(d: Design, rhoIn: number, rhoLoad: number): Design {
  const inPol = d.input.polarity;
  const loadPol = inPol === 'n' ? 'p' : 'n';
  return {
    ...d,
    process: {
      [inPol]: { ...demoProcess[inPol], rho: rhoIn },
      [loadPol]: { ...demoProcess[loadPol], rho: rhoLoad },
    },
  };
}

const pSimple: Design = { ...simpleDesign, input: { polarity: 'p', w: 6e-6, l: 1e-6 } };
const pMirror: Design = { ...mirrorDesign, input: { polarity: 'p', w: 6e-6, l: 1e-6 }, load: { polarity: 'n', w: 2e-6, l: 2e-6 } };
/** Strong inversion (IC ~ 100): the current-factor terms are a large part of the sigma. */
const strongMirror: Design = { ...mirrorDesign, tail: 1e-3 };

describe('linearised sigma with a V_T / current-factor correlation (closed form derived above)', () => {
  const bases: [string, Design][] = [
    ['simple, n input', simpleDesign],
    ['simple, p input', pSimple],
    ['mirror, n input', mirrorDesign],
    ['mirror, p input', pMirror],
    ['mirror, strong inversion', strongMirror],
  ];
  const cases = bases.flatMap(([name, d]) =>
    ([-0.5, 0.3, 0.9] as const).map((rho) => [`${name}, rho = ${rho}`, withRho(d, rho, -0.6 * rho)] as const),
  );
  it.each(cases)('%s: equals the closed form to 1e-12 relative (rounding only)', (_name, d) => {
    // Both are the same first-order quantity computed along different routes: only rounding
    // (a few 1e-16 per operation on terms of one sign) separates them.
    expect(rel(linearisedSigma(compileStage(d)), correlatedSigma(d))).toBeLessThan(1e-12);
  });

  it('the correlation term is large on the strong-inversion mirror (so the check above has power)', () => {
    // rho = 0.9 against rho = 0 on the same design: the closed form moves by more than 5%, so a
    // dropped square root (sqrt(1 - rho^2) -> 1 - rho^2) or a flipped sign of rho shows.
    const d0 = correlatedSigma(withRho(strongMirror, 0, 0));
    const d9 = correlatedSigma(withRho(strongMirror, 0.9, -0.54));
    expect(Math.abs(d9 / d0 - 1)).toBeGreaterThan(0.05);
    expect(rel(linearisedSigma(compileStage(withRho(strongMirror, 0, 0))), d0)).toBeLessThan(1e-12);
  });
});

/** Vos for a single unit draw of variable j (all others zero), volts. */
function oneDraw(d: Design, j: number, value = 1): number {
  const st = compileStage(d);
  const u = new Float64Array(st.dimension);
  u[j] = value;
  return st.figure(u, 0);
}

/** Per-device sigma of dV_T, A_VT / sqrt(2 W L) (Pelgrom 1989, per-device convention). */
const sigmaVt = (p: ProcessParams, w: number, l: number): number => p.avt / Math.sqrt(2 * w * l);

describe('sign of the offset for a one-sigma |V_T| shift (derived from the sign convention)', () => {
  // Convention (README, "Offset"): Vos = V_G1 - V_G2, the gate-voltage difference that balances
  // the stage; a p device is described by magnitudes |V_T|, |V_GS|.
  //
  // M1's |V_T| one sigma high, n input: M1 needs one sigma more V_GS to carry its balance
  // current, so V_G1 is higher: Vos = +sigma. Its current factor is unchanged, and in both stages
  // the balance currents stay I_B/2 (simple: by definition; mirror: the matched load copies I1
  // exactly, so I2 = I1), so the offset is exactly +sigma(dV_T).
  // p input: one sigma more |V_GS1| = V_S - V_G1 means V_G1 is one sigma LOWER: Vos = -sigma.
  it.each([
    ['simple, n input', simpleDesign, +1],
    ['simple, p input', pSimple, -1],
    ['mirror, n input', mirrorDesign, +1],
    ['mirror, p input', pMirror, -1],
  ] as const)("%s: M1's |V_T| one sigma high gives Vos = %s sigma(dV_T) exactly", (_name, d, sign) => {
    const s = sigmaVt(d.process[d.input.polarity]!, d.input.w, d.input.l);
    // Simple: closed form, rounding only. Mirror: the balance solve stops at 1e-12 relative
    // current, which moves Vos by about (I_D/gm) 1e-12 < 1e-13 V: bound 1e-12 relative + 1e-14 V.
    const vos = oneDraw(d, 0);
    expect(Math.abs(vos - sign * s)).toBeLessThan(1e-12 * s + 1e-14);
    // M2's shift is the mirror image: the offset of the other sign.
    expect(Math.abs(oneDraw(d, 2) + sign * s)).toBeLessThan(1e-12 * s + 1e-14);
  });

  // M3 (the diode) |V_T| one sigma high, n input (p load): M4 sits at M3's |V_GS| with the lower
  // |V_T|, so it carries more than M3: I4 > I3 = I1. Balance needs I2 = I4 > I1, so M2 carries
  // more current than M1 and needs the higher gate voltage: V_G2 > V_G1, Vos < 0.
  // p input (n load): again I2 > I1, so |V_GS2| > |V_GS1|, V_G2 is the LOWER gate: Vos > 0.
  // M4's shift reverses each sign (M4 then carries less than M3).
  it.each([
    ['mirror, n input', mirrorDesign, -1],
    ['mirror, p input', pMirror, +1],
  ] as const)("%s: M3's |V_T| one sigma high gives Vos of sign %s, M4's the other", (_name, d, sign) => {
    const st = compileStage(d);
    const m3 = oneDraw(d, 4);
    const m4 = oneDraw(d, 6);
    expect(Math.sign(m3)).toBe(sign);
    expect(Math.sign(m4)).toBe(-sign);
    // Size, to first order: |Vos| = (gm_load / gm_in) sigma(dV_T,load) (Kinget 2005), computed
    // here from the EKV gm/I_D. The Taylor remainder of that first order is of relative size
    // (gm/I_D)_load sigma(dV_T,load), the relative change of M4's current (1.2% and 1.6% here).
    const pl = d.process[(d['load'] as DeviceGeometry).polarity]!;
    const pin = d.process[d.input.polarity]!;
    const kIn = idOverGm(pin, d.input.w, d.input.l, d.tail! / 2, d.temperature);
    const kL = idOverGm(pl, (d['load'] as DeviceGeometry).w, (d['load'] as DeviceGeometry).l, d.tail! / 2, d.temperature);
    const delta = sigmaVt(pl, (d['load'] as DeviceGeometry).w, (d['load'] as DeviceGeometry).l);
    const first = (kIn / kL) * delta;
    expect(rel(Math.abs(m3), first)).toBeLessThan(delta / kL);
    expect(rel(Math.abs(m4), first)).toBeLessThan(delta / kL);
    expect(st.dimension).toBe(8);
  });
});

describe('mirror orientation where the balance solves by hand', () => {
  // Square law (strong inversion): the EKV current I_S ln^2(1 + e^{v/2}) tends to
  // I_S (v/2)^2 = K V_ov^2 with K = beta / (2 n) (beta = KP W/L, V_ov = |V_GS| - |V_T|), with a
  // relative excess of about 4 e^{-v/2} / v (EKV 1995, strong-inversion limit).
  // Raise M3's |V_T| by delta: the diode gives sqrt(I1) = sqrt(K_L) V_ov3 and M4, at the same
  // |V_GS| with delta less |V_T|, sqrt(I4) = sqrt(I1) + sqrt(K_L) delta. At balance I2 = I4, and
  // the input pair (equal |V_T|) needs |V_GS1| - |V_GS2| = (sqrt(I1) - sqrt(I2)) / sqrt(K_in)
  //   = -delta sqrt(K_L / K_in),
  // exactly, for any delta: n input Vos = -delta sqrt(K_L/K_in), p input +delta sqrt(K_L/K_in)
  // (V_G = V_S - |V_GS| for p). Raising M4's |V_T| instead flips the sign.
  // Designs at IC from 1.9e4 to 1.2e5 (v/2 ~ sqrt(IC) > 130): e^{-v/2} < 1e-56; the balance solve
  // (1e-12 relative current) moves Vos by about V_ov 1e-12 ~ 3e-12 V: bound 1e-8 relative.
  const square = (polarity: 'n' | 'p'): Design => {
    const load = polarity === 'n' ? 'p' : 'n';
    return {
      name: 'square-law mirror (invented)',
      temperature: 300,
      topology: 'mirror',
      tail: 2e-3,
      input: { polarity, w: 1e-6, l: 20e-6 },
      load: { polarity: load, w: 1e-6, l: 10e-6 },
      process: demoProcess,
      spec: { offset: 10e-3, instances: 1 },
    };
  };
  it.each([
    ['n input', 'n', -1],
    ['p input', 'p', +1],
  ] as const)('%s: a one-sigma |V_T| shift of M3 and of M4 gives Vos = -/+ delta sqrt(K_L/K_in)', (_name, pol, sign) => {
    const d = square(pol);
    const pin = d.process[pol]!;
    const pl = d.process[(d['load'] as DeviceGeometry).polarity]!;
    const kIn = (pin.kp * d.input.w) / d.input.l / (2 * pin.slope);
    const kL = (pl.kp * (d['load'] as DeviceGeometry).w) / (d['load'] as DeviceGeometry).l / (2 * pl.slope);
    const delta = sigmaVt(pl, (d['load'] as DeviceGeometry).w, (d['load'] as DeviceGeometry).l);
    const want = sign * delta * Math.sqrt(kL / kIn);
    expect(rel(oneDraw(d, 4), want)).toBeLessThan(1e-8);
    expect(rel(oneDraw(d, 6), -want)).toBeLessThan(1e-8);
    // Four sigma: the square-law answer is exact at any shift, so the nonlinearity is tested too.
    expect(rel(oneDraw(d, 4, 4), 4 * want)).toBeLessThan(1e-8);
  });

  it('the same with the load at IC = 6e6 (sqrt IC = 2500, where e^{sqrt IC} is beyond doubles)', () => {
    // The balance must then be solved in the log domain; the square-law answer is as above.
    const d: Design = { ...square('n'), load: { polarity: 'p', w: 1e-6, l: 1e-3 } };
    const st = compileStage(d);
    expect(st.operatingPoint[2]!.ic).toBeGreaterThan(5e6);
    const pin = d.process.n!;
    const pl = d.process.p!;
    const kIn = (pin.kp * d.input.w) / d.input.l / (2 * pin.slope);
    const kL = (pl.kp * (d['load'] as DeviceGeometry).w) / (d['load'] as DeviceGeometry).l / (2 * pl.slope);
    const want = -sigmaVt(pl, (d['load'] as DeviceGeometry).w, (d['load'] as DeviceGeometry).l) * Math.sqrt(kL / kIn);
    expect(rel(oneDraw(d, 4), want)).toBeLessThan(1e-8);
    expect(rel(oneDraw(d, 6), -want)).toBeLessThan(1e-8);
  });

  // Exponential law (weak inversion, Mead, Analog VLSI and Neural Systems, 1989):
  // I = I_0 e^{(|V_GS| - |V_T|)/(n U_T)}. Raise M3's |V_T| by delta: M4 at the same |V_GS|
  // carries I4 = I3 e^{delta/(n_L U_T)}; at balance I2 = I4 = I1 e^{delta/(n_L U_T)}, and the
  // input pair needs |V_GS1| - |V_GS2| = n_in U_T ln(I1/I2) = -(n_in/n_L) delta, exactly.
  // EKV departs from the exponential by ln F(v) - v ~ -e^{v/2} = -sqrt(IC): the ratio of M4 to
  // M3 and the pair's log-ratio each carry a relative error of about sqrt(IC)/2 (computed from
  // the series of ln(ln(1 + x)/x)); bound 2 sqrt(IC) over the largest IC of the four devices.
  const weak = (polarity: 'n' | 'p'): Design => ({
    ...square(polarity),
    name: 'weak-inversion mirror (invented)',
    tail: 2e-12,
    input: { polarity, w: 20e-6, l: 1e-6 },
    load: { polarity: polarity === 'n' ? 'p' : 'n', w: 20e-6, l: 1e-6 },
  });
  it.each([
    ['n input', 'n', -1],
    ['p input', 'p', +1],
  ] as const)('%s: a one-sigma |V_T| shift of M3 and of M4 gives Vos = -/+ (n_in/n_L) delta', (_name, pol, sign) => {
    const d = weak(pol);
    const pin = d.process[pol]!;
    const pl = d.process[(d['load'] as DeviceGeometry).polarity]!;
    const ut = thermal(d.temperature);
    const icMax = Math.max(
      d.tail! / 2 / (2 * pin.slope * pin.kp * (d.input.w / d.input.l) * ut * ut),
      d.tail! / 2 / (2 * pl.slope * pl.kp * ((d['load'] as DeviceGeometry).w / (d['load'] as DeviceGeometry).l) * ut * ut),
    );
    expect(icMax).toBeLessThan(1e-6); // deep weak inversion, so the bound below is < 0.2%
    const delta = sigmaVt(pl, (d['load'] as DeviceGeometry).w, (d['load'] as DeviceGeometry).l);
    const want = sign * (pin.slope / pl.slope) * delta;
    expect(rel(oneDraw(d, 4), want)).toBeLessThan(2 * Math.sqrt(icMax));
    expect(rel(oneDraw(d, 6), -want)).toBeLessThan(2 * Math.sqrt(icMax));
  });
});

describe('mirror stage: a current factor beyond the range of doubles gives NaN, never +-Infinity', () => {
  it('the draws that leave the range are NaN and counted by offsets(), the others are written in place', () => {
    // sigma(dbeta/beta) = 30% per device: u_beta1 = 5000 makes I_S1 = I_S e^{1500} (beyond
    // doubles), so sqrt(IC1) underflows to 0 and V_G1 has no finite value.
    const side = Math.sqrt((1e-8 / 0.3) ** 2 / 2);
    const d: Design = { ...mirrorDesign, input: { polarity: 'n', w: side, l: side }, process: { n: { ...demoProcess.n, abeta: 1e-8 }, p: demoProcess.p } };
    const st = compileStage(d);
    const bad = Float64Array.of(0, 5000, 0, 0, 0, 0, 0, 0);
    expect(Number.isNaN(st.figure(bad, 0))).toBe(true);
    const u = new Float64Array(8 * 3);
    u.set(bad, 0);
    u[8] = 1; // second sample: M1's V_T one sigma high, exactly +sigma(dV_T) (see above)
    u.set(Float64Array.of(0, 0, 0, -5000, 0, 0, 0, 0), 16);
    const out = new Float64Array(5).fill(7);
    expect(st.figures(u, 3, out, 2)).toBe(2);
    expect(out[0]).toBe(7);
    expect(out[1]).toBe(7);
    expect(Number.isNaN(out[2]!)).toBe(true);
    expect(rel(out[3]!, sigmaVt(d.process.n!, side, side))).toBeLessThan(1e-9);
    expect(Number.isNaN(out[4]!)).toBe(true);
  });
});

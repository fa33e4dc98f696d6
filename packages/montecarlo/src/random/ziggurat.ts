import type { ChunkRng } from './stream.js';

/**
 * Standard-normal deviates by the ziggurat method with 128 layers.
 * Source: G. Marsaglia and W. W. Tsang, "The Ziggurat Method for Generating Random Variables",
 * J. Stat. Software 5(8), 2000 (tables and the base-strip tail algorithm as published, with
 * 53-bit uniforms for the tail and wedge tests). Exact: rejection, no approximation.
 * There is no state besides the generator's own (no cached spare deviate).
 */
const R = 3.442619855899; // right edge of the base strip
const V = 9.91256303526217e-3; // area of each layer
const M1 = 2147483648;
const KN = new Float64Array(128);
const WN = new Float64Array(128);
const FN = new Float64Array(128);
{
  let dn = R;
  let tn = dn;
  const q = V / Math.exp(-0.5 * dn * dn);
  KN[0] = Math.floor((dn / q) * M1);
  KN[1] = 0;
  WN[0] = q / M1;
  WN[127] = dn / M1;
  FN[0] = 1;
  FN[127] = Math.exp(-0.5 * dn * dn);
  for (let i = 126; i >= 1; i--) {
    dn = Math.sqrt(-2 * Math.log(V / dn + Math.exp(-0.5 * dn * dn)));
    KN[i + 1] = Math.floor((dn / tn) * M1);
    tn = dn;
    FN[i] = Math.exp(-0.5 * dn * dn);
    WN[i] = dn / M1;
  }
}
const INV_R = 1 / R;
// The same thresholds as int32 (each is below 2^31), so the fast path's test is two integer
// comparisons: |hz| < KN[iz] exactly when -k < hz < k (hz = -2^31 fails both ways).
const KI = Int32Array.from(KN);

/**
 * The wedge test of layer i (1..127) is y < e^{-x^2/2} for y = FN[i] + U (FN[i-1] - FN[i]) and
 * x_{i-1} <= |x| <= x_i (x_0 = 0, FN[0] = 1). It is decided without the exp call where a line
 * bounds e^{-x^2/2} on the layer: the density is concave below 1 and convex above, so on a
 * concave layer the chord through the layer's corners is below it and the tangents at the two
 * corners above it, and the other way round on a convex layer (the layer that holds x = 1 always
 * takes the exp). The lines are evaluated at max(|x|, x_{i-1}): below x_{i-1} every y of the layer
 * is accepted anyway, and there the clamped bounds are x_{i-1}'s own value, so the squeeze can
 * only accept. A margin of 1e-12 of FN[i-1] on either side is hundreds of times the rounding of
 * the table values, the lines and the exp call, so a squeeze decision is always the one the exp
 * comparison makes: the same deviates and the same stream (tested point by point against the
 * exp comparison, and deviate by deviate against the published algorithm).
 */
const WA = new Float64Array(128); // x_{i-1}, the layer's inner corner
const CHORD = new Float64Array(128); // slope of the chord from (x_{i-1}, FN[i-1]) to (x_i, FN[i])
const SLOPE_A = new Float64Array(128); // e^{-x^2/2}' at x_{i-1}: -x_{i-1} FN[i-1]
const SLOPE_B = new Float64Array(128); // ... at x_i: -x_i FN[i]
const CONVEX = new Uint8Array(128);
const MARGIN = new Float64Array(128);
for (let i = 1; i < 128; i++) {
  const a = i === 1 ? 0 : WN[i - 1]! * M1;
  const b = WN[i]! * M1;
  WA[i] = a;
  CHORD[i] = (FN[i]! - FN[i - 1]!) / (b - a);
  SLOPE_A[i] = -a * FN[i - 1]!;
  SLOPE_B[i] = -b * FN[i]!;
  CONVEX[i] = a >= 1 ? 1 : 0;
  MARGIN[i] = a >= 1 || b <= 1 ? 1e-12 * FN[i - 1]! : Infinity;
}

/**
 * The squeeze's verdict on the wedge test of layer iz (1..127) at x, y: 1 accept, -1 reject,
 * 0 undecided (the exp comparison decides). Exported for its test.
 */
export function wedgeSqueeze(iz: number, x: number, y: number): number {
  const a = WA[iz]!;
  const ax = Math.abs(x);
  const xc = ax > a ? ax : a;
  const fa = FN[iz - 1]!;
  const chord = fa + CHORD[iz]! * (xc - a);
  const tangentA = fa + SLOPE_A[iz]! * (xc - a);
  const tangentB = FN[iz]! + SLOPE_B[iz]! * (xc - WN[iz]! * M1);
  let lower: number;
  let upper: number;
  if (CONVEX[iz] === 1) {
    lower = tangentA > tangentB ? tangentA : tangentB;
    upper = chord;
  } else {
    lower = chord;
    upper = tangentA < tangentB ? tangentA : tangentB;
  }
  const m = MARGIN[iz]!;
  if (y <= lower - m) return 1;
  if (y >= upper + m) return -1;
  return 0;
}

/**
 * Exp calls of the wedge test since the last `takeWedgeExpCalls` (in this thread): one addition
 * on the rare path's rare branch. It measures the squeeze's work, which its cost test holds to
 * a budget.
 */
let expCalls = 0;

/** The wedge test's exp calls since the last call (this thread), and resets the count. */
export function takeWedgeExpCalls(): number {
  const c = expCalls;
  expCalls = 0;
  return c;
}

/** The wedge test of layer iz at x, y: the squeeze, and the exp comparison where it is undecided. */
function wedgeAccepts(iz: number, x: number, y: number): boolean {
  const v = wedgeSqueeze(iz, x, y);
  if (v !== 0) return v > 0;
  expCalls++;
  return y < Math.exp(-0.5 * x * x);
}

/** The right edge r of the base strip: beyond it every deviate comes from {@link normalTail}. */
export const ZIGGURAT_EDGE = R;

/**
 * One draw of |Z| conditioned on |Z| > r, r the base strip's edge (Marsaglia's tail method, as
 * in Marsaglia & Tsang 2000): x = -ln(U1)/r is proposed from the exponential, accepted when
 * -2 ln(U2) > x^2, that is with probability e^{-x^2/2}; the result is r + x.
 */
export function normalTail(rng: ChunkRng): number {
  let xx: number;
  let y: number;
  do {
    xx = -Math.log(rng.double()) * INV_R;
    y = -Math.log(rng.double());
  } while (y + y < xx * xx);
  return R + xx;
}

/** The rare path: outside the rectangles (2.8% of draws: every draw of the top layer, whose KN is 0, and each layer's edge). */
// The deviate is written to out[at] rather than returned: where the compiler does not inline
// this function (inside the Monte Carlo kernel it ran out of inlining budget), a returned double
// is boxed, one heap allocation per slow draw, 110 KB per 65536-sample chunk of the simple pair.
function slow(rng: ChunkRng, first: number, out: Float64Array, at: number): void {
  let hz = first;
  for (;;) {
    const iz = hz & 127;
    const x = hz * WN[iz]!;
    if (iz === 0) {
      const t = normalTail(rng);
      out[at] = hz > 0 ? t : -t;
      return;
    }
    if (wedgeAccepts(iz, x, FN[iz]! + rng.double() * (FN[iz - 1]! - FN[iz]!))) {
      out[at] = x;
      return;
    }
    hz = rng.int32();
    const jz = hz & 127;
    if (Math.abs(hz) < KN[jz]!) {
      out[at] = hz * WN[jz]!;
      return;
    }
  }
}

const ONE = new Float64Array(1);

/** One standard-normal deviate. */
export function standardNormal(rng: ChunkRng): number {
  const hz = rng.int32();
  const iz = hz & 127;
  if (Math.abs(hz) < KN[iz]!) return hz * WN[iz]!;
  slow(rng, hz, ONE, 0);
  return ONE[0]!;
}

/** The first word of the draw at which {@link fastRun} stopped. */
const PENDING = new Int32Array(1);

/**
 * Fills out[start..end) with independent standard-normal deviates: the same numbers as calling
 * `standardNormal` end - start times. The rectangles (97.2% of draws) are filled by
 * {@link fastRun}, which stops at the first draw outside them; that draw is finished here by the
 * rare path, which draws from the same generator, and the run resumes after it.
 */
export function fillStandardNormals(rng: ChunkRng, out: Float64Array, start: number, end: number): void {
  let i = start;
  for (;;) {
    i = fastRun(rng, out, i, end);
    if (i >= end) return;
    slow(rng, PENDING[0]!, out, i);
    i++;
  }
}

/**
 * Writes deviates to out[start..) while they fall in a rectangle and returns where it stopped:
 * `end`, or the index of the first draw that needs the rare path (its word in PENDING[0]). The
 * generator's state is kept in locals (its int32 step written out) and handed back to `rng` on
 * return. The loop holds no call: with the rare path called from inside it, the compiler kept the
 * loop's state on the stack around the call, and every draw paid for it (about 20% of the time
 * of a draw, measured warm). It takes two draws per pass (one loop test and one counter update
 * for both: another 10-20%); an odd last draw takes a pass of its own.
 */
function fastRun(rng: ChunkRng, out: Float64Array, start: number, end: number): number {
  // `| 0` tells the compiler the words are 32-bit integers (object fields hold them as doubles);
  // without it the loop's variables stay doubles and the draws are slower than seedrandom's.
  let x = rng.x | 0;
  let y = rng.y | 0;
  let z = rng.z | 0;
  let w = rng.w | 0;
  let v = rng.v | 0;
  let d = rng.d | 0;
  let i = start;
  let stopped = false;
  // The stopping draw's word, stored once below: a store that only the rare stops reach would
  // have no type feedback when the loop is optimised, and the optimised code was seen to bail
  // out there over and over (a chunk then ran at 1.7 times its usual time).
  let pending = 0;
  for (; i + 1 < end; i += 2) {
    // Two of xorwow's steps (as ChunkRng.int32): the second shifts in the first one's v.
    const t1 = x ^ (x >>> 2);
    const v1 = v ^ (v << 4) ^ (t1 ^ (t1 << 1));
    const t2 = y ^ (y >>> 2);
    const v2 = v1 ^ (v1 << 4) ^ (t2 ^ (t2 << 1));
    const d1 = (d + 362437) | 0;
    const d2 = (d1 + 362437) | 0;
    const h1 = (d1 + v1) | 0;
    const h2 = (d2 + v2) | 0;
    const i1 = h1 & 127;
    const i2 = h2 & 127;
    const k1 = KI[i1]!;
    const k2 = KI[i2]!;
    if (!(h1 < k1 && h1 > -k1)) {
      // The first draw needs the rare path: the state after one step.
      x = y;
      y = z;
      z = w;
      w = v;
      v = v1;
      d = d1;
      pending = h1;
      stopped = true;
      break;
    }
    out[i] = h1 * WN[i1]!;
    x = z;
    y = w;
    z = v;
    w = v1;
    v = v2;
    d = d2;
    if (!(h2 < k2 && h2 > -k2)) {
      pending = h2;
      i++;
      stopped = true;
      break;
    }
    out[i + 1] = h2 * WN[i2]!;
  }
  if (!stopped && i < end) {
    const t = x ^ (x >>> 2);
    x = y;
    y = z;
    z = w;
    w = v;
    v = v ^ (v << 4) ^ (t ^ (t << 1));
    d = (d + 362437) | 0;
    const hz = (d + v) | 0;
    const iz = hz & 127;
    const k = KI[iz]!;
    if (hz < k && hz > -k) {
      out[i] = hz * WN[iz]!;
      i++;
    } else {
      pending = hz;
    }
  }
  PENDING[0] = pending;
  rng.x = x;
  rng.y = y;
  rng.z = z;
  rng.w = w;
  rng.v = v;
  rng.d = d;
  return i;
}

import type { Design, DeviceGeometry } from '../design.js';
import { ekvInverseDifference, ekvInverseOfRoot, normalisedGmOverId } from '../ekv.js';
import { deviceBlock, deviceConstants, deviceOperatingPoint, deviceVariables, geometryWarnings, tailCurrent, type DeviceConstants } from '../elements.js';
import { DESIGN_LIMITS } from '../limits.js';
import { thermalVoltage } from '../thermal.js';
import { TAIL_FIELD } from './common.js';
import type { BlockDefinition, FailureComponent, FieldDefinition, FigureDefinition, StageDefinition, StageModel } from './definition.js';

/** Relative residual of sum_i I_i = I_B at which the common-node solve stops. */
export const SELECTOR_TOLERANCE = 1e-12;
/** Iteration cap of the common-node solve (bisection alone needs ~60 steps on any bracket). */
export const SELECTOR_MAX_ITERATIONS = 200;
/** Newton steps before the solve falls back to bisecting its bracket. */
const NEWTON_STEPS = 40;
/** Step of the bracket search while one side of the bracket is still open, in y = w/2. */
const OPEN_STEP = 16;

/**
 * N-input selector (winner-take-all): cells M1..MN with their sources joined at one node fed by
 * the tail current, sum_i I_i = I_B, each cell on the EKV saturation model (Enz, Krummenacher &
 * Vittoz, AICSP 8, 1995) with its own Pelgrom draws (per-device sigmas A / sqrt(2 W L)). Cell 1 is
 * the intended winner; its gate sits `lead` above the other N - 1 gates, which share one voltage
 * (the worst case for a given lead: any spread among the competitors only helps the winner).
 *
 * The figure is the required lead L: the smallest lead at which I_1 >= I_j for every j. Write
 * the competitors at the common source in w = (V_C - V_T0 - n V_S) / (n U_T) (V_C their gate),
 * so I_j = I_Sj F(w - d_j), d_j = dV_Tj / (n U_T), F the EKV forward current. Raising the lead
 * raises I_1 and, through the node, lowers every I_j, so at the smallest passing lead I_1 equals
 * the strongest competitor's current M(w) = max_j I_j(w), and the tail gives
 *   M(w) + sum_{j>=2} I_j(w) = I_B,
 * one equation in w whose left side increases strictly (O(N) per evaluation). With w* its root
 * and k the strongest competitor there, I_1 = I_k and cell 1's inverse EKV current gives
 *   L = (V_T1 - V_Tk) + n U_T [v(I_k / I_S1) - v(I_k / I_Sk)],
 * the pair's offset formula at the tie current I_k (for N = 2, I_k = I_B / 2: the simple pair).
 * In weak inversion this is L = max_j [(V_T1 - V_Tj) + n U_T ln(beta_j / beta_1)] (Mead, Analog
 * VLSI and Neural Systems, 1989: the exponential law). A p-cell is written in magnitudes, so its
 * lead is how much lower cell 1's gate must sit.
 *
 * The equation is solved in y = w/2 (then sqrt(IC_j) = softplus(y - d_j/2), one exp and one
 * log1p per cell) by guarded Newton on ln(sum I / I_B), which is linear in y in weak inversion,
 * inside a bracket narrowed from the residual's sign, bisecting when a step leaves it, to a
 * relative residual of 1e-12. A sample that does not converge is NaN (counted, never a number).
 * Sample layout: [M1 vt, M1 beta, M2 vt, M2 beta, ..., MN vt, MN beta].
 */

/** The root of the common-node solve. */
interface NodeRoot {
  /** y = w / 2 at the root. */
  y: number;
  /** The cell whose current ties with the winner's (-1 when none was asked for). */
  strongest: number;
  /** sqrt(IC) of that cell at the root. */
  root: number;
}

/**
 * Residual evaluations of the node solves (each a pass over the cells), summed since the last
 * `takeSelectorEvaluations` (in this thread): one addition per pass over the cells. It measures
 * the solves' work, which their cost test holds to a few passes per solve.
 */
let evaluations = 0;

/** The selector's residual evaluations summed since the last call (this thread), and resets the count. */
export function takeSelectorEvaluations(): number {
  const e = evaluations;
  evaluations = 0;
  return e;
}

/**
 * Solves sum_{j = from}^{n - 1} a_j l_j(y)^2 + extra(y) = 1 for y, with l_j = softplus(y - hd_j)
 * (= sqrt(I_j / I_Sj)) and a_j = I_Sj / I_B. `tie` selects the extra term: -1 none, -2 the
 * largest term (the strongest competitor), k >= 0 term k. Returns false when not converged.
 */
function solveNode(a: Float64Array, hd: Float64Array, from: number, n: number, tie: number, y0: number, out: NodeRoot): boolean {
  let y = y0;
  let lo = -Infinity;
  let hi = Infinity;
  for (let it = 0; it < SELECTOR_MAX_ITERATIONS; it++) {
    let s = 0;
    let ds = 0;
    let m = 0;
    let dm = 0;
    let k = -1;
    let lk = 0;
    let gk = 0;
    for (let j = from; j < n; j++) {
      const x = y - hd[j]!;
      let l: number;
      let g: number; // dl/dy = logistic(x)
      if (x > 0) {
        const e = Math.exp(-x);
        l = x + Math.log1p(e);
        g = 1 / (1 + e);
      } else {
        const e = Math.exp(x);
        l = Math.log1p(e);
        g = e / (1 + e);
      }
      const aj = a[j]!;
      const i = aj * l * l;
      const di = 2 * aj * l * g;
      s += i;
      ds += di;
      if (tie === -2 ? i > m : j === tie) {
        m = i;
        dm = di;
        k = j;
        lk = l;
        gk = g;
      }
    }
    const t = s + m;
    const h = t - 1;
    evaluations++;
    if (Math.abs(h) <= SELECTOR_TOLERANCE) {
      // The last Newton step costs no new evaluation: y and the tying cell's sqrt(IC) move to
      // first order (the neglected term is O(step^2), below 1e-24 from here), so the root is
      // exact to the rounding of the sums rather than to the 1e-12 the residual was asked for.
      const step = t > 0 && ds + dm > 0 ? -(t * Math.log(t)) / (ds + dm) : 0;
      out.y = y + step;
      out.strongest = k;
      out.root = lk + gk * step;
      return true;
    }
    if (h < 0) lo = y;
    else hi = y;
    // Newton on ln(t): its slope (ds + dm) / t is 2 in weak inversion and 2 / sqrt(IC) in strong.
    let next = it < NEWTON_STEPS && t > 0 && ds + dm > 0 ? y - (t * Math.log(t)) / (ds + dm) : Number.NaN;
    if (!(next > lo && next < hi)) {
      if (lo > -Infinity && hi < Infinity) next = 0.5 * (lo + hi);
      else next = h < 0 ? y + OPEN_STEP : y - OPEN_STEP; // the bracket is still open on that side
    }
    y = next;
  }
  return false;
}

/** softplus(x) = ln(1 + e^x) without overflow. */
function softplus(x: number): number {
  return x > 0 ? x + Math.log1p(Math.exp(-x)) : Math.log1p(Math.exp(x));
}

/** The number of cells of a validated selector design. */
function cellCount(design: Design): number {
  const n = design['cells'];
  if (typeof n !== 'number') throw new Error('internal: cells missing after validation');
  return n;
}

/** Per-sample scratch and constants of one compiled selector. */
interface SelectorCore {
  readonly cells: number;
  readonly nut: number;
  readonly sVt: number;
  /** y of the balance without mismatch (every cell at I_B / N). */
  readonly y0: number;
  /** Fills a_j, hd_j and z_j of every cell from the draws at u[base ..]. */
  load(u: Float64Array, base: number): void;
  readonly A: Float64Array;
  readonly HD: Float64Array;
  readonly Z: Float64Array;
  readonly root: NodeRoot;
  /** L for the cell `k` tying with cell 1 at the current root (draws at u[base ..]). */
  lead(u: Float64Array, base: number, k: number, rootK: number): number;
}

function selectorCore(design: Design, c: DeviceConstants, ut: number): SelectorCore {
  const cells = cellCount(design);
  const tail = tailCurrent(design);
  const nut = c.process.slope * ut;
  const sVt = c.sigmaVt;
  const halfD = (0.5 * sVt) / nut;
  const bR = c.betaFromVt;
  const bS = c.betaOwn;
  const a0 = c.specificCurrent / tail;
  const y0 = 0.5 * ekvInverseOfRoot(Math.sqrt(tail / cells / c.specificCurrent));
  const A = new Float64Array(cells);
  const HD = new Float64Array(cells);
  const Z = new Float64Array(cells);
  return {
    cells,
    nut,
    sVt,
    y0,
    A,
    HD,
    Z,
    root: { y: 0, strongest: -1, root: 0 },
    load(u, base) {
      for (let j = 0, b = base; j < cells; j++, b += 2) {
        const uv = u[b]!;
        const z = bR * uv + bS * u[b + 1]!;
        Z[j] = z;
        A[j] = a0 * Math.exp(z);
        HD[j] = halfD * uv;
      }
    },
    lead(u, base, k, rootK) {
      // I_1 = I_k: sqrt(I_k / I_S1) = sqrt(IC_k) e^{(z_k - z_1)/2}; the log of the ratio is known.
      const q = 0.5 * (Z[k]! - Z[0]!);
      const s1 = rootK * Math.exp(q);
      const dv = ekvInverseDifference(s1, rootK, s1 <= 1 && rootK <= 1 ? q : Number.NaN);
      const l = sVt * (u[base]! - u[base + 2 * k]!) + nut * dv;
      // A cell whose current underflowed has no finite tie: NaN, counted as not evaluated.
      return l - l === 0 ? l : Number.NaN;
    },
  };
}

/**
 * The drain currents of a selector's cells at given gate drives, amperes: sum_i I_i = I_B
 * solved at the common source to a relative residual of 1e-12.
 * @param design a validated selector design (SI units)
 * @param gatesV each cell's gate voltage relative to any common reference, volts (magnitudes
 *   for p-cells: a larger value is a stronger cell), one per cell
 * @param u the standard-normal draws, 2 per cell in sample order (default: no mismatch)
 * @example cellCurrents(design, Float64Array.of(0.01, 0, 0, 0)) // four currents summing to the tail
 */
export function cellCurrents(design: Design, gatesV: ArrayLike<number>, u: Float64Array = new Float64Array(2 * cellCount(design))): Float64Array {
  const ut = thermalVoltage(design.temperature);
  const c = deviceConstants(design, deviceBlock(design, 'input'), ut);
  const core = selectorCore(design, c, ut);
  const n = core.cells;
  if (gatesV.length !== n || u.length < 2 * n) throw new RangeError(`cellCurrents: need ${n} gate voltages and ${2 * n} draws`);
  core.load(u, 0);
  for (let j = 0; j < n; j++) core.HD[j] = core.HD[j]! - (0.5 * gatesV[j]!) / core.nut;
  const out = new Float64Array(n);
  if (!solveNode(core.A, core.HD, 0, n, -1, core.y0, core.root)) return out.fill(Number.NaN);
  const tail = tailCurrent(design);
  for (let j = 0; j < n; j++) {
    const l = softplus(core.root.y - core.HD[j]!);
    out[j] = tail * core.A[j]! * l * l;
  }
  return out;
}

function compileSelector(design: Design): StageModel {
  const ut = thermalVoltage(design.temperature);
  const geometry: DeviceGeometry = deviceBlock(design, 'input');
  const c = deviceConstants(design, geometry, ut);
  const core = selectorCore(design, c, ut);
  const { cells, nut, sVt, y0, A, HD, root } = core;
  const dim = 2 * cells;
  const perCell = tailCurrent(design) / cells;

  const figures = (u: Float64Array, count: number, out: Float64Array, outBase: number): number => {
    let failed = 0;
    for (let i = 0, b = 0; i < count; i++, b += dim) {
      core.load(u, b);
      let l = Number.NaN;
      if (solveNode(A, HD, 1, cells, -2, y0, root) && root.strongest > 0) l = core.lead(u, b, root.strongest, root.root);
      out[outBase + i] = l;
      if (l !== l) failed++;
    }
    return failed;
  };
  const oneOut = new Float64Array(1);
  const figure = (u: Float64Array, base: number): number => {
    const one = base === 0 ? u : u.subarray(base, base + dim);
    figures(one, 1, oneOut, 0);
    return oneOut[0]!;
  };

  /** The lead at which cell 1 ties with cell k alone (the boundary of "k beats 1"). */
  const pairwiseLead = (k: number) => (u: Float64Array, base: number): number => {
    core.load(u, base);
    if (!solveNode(A, HD, 1, cells, k, y0, root)) return Number.NaN;
    return core.lead(u, base, k, root.root);
  };
  const failureComponents = (limit: number): FailureComponent[] =>
    Array.from({ length: cells - 1 }, (_, j) => ({ label: `M${j + 2} beats M1`, side: 1 as const, target: limit, evaluate: pairwiseLead(j + 1) }));

  const response = {
    label: "winner's share of the tail",
    input: 'lead',
    evaluate: (u: Float64Array, base: number, lead: number): number => {
      core.load(u, base);
      HD[0] = HD[0]! - (0.5 * lead) / nut;
      if (!solveNode(A, HD, 0, cells, -1, y0, root)) return Number.NaN;
      const l = softplus(root.y - HD[0]!);
      const share = A[0]! * l * l;
      return share - share === 0 ? share : Number.NaN;
    },
  };

  // Linearised (first order at the tie, every cell at I_B / N): cell i's effective input offset
  // x_i = dV_Ti - (I_D/gm) dbeta_i/beta (a larger current factor makes a cell stronger, so it
  // needs less gate) and L ~ max_j (x_1 - x_j). The sensitivities are those of x_1, so their
  // sigma is the per-cell sigma_c of the selection law.
  const op = deviceOperatingPoint('M1', 'input', c, perCell, ut);
  const idOverGm = nut / normalisedGmOverId(op.ic);
  const sensitivities = new Float64Array(dim);
  sensitivities[0] = sVt - idOverGm * c.betaFromVt;
  sensitivities[1] = -idOverGm * c.betaOwn;

  const variables = [];
  for (let j = 1; j <= cells; j++) variables.push(...deviceVariables(`M${j}`, 'input', c));
  return {
    thermalVoltage: ut,
    variables,
    sensitivities,
    linearisedLaw: { kind: 'selection', populations: cells },
    failureSymmetry: { groupSize: 2 },
    response,
    operatingPoint: [op, { ...op, device: cells === 2 ? 'M2' : `M2..M${cells}` }],
    warnings: geometryWarnings('input', c),
    figure,
    figures,
    failureComponents,
  };
}

/** `cells`: how many inputs the selector compares. */
const CELLS_FIELD: FieldDefinition = {
  key: 'cells',
  dimension: 'dimensionless',
  what: 'input cells',
  example: 'cells: 16',
  limits: DESIGN_LIMITS.cells,
  unit: '',
  required: true,
  integer: true,
};

/** Every cell's device (the count comes from `cells`). */
const SELECTOR_CELLS: BlockDefinition = {
  key: 'input',
  kind: 'mos',
  elements: ['M1', 'M2', '...', 'MN'],
  label: 'cells',
  polarity: 'any',
  fields: [],
  example: () => '{ polarity: n, w: 4 um, l: 4 um }',
  sizable: true,
};

/** The lead of cell 1's gate over the others that it needs to carry the largest current. */
const LEAD_FIGURE: FigureDefinition = {
  name: 'lead',
  specKey: 'separation',
  label: 'required lead',
  symbol: 'L',
  unit: 'V',
  sided: 'one',
  dimension: 'voltage',
  limits: DESIGN_LIMITS.offset,
  example: 'separation: 10 mV',
  note: 'the required lead is a maximum over the competitors, so its distribution is not symmetric (skewed to large leads): read its quantiles, not mean +- k sigma',
};

/** `topology: selector`: N cells with joined sources (winner-take-all, maximum selector). */
export const SELECTOR_STAGE: StageDefinition = {
  topology: 'selector',
  summary: 'N-input selector (winner-take-all): cells with joined sources on one tail current',
  fields: [CELLS_FIELD, TAIL_FIELD],
  blocks: [SELECTOR_CELLS],
  figure: LEAD_FIGURE,
  compile: compileSelector,
};

import type { FailureComponent, Stage } from '@twinfet/core';
import { normalUpperTail } from '../stats/normal.js';

/** The most probable failure point of one failure region (for a pair: Vos = +spec or -spec). */
export interface DesignPoint {
  /** The region's label (`+spec`, `-spec`, or the stage's own). */
  readonly label: string;
  /** +1 where failure is above the target, -1 below it. */
  readonly side: 1 | -1;
  /** Coordinates in standard-normal space, one per stage variable. */
  readonly u: readonly number[];
  /** |u|: the FORM reliability index (sigma distance). */
  readonly distance: number;
  /** FORM estimate of this side's failure probability, Phi(-distance). */
  readonly form: number;
  /** 'hl-rf' when the HL-RF iteration converged, 'line-search' when the fallback was used. */
  readonly method: 'hl-rf' | 'line-search';
  readonly iterations: number;
  /** The region's function at the point (equals the target to the solve tolerance). */
  readonly offset: number;
}

const FD_STEP = 1e-5;
/** Relative step size below which HL-RF counts as settled (see the loop). */
const MOVE_TOLERANCE = 1e-6;
/** The fallback line search looks this many sigmas out at most (Phi(-r) underflows from ~38). */
const LINE_SEARCH_MAX = 4096;

type Evaluate = FailureComponent['evaluate'];

function gradient(f: Evaluate, u: Float64Array, out: Float64Array, scratch: Float64Array): void {
  for (let j = 0; j < u.length; j++) {
    scratch.set(u);
    scratch[j] = u[j]! + FD_STEP;
    const up = f(scratch, 0);
    scratch[j] = u[j]! - FD_STEP;
    const dn = f(scratch, 0);
    out[j] = (up - dn) / (2 * FD_STEP);
  }
}

function norm(u: Float64Array): number {
  let s = 0;
  for (const x of u) s += x * x;
  return Math.sqrt(s);
}

/**
 * The linearised direction of a region's function at u = 0: the stage's sensitivities for its
 * own figure, a central-difference gradient for another function.
 */
function startDirection(stage: Stage, f: Evaluate): Float64Array {
  if (f === stage.figure) return stage.sensitivities;
  return gradientAtZero(f, stage.dimension);
}

/** The central-difference gradient of f at u = 0 in `dim` variables. */
export function gradientAtZero(f: Evaluate, dim: number): Float64Array {
  const g = new Float64Array(dim);
  gradient(f, new Float64Array(dim), g, new Float64Array(dim));
  return g;
}

/**
 * Finds u* = argmin |u| subject to f(u) = target on the exact model, f the region's function.
 * HL-RF iteration (Hasofer & Lind, J. Eng. Mech. Div. ASCE 100, 1974; Rackwitz & Fiessler,
 * Computers & Structures 9, 1978) from the linearised direction, with step halving when the
 * constraint residual grows; if it does not settle, a line search along the linearised
 * direction finds a boundary point instead (reported as such).
 */
export function findDesignPoint(stage: Stage, component: FailureComponent): DesignPoint {
  return searchDesignPoint(stage.dimension, component, startDirection(stage, component.evaluate));
}

/**
 * The HL-RF search of findDesignPoint in a standard-normal space of `dim` variables, from the
 * direction `s` (the function's gradient at 0, or an approximation of it).
 */
export function searchDesignPoint(dim: number, component: FailureComponent, s: Float64Array): DesignPoint {
  const f = component.evaluate;
  const target = component.target;
  let s2 = 0;
  for (const x of s) s2 += x * x;
  const u = new Float64Array(dim);
  for (let j = 0; j < dim; j++) u[j] = (target * s[j]!) / s2;
  const g = new Float64Array(dim);
  const scratch = new Float64Array(dim);
  const next = new Float64Array(dim);
  const tol = 1e-9 * Math.abs(target);
  let converged = false;
  let k = 0;
  for (; k < 200; k++) {
    const v = f(u, 0);
    if (!Number.isFinite(v)) break;
    gradient(f, u, g, scratch);
    let gg = 0;
    let gu = 0;
    for (let j = 0; j < dim; j++) {
      gg += g[j]! * g[j]!;
      gu += g[j]! * u[j]!;
    }
    if (!(gg > 0)) break;
    // HL-RF update: the point of the linearised boundary closest to the origin.
    const c = (gu - (v - target)) / gg;
    let step = 1;
    for (let half = 0; half < 60; half++) {
      for (let j = 0; j < dim; j++) next[j] = u[j]! + step * (c * g[j]! - u[j]!);
      if (Number.isFinite(f(next, 0))) break;
      step *= 0.5; // only where the full step leaves the model's finite range
    }
    let delta = 0;
    for (let j = 0; j < dim; j++) {
      delta += (next[j]! - u[j]!) ** 2;
      u[j] = next[j]!;
    }
    const moved = Math.sqrt(delta);
    // The central-difference gradient carries rounding noise of relative size ~eps |u| / FD_STEP,
    // which turns the point about the origin by ~1e-7 |u| per step at |u| ~ 600 (large pairs at
    // a loose spec) while the distance and the residual have settled: 1e-6 |u| is above that
    // noise and still far below what matters for FORM or for a sampling shift.
    if (moved < MOVE_TOLERANCE * Math.max(1, norm(u)) && Math.abs(f(u, 0) - target) <= tol) {
      converged = true;
      break;
    }
  }
  let method: DesignPoint['method'] = 'hl-rf';
  if (!converged) {
    method = 'line-search';
    lineSearch(f, s, component, u);
  }
  const distance = norm(u);
  return { label: component.label, side: component.side, u: Array.from(u), distance, form: normalUpperTail(distance), method, iterations: k, offset: f(u, 0) };
}

/** Fallback: along the linearised direction s, bisect f(r d) = target for r. */
function lineSearch(f: Evaluate, s: Float64Array, component: FailureComponent, u: Float64Array): void {
  const dim = u.length;
  const { side, target } = component;
  const n = norm(Float64Array.from(s));
  const d = new Float64Array(dim);
  for (let j = 0; j < dim; j++) d[j] = (side * s[j]!) / n;
  const at = (r: number): number => {
    for (let j = 0; j < dim; j++) u[j] = r * d[j]!;
    return side * (f(u, 0) - target);
  };
  let lo = 0;
  let hi = 1;
  while (at(hi) < 0 && hi < LINE_SEARCH_MAX) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-12 * hi; i++) {
    const mid = 0.5 * (lo + hi);
    if (at(mid) < 0) lo = mid;
    else hi = mid; // also where the model has no finite value: the search stays inside it
  }
  // Never end on a point whose offset is not finite (it would reach the report as NaN).
  if (!Number.isFinite(at(hi))) at(lo);
}

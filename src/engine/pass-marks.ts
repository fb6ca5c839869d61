import type { PassData } from './pass-fit';
import { aspectSineTrig, P, PASS_PARAMS } from './pass-model';
import { finiteShare, summarize as summarizeAll, type Estimate } from './stats';

/*
 * Each mark's place, range, elevation and aspect over the bootstrap's fitted passes (pass-series.ts):
 * the draws' motion worked out once, then read at every mark's time. Column scratch is reused, as a
 * pass at the mark limit has thousands of marks and hundreds of draws.
 */

export interface PassMarkFigures {
  t: number;
  /** slant range camera to object */
  range: Estimate;
  horizontalRange: Estimate;
  /** the object's elevation, rad */
  elevation: Estimate;
  /** the marked axis's angle to the line of sight, rad (pi/2: square on) */
  aspect: Estimate;
  /** the object's place relative to the observer on the ground: x along the road ahead, y toward its side, m */
  x: Estimate;
  y: Estimate;
}

const markCols = Array.from({ length: 6 }, () => new Float64Array(0));

/** Numbers kept per draw by kinematics. */
const KIN = 7;

/**
 * Each kept draw's motion as every mark's figures need it: relativePosition's and aspectSine's
 * arithmetic with the trigonometry of the draw's pass done once, not once per mark (the same
 * operations in the same order, so the same numbers).
 */
export function kinematics(fitted: Float64Array, fittedU: Float64Array, draws: number): Float64Array {
  const k = new Float64Array(draws * KIN).fill(Number.NaN);
  for (let i = 0; i < draws; i++) {
    const u = fittedU[i]!;
    if (u !== u) continue;
    const o = PASS_PARAMS * i;
    const cb = Math.cos(fitted[o + P.beta]!);
    const sb = Math.sin(fitted[o + P.beta]!);
    const w = fitted[o + P.w]!;
    const rho = fitted[o + P.rho]!;
    const b = KIN * i;
    k[b] = fitted[o + P.xr]!;
    k[b + 1] = w * cb - u;
    k[b + 2] = rho * Math.cos(fitted[o + P.eps]!);
    k[b + 3] = w * sb;
    k[b + 4] = rho * Math.sin(fitted[o + P.eps]!);
    k[b + 5] = cb;
    k[b + 6] = sb;
  }
  return k;
}

/** One mark's figures over the kept draws' fitted passes (NaN where a draw was not kept). */
export function markFigures(t: number, tr: number, axis: PassData['axis'], kin: Float64Array, draws: number, tail: number): PassMarkFigures {
  if (markCols[0]!.length < draws) for (let c = 0; c < 6; c++) markCols[c] = new Float64Array(draws);
  const [R, Rh, el, asp, px, py] = markCols as [Float64Array, Float64Array, Float64Array, Float64Array, Float64Array, Float64Array];
  const tau = t - tr;
  for (let i = 0; i < draws; i++) {
    const b = KIN * i;
    const x0 = kin[b]!;
    if (x0 !== x0) {
      R[i] = Rh[i] = el[i] = asp[i] = px[i] = py[i] = Number.NaN;
      continue;
    }
    const rx = x0 + kin[b + 1]! * tau;
    const ry = kin[b + 2]! + kin[b + 3]! * tau;
    const rz = kin[b + 4]!;
    const rh = Math.hypot(rx, ry);
    R[i] = Math.hypot(rh, rz);
    Rh[i] = rh;
    el[i] = Math.atan2(rz, rh);
    asp[i] = Math.asin(Math.min(1, aspectSineTrig(axis, kin[b + 5]!, kin[b + 6]!, rx, ry, rz)));
    px[i] = rx;
    py[i] = ry;
  }
  // the columns are scratch: summarized in place, without summarizeOrNull's copy
  const est = (a: Float64Array) => (finiteShare(a, draws) > 0 ? summarizeAll(a, draws, tail) : null)!;
  return { t, range: est(R), horizontalRange: est(Rh), elevation: est(el), aspect: est(asp), x: est(px), y: est(py) };
}

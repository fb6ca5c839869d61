import { MAX_SPEED_MS } from './constants';
import { InputError } from './errors';
import { FIT_OUT, FIT_OUT_LENGTH, FitStatus, fitRangeOverTimeDrawKernel } from './fit';
import { Rng } from './rng';
import { finiteShare, summarize, type Estimate } from './stats';
import {
  checkMarkedPass,
  checkOptions,
  Columns,
  fillSpanRangeRows,
  fillSinAspect,
  fillTanHalf,
  fillUniform,
  type Band,
  type SolveOptions,
  type SpanMark,
  type Tuple,
} from './uncertainty';
import { band } from './validate';

/*
 * Range over time with its uncertainty: the same object marked at several timestamps, propagated
 * through the range-over-time fit. A module of its own, so that the overlay, which needs only
 * single-frame figures, does not carry the fit.
 */
export interface SeriesScene {
  frame: { widthPx: number; heightPx: number };
  hfov: Band;
  /** The same object at every timestamp: one size and aspect band (drawn once per draw, shared). */
  object: { size: Band; aspect: Band };
  marks: { t: number; span: SpanMark }[];
  observerSpeed?: Band;
}

export interface SeriesResult {
  closestApproach: Estimate;
  relativeSpeed: Estimate;
  tClosest: Estimate;
  /** Object ground speed for each reading of the direction of travel, where the draws allow it. */
  objectSpeed?: { opposite?: Estimate; sameSlower?: Estimate; sameFaster?: Estimate };
  /** Share of draws whose fit failed (degenerate resample); they are left out of the figures. */
  failedShare: number;
  draws: number;
  seed: number;
}

const seriesColumns = new Columns();

/**
 * Parametric bootstrap through the range-over-time fit: each draw redraws the shared size, aspect
 * and field of view, perturbs every marked end by its edge uncertainty, recomputes every range and
 * refits. Size and field-of-view errors scale every range together, so they are drawn once per draw,
 * not per mark: that correlation is what makes the interval on the closest approach honest.
 */
export function solveSeries(scene: SeriesScene, options: SolveOptions = {}): SeriesResult {
  const { draws, seed } = checkOptions(options, 2_000);
  const { W, H } = checkMarkedPass(scene, 3, 'a range-over-time fit');
  const marks = scene.marks;
  if (scene.observerSpeed) band('observer speed', scene.observerSpeed.lo, scene.observerSpeed.hi, 0, MAX_SPEED_MS, ' m/s');

  const n = marks.length;
  const t = new Float64Array(n);
  // relative range error from the two ends' noise, sqrt(2) sigma / span (small-angle), for the fit's weights
  const relSigma = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const m = marks[k]!;
    t[k] = m.t;
    relSigma[k] = Math.max((Math.SQRT2 * m.span.edgeSigmaPx) / Math.hypot(m.span.x2 - m.span.x1, m.span.y2 - m.span.y1), 1e-6);
  }
  const out = new Float64Array(FIT_OUT_LENGTH);
  const work = new Float64Array(3 * n);
  const col = (k: number) => seriesColumns.get(k, draws);
  const [dp, vr, t0, wOpp, wSlow, wFast, tanHalf, scale, sinA, u, normals] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10].map(col) as Tuple<11>;
  // draws x marks, row-major: each draw's fit reads its ranges in one run (measured faster than
  // mark by mark, where a draw's fit reads across the array)
  const rows = seriesColumns.get(11, draws * n);
  const rng = new Rng(seed);
  const us = scene.observerSpeed;

  // shared by every mark of a draw: one camera, one object
  fillTanHalf(rng, scene.hfov, tanHalf, draws);
  fillUniform(rng, scene.object.size, scale, draws);
  fillSinAspect(rng, scene.object.aspect, sinA, draws);
  multiplyInPlace(scale, sinA, draws);
  for (let k = 0; k < n; k++) fillSpanRangeRows(rng, marks[k]!.span, W, H, tanHalf, scale, normals, rows, k, n, draws);
  if (us) fillUniform(rng, us, u, draws);

  const failed = fitDraws(t, rows, relSigma, n, draws, u, { out, work, dp, vr, t0, wOpp, wSlow, wFast });
  if (failed === draws) {
    throw new InputError('timestamps', `${n} marks`, 'ranges that follow one straight pass (no draw could be fitted)');
  }
  const result: SeriesResult = {
    closestApproach: summarize(dp, draws),
    relativeSpeed: summarize(vr, draws),
    tClosest: summarize(t0, draws),
    failedShare: failed / draws,
    draws,
    seed,
  };
  if (us) {
    // a direction is reported only if a real share of draws supports it (else the reading is impossible)
    const pick = (c: Float64Array) => (finiteShare(c, draws) >= 0.05 ? summarize(c, draws) : undefined);
    const opposite = pick(wOpp);
    const sameSlower = pick(wSlow);
    const sameFaster = pick(wFast);
    result.objectSpeed = {};
    if (opposite) result.objectSpeed.opposite = opposite;
    if (sameSlower) result.objectSpeed.sameSlower = sameSlower;
    if (sameFaster) result.objectSpeed.sameFaster = sameFaster;
  }
  return result;
}

interface DrawColumns {
  out: Float64Array;
  work: Float64Array;
  dp: Float64Array;
  vr: Float64Array;
  t0: Float64Array;
  wOpp: Float64Array;
  wSlow: Float64Array;
  wFast: Float64Array;
}

/*
 * The per-draw refits, in a function of their own that ends in a bare return: V8 compiles a long loop
 * on the fly during the first solve, before the code after it has ever run, and a compiled loop
 * followed by code without type feedback bailed out on every later solve (see stats.ts).
 * Returns the number of draws whose fit failed; their columns hold NaN.
 */
function fitDraws(t: Float64Array, rows: Float64Array, relSigma: Float64Array, n: number, draws: number, u: Float64Array, c: DrawColumns): number {
  const { out, work, dp, vr, t0, wOpp, wSlow, wFast } = c;
  let failed = 0;
  for (let i = 0, at = 0; i < draws; i++, at += n) {
    let bad = false;
    for (let k = 0; k < n; k++) if (!(rows[at + k]! > 0)) bad = true;
    const status = bad ? -1 : fitRangeOverTimeDrawKernel(t, rows, at, 1, relSigma, n, out, work);
    if (status !== FitStatus.OK) {
      failed++;
      dp[i] = vr[i] = t0[i] = wOpp[i] = wSlow[i] = wFast[i] = Number.NaN;
      continue;
    }
    const V = out[FIT_OUT.relativeSpeed]!;
    const ui = u[i]!;
    dp[i] = out[FIT_OUT.closestApproach]!;
    vr[i] = V;
    t0[i] = out[FIT_OUT.tClosest]!;
    // the three readings of the direction of travel (fit.ts objectSpeedFromRelative, per draw)
    wOpp[i] = V >= ui ? V - ui : Number.NaN;
    wSlow[i] = V <= ui ? ui - V : Number.NaN;
    wFast[i] = ui + V;
  }
  return failed;
}

function multiplyInPlace(a: Float64Array, b: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) a[i] = a[i]! * b[i]!;
}

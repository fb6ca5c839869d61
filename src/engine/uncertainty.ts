import { rayAngleUnchecked } from './camera';
import { MAX_FRAME_PX, MAX_RANGE_M, MAX_SIZE_M, MAX_SPEED_MS, MAX_TIME_S } from './constants';
import { InputError } from './errors';
import { FIT_OUT, FIT_OUT_LENGTH, FitStatus, fitRangeOverTimeKernel } from './fit';
import { parallelFixedPointFraction } from './fixedpoint';
import { rangeUnchecked } from './range';
import { Rng } from './rng';
import { finiteShare, summarize, type Estimate } from './stats';
import { impliedSpeedFromLandmark } from './speed';
import { band, finite, inRange, integer, positive } from './validate';

/*
 * Monte Carlo propagation of every input range to every result. Each draw picks one value for
 * every uncertain input (size, aspect, field of view, observer speed: uniform over their bands;
 * each marked end: moved along its span by a normal error with the mark's edge uncertainty) and runs
 * the plain-number kernels. The edge uncertainty is where an edge lies along the span line (that is
 * how edges are snapped); a shift across the span changes the angle only to second order. Draw
 * columns are preallocated typed arrays, so a draw allocates nothing. Results are the median and
 * the 5-95 % interval; a draw in which a kernel rejects its inputs (e.g. a span that noise shrank
 * to nothing) is dropped, and the share of kept draws is reported.
 */

/** An input known only to lie between lo and hi (same units as its field). lo = hi is exact. */
export interface Band {
  lo: number;
  hi: number;
}

/** Two marked ends in camera-frame pixels (0,0 top-left of the camera frame) with their uncertainty. */
export interface SpanMark {
  x1: number;
  y1: number;
  x2: number;
  y2: number;
  /** Standard deviation of each end's position along the span, pixels. */
  edgeSigmaPx: number;
}

export interface MarkedBody {
  span: SpanMark;
  /** True size of the marked dimension, metres. */
  size: Band;
  /** Aspect angle, radians (pi/2 broadside). */
  aspect: Band;
}

export interface FrameScene {
  frame: { widthPx: number; heightPx: number };
  /** Horizontal field of view of the camera frame, radians. */
  hfov: Band;
  object: MarkedBody;
  /** A landmark the object seems pinned over, on the same sight line. */
  landmark?: MarkedBody;
  /** Observer's ground speed along its road, m/s (>= 0). */
  observerSpeed?: Band;
  /** An assumed signed object speed along the road (m/s) for the fixed point when no landmark is marked. */
  objectSpeed?: Band;
}

export type RegimeShares = { between: number; beyond: number; behind: number; none: number };

export interface FrameResult {
  angularSize: Estimate;
  range: Estimate;
  landmarkRange?: Estimate;
  /** Signed object speed along the observer's direction of travel, m/s (negative: opposite). */
  impliedSpeed?: Estimate;
  /** Fixed point as a fraction of the way from observer to object. */
  fixedPointFraction?: Estimate;
  /** Fixed point's distance from the observer along the sight line, metres. */
  fixedPointDistance?: Estimate;
  /** How often each regime came up over the draws (sums to 1 over the kept draws). */
  regimeShares?: RegimeShares;
  keptShare: number;
  draws: number;
  seed: number;
}

export interface SolveOptions {
  draws?: number;
  seed?: number;
}

const DEFAULT_DRAWS = 20_000;
const DEFAULT_SEED = 1;

/** Reusable column storage: solving the same size twice (a live readout) allocates nothing new. */
class Columns {
  private store: Float64Array[] = [];
  get(k: number, n: number): Float64Array {
    let c = this.store[k];
    if (!c || c.length < n) {
      c = new Float64Array(n);
      this.store[k] = c;
    }
    return c;
  }
}
const frameColumns = new Columns();

export function solveFrame(scene: FrameScene, options: SolveOptions = {}): FrameResult {
  const { draws, seed } = checkOptions(options);
  const W = scene.frame?.widthPx;
  const H = scene.frame?.heightPx;
  positive('camera frame width', W, MAX_FRAME_PX, ' px');
  positive('camera frame height', H, MAX_FRAME_PX, ' px');
  checkHfov(scene.hfov);
  checkBody('object', scene.object, W, H);
  if (scene.landmark) checkBody('landmark', scene.landmark, W, H);
  if (scene.observerSpeed) band('observer speed', scene.observerSpeed.lo, scene.observerSpeed.hi, 0, MAX_SPEED_MS, ' m/s');
  if (scene.objectSpeed) {
    band('assumed object speed', scene.objectSpeed.lo, scene.objectSpeed.hi, -MAX_SPEED_MS, MAX_SPEED_MS, ' m/s');
  }

  const theta = frameColumns.get(0, draws);
  const range = frameColumns.get(1, draws);
  const dRange = frameColumns.get(2, draws);
  const speed = frameColumns.get(3, draws);
  const frac = frameColumns.get(4, draws);
  const fdist = frameColumns.get(5, draws);
  const rng = new Rng(seed);
  const { object: obj, landmark: lm, observerSpeed: us, objectSpeed: ws, hfov } = scene;
  const wantsFixedPoint = !!us && (!!lm || !!ws);
  const shares = { between: 0, beyond: 0, behind: 0, none: 0 };
  const objDir = directionOf(obj.span);
  const lmDir = lm ? directionOf(lm.span) : objDir;

  for (let i = 0; i < draws; i++) {
    const tanHalf = Math.tan(draw(rng, hfov) / 2);
    const th = drawAngle(rng, obj.span, objDir, W, H, tanHalf);
    theta[i] = th;
    const R = rangeOrNaN(draw(rng, obj.size), th, draw(rng, obj.aspect));
    range[i] = R;
    const d = lm ? rangeOrNaN(draw(rng, lm.size), drawAngle(rng, lm.span, lmDir, W, H, tanHalf), draw(rng, lm.aspect)) : NaN;
    dRange[i] = d;
    if (!wantsFixedPoint) continue;
    const u = draw(rng, us!);
    let s: number;
    if (lm) {
      // the landmark is the fixed point: s = d / R (intercept theorem)
      s = d / R;
      speed[i] = Number.isFinite(s) && u > 0 ? impliedSpeedFromLandmark(u, R, d) : NaN;
    } else {
      const w = draw(rng, ws!);
      s = parallelFixedPointFraction(u, w);
      speed[i] = w;
    }
    frac[i] = Number.isFinite(s) ? s : NaN;
    if (!lm) fdist[i] = Number.isFinite(s) && Number.isFinite(R) ? s * R : NaN;
    if (!Number.isFinite(R)) continue;
    if (!Number.isFinite(s)) shares.none++;
    else if (s < 0) shares.behind++;
    else if (s > 1) shares.beyond++;
    else shares.between++;
  }

  const keptShare = finiteShare(range, draws);
  const result: FrameResult = {
    angularSize: summarize(theta, draws),
    range: summarize(range, draws),
    keptShare,
    draws,
    seed,
  };
  if (lm) result.landmarkRange = summarize(dRange, draws);
  if (wantsFixedPoint) {
    const total = shares.between + shares.beyond + shares.behind + shares.none;
    if (finiteShare(frac, draws) > 0) {
      result.fixedPointFraction = summarize(frac, draws);
      // with a landmark, the fixed point is the landmark: its distance is the landmark's range
      result.fixedPointDistance = lm ? result.landmarkRange! : summarize(fdist, draws);
    }
    if (lm && finiteShare(speed, draws) > 0) result.impliedSpeed = summarize(speed, draws);
    if (total > 0) {
      result.regimeShares = {
        between: shares.between / total,
        beyond: shares.beyond / total,
        behind: shares.behind / total,
        none: shares.none / total,
      };
    }
  }
  return result;
}

/* ---------------------------------------------------------------------------------------------- */
/* Range over time: the same object at several timestamps, propagated through the fit.            */

export interface SeriesScene {
  frame: { widthPx: number; heightPx: number };
  hfov: Band;
  /** The same object at every timestamp: one size and aspect band (drawn once per draw, shared). */
  object: { size: Band; aspect: Band };
  marks: { t: number; span: SpanMark }[];
  observerSpeed?: Band;
}

export interface SeriesResult {
  /** Range at each mark, in the order given. */
  ranges: Estimate[];
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
  const W = scene.frame?.widthPx;
  const H = scene.frame?.heightPx;
  positive('camera frame width', W, MAX_FRAME_PX, ' px');
  positive('camera frame height', H, MAX_FRAME_PX, ' px');
  checkHfov(scene.hfov);
  band('object size', scene.object?.size?.lo, scene.object?.size?.hi, 0.001, MAX_SIZE_M, ' m');
  checkAspect('object aspect angle', scene.object.aspect);
  const marks = scene.marks;
  if (!Array.isArray(marks) || marks.length < 3) {
    throw new InputError('timestamps', marks, 'at least 3 marked timestamps for a range-over-time fit');
  }
  marks.forEach((m, i) => {
    inRange(`timestamp ${i + 1}`, m.t, 0, MAX_TIME_S, ' s');
    if (i > 0 && !(m.t > marks[i - 1]!.t)) {
      throw new InputError(`timestamp ${i + 1}`, m.t, `later than timestamp ${i} (${marks[i - 1]!.t} s)`);
    }
    checkSpan(`object span at timestamp ${i + 1}`, m.span, W, H);
  });
  if (scene.observerSpeed) band('observer speed', scene.observerSpeed.lo, scene.observerSpeed.hi, 0, MAX_SPEED_MS, ' m/s');

  const n = marks.length;
  const t = Float64Array.from(marks, (m) => m.t);
  const r = new Float64Array(n);
  const sig = new Float64Array(n);
  const out = new Float64Array(FIT_OUT_LENGTH);
  const spanPx = Float64Array.from(marks, (m) => Math.hypot(m.span.x2 - m.span.x1, m.span.y2 - m.span.y1));
  const dirs = marks.map((m) => directionOf(m.span));
  const perMark: Float64Array[] = marks.map((_, k) => seriesColumns.get(10 + k, draws));
  const dp = seriesColumns.get(0, draws);
  const vr = seriesColumns.get(1, draws);
  const t0 = seriesColumns.get(2, draws);
  const wOpp = seriesColumns.get(3, draws);
  const wSlow = seriesColumns.get(4, draws);
  const wFast = seriesColumns.get(5, draws);
  const rng = new Rng(seed);
  const us = scene.observerSpeed;
  let failed = 0;

  for (let i = 0; i < draws; i++) {
    const tanHalf = Math.tan(draw(rng, scene.hfov) / 2);
    const L = draw(rng, scene.object.size);
    const a = draw(rng, scene.object.aspect);
    let bad = false;
    for (let k = 0; k < n; k++) {
      const span = marks[k]!.span;
      const R = rangeOrNaN(L, drawAngle(rng, span, dirs[k]!, W, H, tanHalf), a);
      perMark[k]![i] = R;
      r[k] = R;
      // relative range error from the two ends' noise: sqrt(2) sigma / span (small-angle)
      sig[k] = R * Math.max((Math.SQRT2 * span.edgeSigmaPx) / spanPx[k]!, 1e-6);
      if (!Number.isFinite(R)) bad = true;
    }
    const status = bad ? -1 : fitRangeOverTimeKernel(t, r, sig, n, out);
    if (status !== FitStatus.OK) {
      failed++;
      dp[i] = vr[i] = t0[i] = wOpp[i] = wSlow[i] = wFast[i] = NaN;
      continue;
    }
    const V = out[FIT_OUT.relativeSpeed]!;
    dp[i] = out[FIT_OUT.closestApproach]!;
    vr[i] = V;
    t0[i] = out[FIT_OUT.tClosest]!;
    if (us) {
      const u = draw(rng, us);
      wOpp[i] = V >= u ? V - u : NaN;
      wSlow[i] = V <= u ? u - V : NaN;
      wFast[i] = u + V;
    }
  }

  if (failed === draws) {
    throw new InputError('timestamps', `${n} marks`, 'ranges that follow one straight pass (no draw could be fitted)');
  }
  const result: SeriesResult = {
    ranges: perMark.map((c) => summarize(c, draws)),
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

/* ---------------------------------------------------------------------------------------------- */

function draw(rng: Rng, b: Band): number {
  return b.lo === b.hi ? b.lo : rng.between(b.lo, b.hi);
}

/*
 * The loop's kernels: the inputs were validated once up front, so each draw runs the unchecked
 * arithmetic (camera.ts, range.ts) and turns a degenerate draw into NaN, which summarize drops.
 */
function drawAngle(rng: Rng, s: SpanMark, dir: SpanDirection, W: number, H: number, tanHalf: number): number {
  const e1 = s.edgeSigmaPx * rng.normal();
  const e2 = s.edgeSigmaPx * rng.normal();
  const th = rayAngleUnchecked(s.x1 - dir.x * e1, s.y1 - dir.y * e1, s.x2 + dir.x * e2, s.y2 + dir.y * e2, W, H, tanHalf);
  return th > 0 ? th : NaN;
}

/** Unit vector from a span's first end to its second (computed once, outside the loop). */
interface SpanDirection {
  x: number;
  y: number;
}
function directionOf(s: SpanMark): SpanDirection {
  const len = Math.hypot(s.x2 - s.x1, s.y2 - s.y1);
  return { x: (s.x2 - s.x1) / len, y: (s.y2 - s.y1) / len };
}

function rangeOrNaN(size: number, theta: number, aspect: number): number {
  const r = rangeUnchecked(size, theta, aspect);
  return r > 0 && r <= MAX_RANGE_M ? r : NaN;
}

function checkOptions(o: SolveOptions, defaultDraws = DEFAULT_DRAWS): { draws: number; seed: number } {
  const draws = o.draws ?? defaultDraws;
  const seed = o.seed ?? DEFAULT_SEED;
  integer('draws', draws, 100, 1_000_000);
  integer('seed', seed, 0, 0xffffffff);
  return { draws, seed };
}

function checkHfov(b: Band): void {
  const deg = 180 / Math.PI;
  if (!b) throw new InputError('horizontal field of view', b, 'a band of degrees between 0 and 180');
  // checked in degrees, because that is what the user typed
  band('horizontal field of view', b.lo * deg, b.hi * deg, 1e-6, 179.999, ' deg');
}

function checkAspect(field: string, b: Band): void {
  const deg = 180 / Math.PI;
  if (!b) throw new InputError(field, b, 'a band of degrees, more than 0 and less than 180');
  band(field, b.lo * deg, b.hi * deg, 1e-6, 179.999, ' deg');
}

function checkBody(name: string, body: MarkedBody, W: number, H: number): void {
  if (!body) throw new InputError(name, body, 'a marked span with a size band and aspect');
  checkSpan(`${name} span`, body.span, W, H);
  band(`${name} size`, body.size?.lo, body.size?.hi, 0.001, MAX_SIZE_M, ' m');
  checkAspect(`${name} aspect angle`, body.aspect);
}

function checkSpan(field: string, s: SpanMark, W: number, H: number): void {
  if (!s) throw new InputError(field, s, 'two marked ends');
  // one pixel of slack: an end marked on the frame's edge may sit just past it after sub-pixel snapping
  inRange(`${field}: first end x`, s.x1, -1, W + 1, ' px');
  inRange(`${field}: first end y`, s.y1, -1, H + 1, ' px');
  inRange(`${field}: second end x`, s.x2, -1, W + 1, ' px');
  inRange(`${field}: second end y`, s.y2, -1, H + 1, ' px');
  inRange(`${field}: edge uncertainty`, s.edgeSigmaPx, 0, 50, ' px');
  const len = Math.hypot(finite(`${field}`, s.x2 - s.x1), s.y2 - s.y1);
  if (len < 0.5) throw new InputError(`${field} length`, len, 'at least 0.5 px between the two ends');
}

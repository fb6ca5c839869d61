import { MAX_FRAME_PX, MAX_RANGE_M, MAX_SIZE_M, MAX_SPEED_MS } from './constants';
import { InputError } from './errors';
import { parallelFixedPointFraction } from './fixedpoint';
import { pitchFromKnownElevationUnchecked, rayElevationUnchecked, tiltFromCentredHorizon } from './orientation';
import { footDistanceUnchecked } from './range';
import { Rng } from './rng';
import { finiteShare, summarize, type Estimate } from './stats';
import { impliedSpeedUnchecked } from './speed';
import {
  band,
  positive,
} from './validate';
import {
  checkAspect,
  checkHfov,
  checkOptions,
  checkSpan,
  Columns,
  fillHalfTans,
  fillRanges,
  fillSinAspect,
  fillTanHalf,
  fillUniform,
  type Band,
  type RegimeShares,
  type SolveOptions,
  type SpanMark,
  type Tuple,
} from './uncertainty';

/*
 * One frame's figures by Monte Carlo (uncertainty.ts holds the passes): the object's slant range from
 * its span and an assumed aspect, its elevation and horizontal range where the frame gives the tilt
 * (a marked horizon, an upright landmark's foot, a fixed pitch) or an elevation is assumed, and with a
 * landmark the object seems pinned over, the landmark's distance, the motionless point on the ground
 * and the implied speed. The overlay's live readout runs this, so it imports nothing heavier.
 */

export interface MarkedBody {
  span: SpanMark;
  /** True size of the marked dimension, metres. */
  size: Band;
  /** Aspect angle, radians (pi/2 broadside). */
  aspect: Band;
}

/**
 * A landmark's span. A height stands on the ground (its lower end the foot) and has no aspect; a
 * width is level and is foreshortened only by an aspect given for it (absent: square on).
 */
export interface LandmarkBody {
  span: SpanMark;
  size: Band;
  dimension?: 'height' | 'width';
  aspect?: Band;
}

/** Two points on the true horizon in camera-frame pixels, each good to sigmaPx. */
export interface HorizonLine {
  x1: number;
  y1: number;
  x2: number;
  y2: number;
  sigmaPx: number;
}

export interface FrameScene {
  frame: { widthPx: number; heightPx: number };
  /** Horizontal field of view of the camera frame, radians. */
  hfov: Band;
  object: MarkedBody;
  /** A landmark the object seems pinned over, on the same sight line. */
  landmark?: LandmarkBody;
  /** Observer's ground speed along its road, m/s (>= 0). */
  observerSpeed?: Band;
  /** An assumed signed object speed along the road (m/s) for the fixed point when no landmark is marked. */
  objectSpeed?: Band;
  /**
   * Where the object's elevation comes from, in this order: a horizon marked on this frame, a height
   * landmark's foot (with the camera's height), a fixed camera's pitch, an assumed elevation band
   * (rad). With none of them, horizontal distances are not given and a landmark is weighed against
   * the object's slant range.
   */
  horizon?: HorizonLine;
  pitch?: Band;
  elevation?: Band;
  /** The camera's height above the ground, m (default 1 to 3 m, a car or a train: common practice). */
  cameraHeight?: Band;
}


export interface FrameResult {
  angularSize: Estimate;
  /** slant range camera to object */
  range: Estimate;
  /** the object's horizontal range and elevation (rad), when something gives the elevation */
  horizontalRange?: Estimate;
  elevation?: Estimate;
  elevationSource: 'horizon' | 'landmark' | 'pitch' | 'assumed' | null;
  /** slant range to the landmark's mid point */
  landmarkRange?: Estimate;
  /** horizontal range to the landmark's foot */
  landmarkHorizontalRange?: Estimate;
  /** Signed object speed along the observer's direction of travel, m/s (negative: opposite). */
  impliedSpeed?: Estimate;
  /** Fixed point as a fraction of the way from observer to object, along the horizontal sight line. */
  fixedPointFraction?: Estimate;
  /** Fixed point's horizontal distance from the observer along the sight line, metres. */
  fixedPointDistance?: Estimate;
  /** How often each regime came up over the draws (sums to 1 over the kept draws). */
  regimeShares?: RegimeShares;
  keptShare: number;
  draws: number;
  seed: number;
}


const frameColumns = new Columns();

export function solveFrame(scene: FrameScene, options: SolveOptions = {}): FrameResult {
  const { draws, seed, tail } = checkOptions(options);
  const W = scene.frame?.widthPx;
  const H = scene.frame?.heightPx;
  positive('camera frame width', W, MAX_FRAME_PX, ' px');
  positive('camera frame height', H, MAX_FRAME_PX, ' px');
  checkHfov(scene.hfov);
  checkBody('object', scene.object, W, H);
  if (scene.landmark) checkLandmark(scene.landmark, W, H);
  if (scene.observerSpeed) band('observer speed', scene.observerSpeed.lo, scene.observerSpeed.hi, 0, MAX_SPEED_MS, ' m/s');
  if (scene.objectSpeed) {
    band('assumed object speed', scene.objectSpeed.lo, scene.objectSpeed.hi, -MAX_SPEED_MS, MAX_SPEED_MS, ' m/s');
  }
  if (scene.horizon) checkSpan('horizon', { ...scene.horizon, edgeSigmaPx: scene.horizon.sigmaPx }, W, H);
  if (scene.pitch) band('camera pitch', scene.pitch.lo / DEG_RAD, scene.pitch.hi / DEG_RAD, -89, 89, ' deg');
  if (scene.elevation) band('object elevation', scene.elevation.lo / DEG_RAD, scene.elevation.hi / DEG_RAD, -30, 85, ' deg');
  const hc = scene.cameraHeight ?? DEFAULT_CAMERA_HEIGHT;
  band('camera height', hc.lo, hc.hi, 0, 1000, ' m');

  const { object: obj, landmark: lm, observerSpeed: us, objectSpeed: ws, hfov } = scene;
  const wantsFixedPoint = !!us && (!!lm || !!ws);
  const n = draws;
  const col = (k: number) => frameColumns.get(k, n);
  const [theta, range, dRange, speed, frac, fdist, tanHalf, work, size, sinA, elev, hRange, dHoriz, lmHalf] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13].map(col) as Tuple<14>;
  const rng = new Rng(seed);

  // Column passes rather than one loop per draw: each pass is small enough for the kernels to be
  // inlined into it, which keeps doubles unboxed (no garbage per draw) and the loops tight.
  fillTanHalf(rng, hfov, tanHalf, n);
  fillHalfTans(rng, obj.span, W, H, tanHalf, theta, n);
  fillUniform(rng, obj.size, size, n);
  fillSinAspect(rng, obj.aspect, sinA, n);
  fillRanges(size, sinA, theta, range, n);
  fillAnglesFromHalfTans(theta, n); // the angular size itself, for display
  const footed = !!lm && (lm.dimension ?? 'height') === 'height';
  if (lm) {
    fillHalfTans(rng, lm.span, W, H, tanHalf, lmHalf, n);
    fillUniform(rng, lm.size, size, n);
    if (footed || !lm.aspect) sinA.fill(1, 0, n);
    else fillSinAspect(rng, lm.aspect, sinA, n);
    fillRanges(size, sinA, lmHalf, dRange, n);
    fillUniform(rng, hc, work, n); // camera height
    if (footed) fillFootDistances(size, lmHalf, work, dHoriz, dRange, n);
    else dHoriz.set(dRange.subarray(0, n));
  }
  const source = elevationSource(scene, footed);
  if (source) {
    fillElevation(rng, scene, source, tanHalf, dHoriz, work, elev, n);
    for (let i = 0; i < n; i++) hRange[i] = range[i]! * Math.cos(elev[i]!);
  }
  let shares: RegimeShares | null = null;
  if (wantsFixedPoint) {
    // against the landmark's foot, the object's horizontal range; with no elevation, its slant range
    const objH = source ? hRange : range;
    const lmH = lm ? dHoriz : dRange;
    fillUniform(rng, us!, work, n); // observer speed
    if (lm) fillLandmarkFixedPoint(objH, lmH, work, frac, speed, n);
    else {
      fillUniform(rng, ws!, speed, n); // assumed object speed
      fillParallelFixedPoint(work, speed, objH, frac, fdist, n);
    }
    shares = regimeShares(frac, range, n);
  }

  const keptShare = finiteShare(range, draws);
  const result: FrameResult = {
    angularSize: summarize(theta, draws, tail),
    range: summarize(range, draws, tail),
    elevationSource: source,
    keptShare,
    draws,
    seed,
  };
  if (source && finiteShare(hRange, n) > 0) {
    result.horizontalRange = summarize(hRange, n, tail);
    result.elevation = summarize(elev, n, tail);
  }
  if (lm) {
    result.landmarkRange = summarize(dRange, draws, tail);
    if (finiteShare(dHoriz, n) > 0) result.landmarkHorizontalRange = summarize(dHoriz, n, tail);
  }
  if (wantsFixedPoint) {
    if (finiteShare(frac, n) > 0) {
      result.fixedPointFraction = summarize(frac, n, tail);
      // with a landmark, the fixed point is the landmark: its distance is the landmark's
      result.fixedPointDistance = lm ? (result.landmarkHorizontalRange ?? result.landmarkRange!) : summarize(fdist, n, tail);
    }
    if (lm && finiteShare(speed, n) > 0) result.impliedSpeed = summarize(speed, n, tail);
    if (shares) result.regimeShares = shares;
  }
  return result;
}

const DEG_RAD = Math.PI / 180;
/** A camera in a car or a train: 1 to 3 m above the ground (common practice). */
export const DEFAULT_CAMERA_HEIGHT: Band = { lo: 1, hi: 3 };

function elevationSource(scene: FrameScene, footed: boolean): FrameResult['elevationSource'] {
  if (scene.horizon) return 'horizon';
  if (footed) return 'landmark';
  if (scene.pitch) return 'pitch';
  if (scene.elevation) return 'assumed';
  return null;
}

/**
 * The object's elevation per draw, from the source chosen; the object's ray is its span's mid point.
 * Column passes with scalar kernels: no object per draw (elevation from a horizon or a landmark's
 * foot costs trigonometry for each of 20 000 draws, and an allocation there doubled the solve).
 */
function fillElevation(
  rng: Rng,
  scene: FrameScene,
  source: NonNullable<FrameResult['elevationSource']>,
  tanHalf: Float64Array,
  footRange: Float64Array,
  cameraHeight: Float64Array,
  out: Float64Array,
  n: number,
): void {
  const { widthPx: W, heightPx: H } = scene.frame;
  if (source === 'assumed') {
    fillUniform(rng, scene.elevation!, out, n);
    return;
  }
  const pitch = frameColumns.get(14, n);
  const roll = frameColumns.get(15, n);
  const a = frameColumns.get(16, n);
  const b = frameColumns.get(17, n);
  if (source === 'horizon') {
    const hz = scene.horizon!;
    rng.fillNormal(a, n, hz.sigmaPx);
    rng.fillNormal(b, n, hz.sigmaPx);
    fillHorizonTilts(hz, W, H, tanHalf, a, b, pitch, roll, n);
  } else if (source === 'landmark') {
    const lm = scene.landmark!.span;
    const foot = lm.y1 > lm.y2 ? { x: lm.x1, y: lm.y1 } : { x: lm.x2, y: lm.y2 };
    // only the foot's height in the picture moves the pitch to first order; across, it barely does
    a.fill(0, 0, n);
    rng.fillNormal(b, n, lm.edgeSigmaPx / Math.SQRT2);
    fillFootPitches(foot.x - W / 2, H / 2 - foot.y, W, tanHalf, a, b, cameraHeight, footRange, pitch, n);
    roll.fill(0, 0, n);
  } else {
    fillUniform(rng, scene.pitch!, pitch, n);
    roll.fill(0, 0, n);
  }
  // the object's mid point is not moved: its ends' errors shift it by a fraction of a pixel, a few
  // hundredths of a degree, against the tilt's tenths
  const o = scene.object.span;
  a.fill(0, 0, n);
  b.fill(0, 0, n);
  fillRayElevations((o.x1 + o.x2) / 2 - W / 2, H / 2 - (o.y1 + o.y2) / 2, W, tanHalf, a, b, pitch, roll, out, n);
}

const tiltScratch = new Float64Array(2);

function fillHorizonTilts(hz: HorizonLine, W: number, H: number, tanHalf: Float64Array, dy1: Float64Array, dy2: Float64Array, pitch: Float64Array, roll: Float64Array, n: number): void {
  const X1 = hz.x1 - W / 2;
  const Y1 = H / 2 - hz.y1;
  const X2 = hz.x2 - W / 2;
  const Y2 = H / 2 - hz.y2;
  for (let i = 0; i < n; i++) {
    // a point moved down the picture is moved down in Y up
    tiltFromCentredHorizon(X1, Y1 - dy1[i]!, X2, Y2 - dy2[i]!, W / 2 / tanHalf[i]!, tiltScratch);
    pitch[i] = tiltScratch[0]!;
    roll[i] = tiltScratch[1]!;
  }
}

function fillFootPitches(
  X: number,
  Y: number,
  W: number,
  tanHalf: Float64Array,
  dx: Float64Array,
  dy: Float64Array,
  cameraHeight: Float64Array,
  footRange: Float64Array,
  pitch: Float64Array,
  n: number,
): void {
  for (let i = 0; i < n; i++) {
    const depression = Math.atan2(cameraHeight[i]!, footRange[i]!);
    pitch[i] = pitchFromKnownElevationUnchecked(X + dx[i]!, Y - dy[i]!, W / 2 / tanHalf[i]!, -depression);
  }
}

function fillRayElevations(X: number, Y: number, W: number, tanHalf: Float64Array, dx: Float64Array, dy: Float64Array, pitch: Float64Array, roll: Float64Array, out: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) out[i] = rayElevationUnchecked(X + dx[i]!, Y - dy[i]!, W / 2 / tanHalf[i]!, pitch[i]!, roll[i]!);
}

/* ---------------------------------------------------------------------------------------------- */


/**
 * An upright landmark's horizontal distance to its foot (range.ts footDistanceUnchecked) and its slant
 * range to its mid point, per draw, from tan(theta/2), its height and the camera's height.
 */
function fillFootDistances(size: Float64Array, halfTan: Float64Array, cameraHeight: Float64Array, foot: Float64Array, slant: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) {
    const h = halfTan[i]!;
    const L = size[i]!;
    const d = h > 0 && h < 1 ? footDistanceUnchecked(L, (2 * h) / (1 - h * h), cameraHeight[i]!) : Number.NaN;
    const dz = L / 2 - cameraHeight[i]!;
    foot[i] = d > 0 && d <= MAX_RANGE_M ? d : Number.NaN;
    slant[i] = foot[i] === foot[i] ? Math.sqrt(d * d + dz * dz) : Number.NaN;
  }
}

function fillAnglesFromHalfTans(halfTan: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) halfTan[i] = 2 * Math.atan(halfTan[i]!);
}

/** The landmark is the fixed point: s = d / R (intercept theorem), w = u (1 - R / d); u in `observer`. */
function fillLandmarkFixedPoint(range: Float64Array, dRange: Float64Array, observer: Float64Array, frac: Float64Array, speed: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) {
    const R = range[i]!;
    const d = dRange[i]!;
    const ok = R > 0 && d > 0; // false for Number.NaN too
    frac[i] = ok ? d / R : Number.NaN;
    speed[i] = ok && observer[i]! > 0 ? impliedSpeedUnchecked(observer[i]!, R, d) : Number.NaN;
  }
}

/** The fixed point of parallel tracks from the observer's and an assumed object speed. */
function fillParallelFixedPoint(observer: Float64Array, object: Float64Array, range: Float64Array, frac: Float64Array, fdist: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) {
    const f = parallelFixedPointFraction(observer[i]!, object[i]!);
    frac[i] = f === Number.POSITIVE_INFINITY ? Number.NaN : f;
    fdist[i] = f === Number.POSITIVE_INFINITY ? Number.NaN : f * range[i]!;
  }
}


/** Regime of each draw's fixed point; a draw without a finite range is left out, one without a finite point is 'none'. */
function regimeShares(frac: Float64Array, range: Float64Array, n: number): RegimeShares | null {
  let between = 0;
  let beyond = 0;
  let behind = 0;
  let none = 0;
  for (let i = 0; i < n; i++) {
    if (!(range[i]! > 0)) continue;
    const f = frac[i]!;
    if (f !== f) none++;
    else if (f < 0) behind++;
    else if (f > 1) beyond++;
    else between++;
  }
  const total = between + beyond + behind + none;
  return total === 0 ? null : { between: between / total, beyond: beyond / total, behind: behind / total, none: none / total };
}


function checkBody(name: string, body: MarkedBody, W: number, H: number): void {
  if (!body) throw new InputError(name, body, 'a marked span with a size band and aspect');
  checkSpan(`${name} span`, body.span, W, H);
  band(`${name} size`, body.size?.lo, body.size?.hi, 0.001, MAX_SIZE_M, ' m');
  checkAspect(`${name} aspect angle`, body.aspect);
}

function checkLandmark(body: LandmarkBody, W: number, H: number): void {
  if (!body) throw new InputError('landmark', body, 'a marked span with a size band');
  checkSpan('landmark span', body.span, W, H);
  band('landmark size', body.size?.lo, body.size?.hi, 0.001, MAX_SIZE_M, ' m');
  if (body.dimension !== undefined && body.dimension !== 'height' && body.dimension !== 'width') {
    throw new InputError('landmark dimension', body.dimension, 'height or width');
  }
  if (body.aspect) checkAspect('landmark aspect angle', body.aspect);
}


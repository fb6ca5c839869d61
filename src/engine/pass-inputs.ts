import { spanHalfAngleTanUnchecked, spanLineConstants } from './camera';
import { pitchFromKnownElevationUnchecked, rayAzimuthUnchecked, rayElevationUnchecked, tiltFromCentredHorizon } from './orientation';
import { Columns } from './uncertainty';
import type { AxisCode } from './pass-model';
import { footDistanceUnchecked } from './range';
import type { PassData } from './pass-fit';
import type { Rng } from './rng';
import type { Band, SpanMark } from './uncertainty';

/*
 * One draw's observations of a pass: every uncertain input picked once (size, field of view, the
 * observer's speed, the track's angle, the camera's height, aim and pitch), every marked point moved
 * by its uncertainty, and from them each span's angle, each mark's elevation where something in the
 * frame gives the camera's tilt, each mark's azimuth for a camera that kept its aim, and each
 * landmark's range. The nominal draw takes every band's middle and moves nothing: the fit of that
 * draw is the start of all the others.
 */

/** A span of the object at one timestamp, in camera-frame pixels. */
export interface PassMark {
  t: number;
  span: SpanMark;
}

/** Two points on the true horizon at one timestamp (camera-frame pixels), each good to sigmaPx. */
export interface HorizonMark {
  t: number;
  x1: number;
  y1: number;
  x2: number;
  y2: number;
  sigmaPx: number;
}

/** A landmark's span at one timestamp. A height's lower end is its base on the ground. */
export interface LandmarkMark {
  id: string;
  t: number;
  span: SpanMark;
  size: Band;
  dimension: 'height' | 'width';
  /** A width's angle to the line of sight (rad, pi/2 square on); a height has none. */
  aspect?: Band;
}

export interface PassScene {
  frame: { widthPx: number; heightPx: number };
  hfov: Band;
  object: { size: Band; axis: AxisCode };
  marks: PassMark[];
  /** m/s; {0, 0} for a camera that stood still */
  observerSpeed: Band;
  /** The track's angle to the road, rad (0: parallel). Fitted instead for a camera that kept its aim. */
  trackAngle: Band;
  /** The camera's height above the ground, m (a landmark's base gives the tilt through it). */
  cameraHeight: Band;
  horizons: HorizonMark[];
  landmarks: LandmarkMark[];
  /**
   * A camera that kept its aim: its axis's azimuth (rad, + left of the road ahead) and, when no
   * horizon is marked, its pitch. A marked point where the road ahead vanishes measures the aim
   * instead (its ray is the direction of travel).
   */
  fixed: { aim: Band; pitch: Band | null; roadAhead?: { x: number; y: number; sigmaPx: number } } | null;
  /** The track's elevation seen square to the road (rad), when nothing in the frame gives it. */
  elevation: Band;
}

/** What picks the draw's values: a seeded generator, or the bands' middles and no noise. */
export interface Picker {
  band(b: Band): number;
  normal(sd: number): number;
}

export const NOMINAL: Picker = { band: (b) => (b.lo + b.hi) / 2, normal: () => 0 };

export function randomPicker(rng: Rng): Picker {
  return {
    band: (b) => (b.lo === b.hi ? b.lo : b.lo + (b.hi - b.lo) * (rng.nextU32() / 4294967296)),
    normal: (sd) => (sd === 0 ? 0 : rng.gauss(0, sd)),
  };
}

/** One draw's values that the fit holds fixed, and what the readings need. */
export interface DrawValues {
  focalPx: number;
  beta: number;
  eps: number;
  cameraHeight: number;
  /** true when some mark has an elevation (the fit then fits eps) */
  hasElevation: boolean;
  /** true when every mark has an azimuth (the fit then fits beta) */
  hasAzimuth: boolean;
  /** per landmark mark: its horizontal range from the camera to its foot, m (NaN if it failed) */
  landmarkRange: Float64Array;
  /** per object mark: where the elevation came from (0 none, 1 horizon, 2 landmark base, 3 fixed pitch) */
  elevationSource: Int8Array;
}

export function drawValues(scene: PassScene): DrawValues {
  return {
    focalPx: 0,
    beta: 0,
    eps: 0,
    cameraHeight: 0,
    hasElevation: false,
    hasAzimuth: false,
    landmarkRange: new Float64Array(scene.landmarks.length),
    elevationSource: new Int8Array(scene.marks.length),
  };
}

const line = new Float64Array(3);
const tiltOut = new Float64Array(2);
/** A draw's landmark base pitches (0), horizon pitches (1) and rolls (2): grown once, reused every draw. */
const tiltScratch = new Columns();
/**
 * Of each span's length error (sd sqrt(2) sigma, its two ends' together), 0.7 of the spread is taken
 * as shared by every span of the pass and the rest as its own: edges found by the same hand or
 * snapper, on the same object through the same codec, err the same way from frame to frame, and an
 * error shared by every span moves the fitted speed where errors of their own average out. On the
 * truth matrix's clips the snapped ends of one pass erred outward together by 0.16 px RMS per end
 * (0.13 px on average over all nine, 0.07 to 0.25 from clip to clip) against a claimed 0.31 px:
 * 0.7 x 0.31 / sqrt(2) = 0.15 px. Each span's total is unchanged: 0.7^2 + 0.51 = 1.
 */
export const SHARED_EDGE_SHARE = 0.7;
const INDEPENDENT_EDGE_SHARE = Math.sqrt(1 - SHARED_EDGE_SHARE * SHARED_EDGE_SHARE);
const SAME_FRAME_S = 1 / 48;
/** Floor on a mark's elevation and azimuth uncertainty for weighting, rad (0.05 deg: common practice for a pinhole's residual distortion near the centre). */
const ANGLE_FLOOR = 0.05 * (Math.PI / 180);

/** Angle subtended by a span whose length changed by e px along itself, with focal length f. */
function spanAngleMoved(s: SpanMark, W: number, H: number, focalPx: number, e: number): number {
  spanLineConstants(s.x1, s.y1, s.x2, s.y2, W, H, line);
  return angleFromLine(line, 0, focalPx, e);
}

function angleFromLine(lines: Float64Array, o: number, focalPx: number, e: number): number {
  const h = spanHalfAngleTanUnchecked(lines[o]!, lines[o + 1]!, lines[o + 2]!, e, 1 / focalPx);
  return h > 0 ? 2 * Math.atan(h) : Number.NaN;
}

/**
 * Every object span's line constants (camera.ts spanLineConstants), three a mark: they depend on the
 * marked points alone, so a pass finds them once rather than in each of its thousands of draws.
 */
export function spanLines(scene: PassScene): Float64Array {
  const { widthPx: W, heightPx: H } = scene.frame;
  const out = new Float64Array(3 * scene.marks.length);
  scene.marks.forEach((m, k) => {
    const s = m.span;
    out.set(spanLineConstants(s.x1, s.y1, s.x2, s.y2, W, H, line), 3 * k);
  });
  return out;
}

/**
 * Fills d and v for one draw. `sigmaTheta` are the spans' angle uncertainties for weighting (from the
 * nominal draw), so that every draw weighs its marks alike.
 */
export function fillDraw(scene: PassScene, pick: Picker, sigmaTheta: Float64Array, d: PassData, v: DrawValues, lines: Float64Array = spanLines(scene)): void {
  const { widthPx: W, heightPx: H } = scene.frame;
  const f = W / 2 / Math.tan(pick.band(scene.hfov) / 2);
  v.focalPx = f;
  d.L = pick.band(scene.object.size);
  d.u = pick.band(scene.observerSpeed);
  v.beta = pick.band(scene.trackAngle);
  v.eps = pick.band(scene.elevation);
  v.cameraHeight = pick.band(scene.cameraHeight);
  d.axis = scene.object.axis;

  // landmarks: their ranges, and a height's base as a ground point that gives the tilt (NaN: none)
  const nl = scene.landmarks.length;
  const nh = scene.horizons.length;
  const basePitch = tiltScratch.get(0, nl);
  for (let i = 0; i < nl; i++) {
    const lm = scene.landmarks[i]!;
    const s = lm.span;
    const theta = spanAngleMoved(s, W, H, f, pick.normal(Math.SQRT2 * s.edgeSigmaPx));
    const size = pick.band(lm.size);
    const sinA = lm.aspect ? Math.sin(pick.band(lm.aspect)) : 1;
    let horizontal = (size * sinA) / (2 * Math.tan(theta / 2));
    basePitch[i] = Number.NaN;
    if (lm.dimension === 'height') {
      horizontal = footDistanceUnchecked(size, Math.tan(theta), v.cameraHeight);
      const lower = s.y1 > s.y2 ? { x: s.x1, y: s.y1 } : { x: s.x2, y: s.y2 };
      const X = lower.x - W / 2 + pick.normal(s.edgeSigmaPx / Math.SQRT2);
      const Y = H / 2 - lower.y + pick.normal(s.edgeSigmaPx / Math.SQRT2);
      basePitch[i] = pitchFromKnownElevationUnchecked(X, Y, f, -Math.atan2(v.cameraHeight, horizontal));
    }
    v.landmarkRange[i] = horizontal > 0 ? horizontal : Number.NaN;
  }

  // horizons, each moved by its points' uncertainty; into scratch columns, as a pass of thousands
  // of frames has thousands of horizons and an object for each, every draw, was most of its garbage
  const horizonPitch = tiltScratch.get(1, nh);
  const horizonRoll = tiltScratch.get(2, nh);
  for (let i = 0; i < nh; i++) {
    const h = scene.horizons[i]!;
    const Y1 = H / 2 - (h.y1 + pick.normal(h.sigmaPx));
    const Y2 = H / 2 - (h.y2 + pick.normal(h.sigmaPx));
    tiltFromCentredHorizon(h.x1 - W / 2, Y1, h.x2 - W / 2, Y2, f, tiltOut);
    horizonPitch[i] = tiltOut[0]!;
    horizonRoll[i] = tiltOut[1]!;
  }
  // a fixed camera's tilt: its last horizon's, else its pitch (no roll), else none (NaN)
  let fixedPitch = Number.NaN;
  let fixedRoll = 0;
  if (scene.fixed && nh > 0) {
    fixedPitch = horizonPitch[nh - 1]!;
    fixedRoll = horizonRoll[nh - 1]!;
  } else if (scene.fixed?.pitch) fixedPitch = pick.band(scene.fixed.pitch);
  const fixedSource = scene.fixed ? (nh > 0 ? 1 : scene.fixed.pitch ? 3 : 0) : 0;
  let aim = scene.fixed ? pick.band(scene.fixed.aim) : 0;
  const road = scene.fixed?.roadAhead;
  if (road) {
    const sd = road.sigmaPx / Math.SQRT2;
    const X = road.x - W / 2 + pick.normal(sd);
    const Y = H / 2 - road.y + pick.normal(sd);
    aim = fixedPitch === fixedPitch ? -rayAzimuthUnchecked(X, Y, f, fixedPitch, fixedRoll) : -rayAzimuthUnchecked(X, Y, f, 0, 0);
  }

  v.hasElevation = false;
  v.hasAzimuth = !!scene.fixed;
  const frames = sameFrames(scene);
  // one part of every span's length error shared by the whole pass (see SHARED_EDGE_SHARE)
  const shared = pick.normal(1);
  const n = scene.marks.length;
  for (let k = 0; k < n; k++) {
    const m = scene.marks[k]!;
    const s = m.span;
    d.t[k] = m.t;
    const lengthSd = Math.SQRT2 * s.edgeSigmaPx;
    d.theta[k] = angleFromLine(lines, 3 * k, f, lengthSd * (SHARED_EDGE_SHARE * shared + INDEPENDENT_EDGE_SHARE * pick.normal(1)));
    d.sTheta[k] = sigmaTheta[k]!;
    const X = (s.x1 + s.x2) / 2 - W / 2 + pick.normal(s.edgeSigmaPx / Math.SQRT2);
    const Y = H / 2 - (s.y1 + s.y2) / 2 + pick.normal(s.edgeSigmaPx / Math.SQRT2);
    let pitch = Number.NaN;
    let roll = 0;
    let source = 0;
    if (scene.fixed) {
      pitch = fixedPitch;
      roll = fixedRoll;
      source = fixedSource;
    } else {
      const hi = frames.horizon[k]!;
      if (hi >= 0) {
        pitch = horizonPitch[hi]!;
        roll = horizonRoll[hi]!;
        source = 1;
      } else {
        // the first landmark on the frame whose base gave a tilt
        for (const li of frames.landmarks[k]!) {
          if (basePitch[li] === basePitch[li]) {
            pitch = basePitch[li]!;
            source = 2;
            break;
          }
        }
      }
    }
    v.elevationSource[k] = source;
    const angleSigma = Math.max(s.edgeSigmaPx / f, ANGLE_FLOOR);
    const tilted = pitch === pitch;
    if (tilted) {
      d.elev[k] = rayElevationUnchecked(X, Y, f, pitch, roll);
      d.sElev[k] = angleSigma;
      v.hasElevation = true;
    } else d.elev[k] = Number.NaN;
    if (scene.fixed) {
      d.azim[k] = aim + (tilted ? rayAzimuthUnchecked(X, Y, f, pitch, roll) : rayAzimuthUnchecked(X, Y, f, 0, 0));
      d.sAzim[k] = angleSigma;
    } else d.azim[k] = Number.NaN;
  }
}

/** For each object mark, the horizon and the landmarks marked on its frame, by index. */
interface SameFrames {
  counts: [number, number, number];
  horizon: Int32Array;
  landmarks: number[][];
}

const sameFrameCache = new WeakMap<PassScene, SameFrames>();

/**
 * Which horizon and landmarks share each mark's frame: the same for every draw of a scene, so found
 * once (a pass of thousands of marks searched them per mark per draw, quadratic in the marks). The
 * first match in list order, as a search from the front would find it.
 */
function sameFrames(scene: PassScene): SameFrames {
  const counts: SameFrames['counts'] = [scene.marks.length, scene.horizons.length, scene.landmarks.length];
  let s = sameFrameCache.get(scene);
  if (s && s.counts.every((c, i) => c === counts[i])) return s;
  const n = scene.marks.length;
  s = { counts, horizon: new Int32Array(n).fill(-1), landmarks: Array.from({ length: n }, () => []) };
  const byTime = (ts: readonly { t: number }[]) => ts.map((x, i) => ({ t: x.t, i })).sort((a, b) => a.t - b.t || a.i - b.i);
  const horizons = byTime(scene.horizons);
  const landmarks = byTime(scene.landmarks);
  for (let k = 0; k < n; k++) {
    const t = scene.marks[k]!.t;
    let h = -1;
    for (const x of within(horizons, t)) if (h < 0 || x.i < h) h = x.i;
    s.horizon[k] = h;
    s.landmarks[k] = within(landmarks, t).map((x) => x.i).sort((a, b) => a - b);
  }
  sameFrameCache.set(scene, s);
  return s;
}

/** The entries of a time-sorted list within half a frame at 24 fps of t. */
function within(sorted: readonly { t: number; i: number }[], t: number): { t: number; i: number }[] {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (sorted[mid]!.t < t - 2 * SAME_FRAME_S) lo = mid + 1;
    else hi = mid;
  }
  const out: { t: number; i: number }[] = [];
  for (let j = lo; j < sorted.length && sorted[j]!.t <= t + 2 * SAME_FRAME_S; j++) if (Math.abs(sorted[j]!.t - t) < SAME_FRAME_S) out.push(sorted[j]!);
  return out;
}

/** The spans' angle uncertainties at the nominal draw, rad: sqrt(2) sigma of the length change, as an angle. */
export function spanSigmas(scene: PassScene): Float64Array {
  const { widthPx: W, heightPx: H } = scene.frame;
  const f = W / 2 / Math.tan(NOMINAL.band(scene.hfov) / 2);
  return Float64Array.from(scene.marks, (m) => {
    const s = m.span;
    const e = Math.SQRT2 * Math.max(s.edgeSigmaPx, 0.01);
    const a = spanAngleMoved(s, W, H, f, e);
    const b = spanAngleMoved(s, W, H, f, -e);
    return Math.abs(a - b) / 2;
  });
}

import { InputError } from './errors';
import { MAX_RANGE_M, MAX_SPEED_MS, MAX_TIME_S } from './constants';
import { inRange, integer, positive } from './validate';

/*
 * The sight-line fixed point. Observer O moves with ground velocity u, object P with w. Every point
 * of the segment O + s (P - O) has velocity u + s (w - u); the one whose velocity has no component
 * across the sight line is momentarily at rest on screen while the camera keeps the object framed,
 * so whatever stands there seems to pin the object. With n perpendicular to P - O:
 *   n . (u + s (w - u)) = 0   =>   s* = -(n . u) / (n . (w - u)).
 * For parallel tracks the point does not move at all (intercept theorem, Euclid Elements VI.2).
 */

/**
 * Where the motionless point lies along the sight line, by its fraction s of the way from the
 * observer (s = 0) to the object (s = 1):
 * - between: 0 < s < 1, between observer and object (the tracks run in opposite directions);
 * - beyond: s > 1, past the object;
 * - behind: s < 0, behind the observer, so nothing in view stands still;
 * - none: no finite point; the relative velocity lies along the sight line (constant bearing). This
 *   also covers both at rest, or both moving along the sight line, where the whole line is still and
 *   no single point is singled out;
 * - at-object: s = 1, the object itself is at rest (across the sight line);
 * - at-observer: s = 0, the observer is at rest (across the sight line).
 */
export type Regime = 'between' | 'beyond' | 'behind' | 'none' | 'at-object' | 'at-observer';

/**
 * Relative tolerance for the exact regimes. A fraction within 1e-9 of 0 or 1 is snapped to exactly
 * 0 or 1 (one part in a billion of the sight line: far below any pixel). The denominator n.(w - u)
 * counts as zero when |n.(w - u)| <= 1e-9 |n| (|u| + |w|); the right side bounds rounding in the
 * dot product by many orders of magnitude, and it caps a finite |s| at about 1e9.
 */
export const FIXED_POINT_TOLERANCE = 1e-9;

export interface Vec2 {
  readonly x: number;
  readonly y: number;
}

/** A finite motionless point on the sight line (also 'behind', which is finite but out of view). */
export interface FiniteFixedPoint {
  readonly regime: Exclude<Regime, 'none'>;
  /** s: 0 at the observer, 1 at the object. */
  readonly fraction: number;
  readonly point: Vec2;
  /** Signed distance along the sight line from the observer, s |P - O| (negative when behind). */
  readonly distanceFromObserver: number;
  /**
   * Signed perpendicular distance from the observer's track line (the line through O along u),
   * positive on the object's side. In the ground frame (observer on y = 0 moving along x, object
   * at y > 0) this is the point's y. If the object sits on that line the sign follows the left of
   * travel. When the observer is at rest there is no track line; the point is then O and this is 0.
   */
  readonly distanceFromRoad: number;
}

export interface NoFixedPoint {
  readonly regime: 'none';
}

export type FixedPoint = FiniteFixedPoint | NoFixedPoint;

/** Unchecked core shared by the kernel and the wander sampler, which has already validated. */
function fractionCore(
  ox: number,
  oy: number,
  ux: number,
  uy: number,
  px: number,
  py: number,
  wx: number,
  wy: number,
): number {
  const nx = oy - py;
  const ny = px - ox;
  const a = nx * ux + ny * uy;
  const b = nx * (wx - ux) + ny * (wy - uy);
  const scale = Math.sqrt(nx * nx + ny * ny) * (Math.sqrt(ux * ux + uy * uy) + Math.sqrt(wx * wx + wy * wy));
  if (!(Math.abs(b) > FIXED_POINT_TOLERANCE * scale)) return Infinity;
  return snap(-a / b);
}

/** Snap to the exact regimes; also turns -0 into 0. */
function snap(s: number): number {
  if (Math.abs(s) <= FIXED_POINT_TOLERANCE) return 0;
  if (Math.abs(s - 1) <= FIXED_POINT_TOLERANCE) return 1;
  return s;
}

function position(field: string, v: number): void {
  inRange(field, v, -MAX_RANGE_M, MAX_RANGE_M, ' m');
}

function velocity(field: string, v: number): void {
  inRange(field, v, -MAX_SPEED_MS, MAX_SPEED_MS, ' m/s');
}

function distinct(ox: number, oy: number, px: number, py: number): void {
  if (ox === px && oy === py) {
    throw new InputError('object position', `(${px}, ${py})`, 'a point other than the observer position');
  }
}

/**
 * Kernel: fraction s* of the way from observer O to object P at which the sight line stands still.
 * Returns Infinity when n.(w - u) is zero (to the tolerance above): constant bearing, no point.
 * Results within FIXED_POINT_TOLERANCE of 0 or 1 are exactly 0 or 1, so regimeOfFraction needs no
 * tolerance of its own. Allocates nothing on the success path.
 */
export function fixedPointFraction(
  ox: number,
  oy: number,
  ux: number,
  uy: number,
  px: number,
  py: number,
  wx: number,
  wy: number,
): number {
  position('observer x', ox);
  position('observer y', oy);
  velocity('observer velocity x', ux);
  velocity('observer velocity y', uy);
  position('object x', px);
  position('object y', py);
  velocity('object velocity x', wx);
  velocity('object velocity y', wy);
  distinct(ox, oy, px, py);
  return fractionCore(ox, oy, ux, uy, px, py, wx, wy);
}

/** Regime of a fraction returned by the kernels (Infinity, either sign, is 'none'). */
export function regimeOfFraction(s: number): Regime {
  if (typeof s !== 'number' || Number.isNaN(s)) throw new InputError('fraction', s, 'a number or Infinity');
  if (!Number.isFinite(s)) return 'none';
  if (s === 0) return 'at-observer';
  if (s === 1) return 'at-object';
  if (s < 0) return 'behind';
  return s < 1 ? 'between' : 'beyond';
}

/** The motionless point for observer and object positions and ground velocities. */
export function sightLineFixedPoint(
  observer: Vec2,
  observerVelocity: Vec2,
  object: Vec2,
  objectVelocity: Vec2,
): FixedPoint {
  const s = fixedPointFraction(
    observer.x,
    observer.y,
    observerVelocity.x,
    observerVelocity.y,
    object.x,
    object.y,
    objectVelocity.x,
    objectVelocity.y,
  );
  return describeFraction(s, observer, observerVelocity, object);
}

function describeFraction(s: number, o: Vec2, u: Vec2, p: Vec2): FixedPoint {
  const regime = regimeOfFraction(s);
  if (regime === 'none') return { regime };
  const dx = p.x - o.x;
  const dy = p.y - o.y;
  const point = { x: o.x + s * dx, y: o.y + s * dy };
  const speed = Math.sqrt(u.x * u.x + u.y * u.y);
  let distanceFromRoad = 0;
  if (speed > 0) {
    // cross products with the unit travel direction: signed offsets to the left of travel
    const ex = u.x / speed;
    const ey = u.y / speed;
    const objectSide = ex * dy - ey * dx;
    const side = objectSide < 0 ? -1 : 1;
    distanceFromRoad = side * (ex * (point.y - o.y) - ey * (point.x - o.x));
  }
  return {
    regime,
    fraction: s,
    point,
    distanceFromObserver: s * Math.sqrt(dx * dx + dy * dy),
    distanceFromRoad,
  };
}

/**
 * Kernel for parallel tracks with signed speeds along x: s = u / (u - w), Infinity when u = w (to
 * the relative tolerance |u - w| <= 1e-9 (|u| + |w|), the same test as the general kernel).
 */
export function parallelFixedPointFraction(u: number, w: number): number {
  velocity('observer speed', u);
  velocity('object speed', w);
  const d = u - w;
  if (!(Math.abs(d) > FIXED_POINT_TOLERANCE * (Math.abs(u) + Math.abs(w)))) return Infinity;
  return snap(u / d);
}

/**
 * Parallel tracks D apart, signed speeds u (observer) and w (object) along x. The point lies
 * D u / (u - w) from the road. The result is placed in the ground frame with the observer at the
 * origin and the object abeam at (0, D); the point is then (0, D s) and stays there for all time.
 */
export function parallelFixedPoint(D: number, u: number, w: number): FixedPoint {
  positive('distance between tracks', D, MAX_RANGE_M, ' m');
  const s = parallelFixedPointFraction(u, w);
  const regime = regimeOfFraction(s);
  if (regime === 'none') return { regime };
  const along = s * D;
  return {
    regime,
    fraction: s,
    point: { x: 0, y: along },
    distanceFromObserver: along,
    distanceFromRoad: along,
  };
}

export interface WanderTrack {
  observer: Vec2;
  observerVelocity: Vec2;
  object: Vec2;
  objectVelocity: Vec2;
  /** Start and end of the clip, seconds; positions at time t are p + v t. */
  t1: number;
  t2: number;
  /** Evenly spaced sample times including both ends, 2 to MAX_WANDER_SAMPLES; default 51. */
  samples?: number;
}

/** A sample with no fixed point carries no coordinates (null rather than a made-up number). */
export type WanderSample =
  | { t: number; x: number; y: number; regime: Exclude<Regime, 'none'> }
  | { t: number; x: null; y: null; regime: 'none' };

export interface Wander {
  points: WanderSample[];
  /** Largest distance between two counted samples (0 if fewer than two). */
  spread: number;
  /** Sum of steps between consecutive samples that are both counted. */
  pathLength: number;
  /** Tracks parallel (or one party at rest): the point then does not move. */
  parallel: boolean;
  /** How many samples were counted (not 'none' or 'behind'). */
  counted: number;
}

/** Cap on samples: the spread is a pairwise maximum, quadratic in the count. */
export const MAX_WANDER_SAMPLES = 1000;

/**
 * How far the motionless point wanders over [t1, t2]. Samples with no point ('none', including an
 * instant when observer and object coincide) or with the point behind the observer are reported but
 * left out of spread and pathLength, since nothing in view marks them.
 */
export function fixedPointWander(track: WanderTrack): Wander {
  const { observer: o, observerVelocity: u, object: p, objectVelocity: w } = track;
  position('observer x', o.x);
  position('observer y', o.y);
  velocity('observer velocity x', u.x);
  velocity('observer velocity y', u.y);
  position('object x', p.x);
  position('object y', p.y);
  velocity('object velocity x', w.x);
  velocity('object velocity y', w.y);
  inRange('t1', track.t1, -MAX_TIME_S, MAX_TIME_S, ' s');
  inRange('t2', track.t2, -MAX_TIME_S, MAX_TIME_S, ' s');
  if (!(track.t2 > track.t1)) throw new InputError('t2', track.t2, `more than t1 (${track.t1}) s`);
  const n = track.samples === undefined ? 51 : integer('samples', track.samples, 2, MAX_WANDER_SAMPLES);

  const points: WanderSample[] = [];
  const cx: number[] = [];
  const cy: number[] = [];
  let pathLength = 0;
  let prevCounted = false;
  for (let i = 0; i < n; i++) {
    const t = track.t1 + ((track.t2 - track.t1) * i) / (n - 1);
    const ox = o.x + u.x * t;
    const oy = o.y + u.y * t;
    const px = p.x + w.x * t;
    const py = p.y + w.y * t;
    const s = ox === px && oy === py ? Infinity : fractionCore(ox, oy, u.x, u.y, px, py, w.x, w.y);
    const regime = regimeOfFraction(s);
    if (regime === 'none') {
      points.push({ t, x: null, y: null, regime });
      prevCounted = false;
      continue;
    }
    const x = ox + s * (px - ox);
    const y = oy + s * (py - oy);
    points.push({ t, x, y, regime });
    if (regime === 'behind') {
      prevCounted = false;
      continue;
    }
    if (prevCounted) {
      pathLength += Math.hypot(x - cx[cx.length - 1]!, y - cy[cy.length - 1]!);
    }
    cx.push(x);
    cy.push(y);
    prevCounted = true;
  }

  let spread = 0;
  for (let i = 0; i < cx.length; i++) {
    for (let j = i + 1; j < cx.length; j++) {
      const d = Math.hypot(cx[i]! - cx[j]!, cy[i]! - cy[j]!);
      if (d > spread) spread = d;
    }
  }

  const cross = u.x * w.y - u.y * w.x;
  const parallel = Math.abs(cross) <= FIXED_POINT_TOLERANCE * Math.hypot(u.x, u.y) * Math.hypot(w.x, w.y);
  return { points, spread, pathLength, parallel, counted: cx.length };
}

import { InputError, UndeterminedError } from './errors';
import { MAX_RANGE_M, MAX_SPEED_MS, MAX_TIME_S } from './constants';
import { FIXED_POINT_TOLERANCE } from './fixedpoint';
import { finite, inRange, positive } from './validate';

/*
 * Speeds implied by the sight-line fixed point on parallel tracks, and the time an object stays near
 * the beam. Speeds are signed along the observer's direction of travel (+x), so the observer's own
 * speed u is positive and the sign of the result gives the object's direction.
 */

/**
 * Relative speed is bounded by the sum of two bounded ground speeds (head-on at MAX_SPEED_MS each).
 */
export const MAX_RELATIVE_SPEED_MS = 2 * MAX_SPEED_MS;

function observerSpeed(u: number): void {
  // u = 0 is refused: a resting observer's fixed point is the observer, never a landmark in view
  positive('observer speed', u, MAX_SPEED_MS, ' m/s');
}

function finiteResult(what: string, v: number, why: string): number {
  if (!Number.isFinite(v)) throw new UndeterminedError(what, why);
  return v;
}

/**
 * Kernel: object speed when it seems pinned over a landmark on the same sight line. The landmark is
 * the fixed point, s = d / R, so w = u (1 - R / d). R > d: opposite direction, |w| = u (R/d - 1);
 * R < d: same direction, slower; R = d: the object is at rest.
 */
export function impliedSpeedFromLandmark(observerSpeedMs: number, objectRange: number, landmarkRange: number): number {
  observerSpeed(observerSpeedMs);
  positive('object range', objectRange, MAX_RANGE_M, ' m');
  positive('landmark range', landmarkRange, MAX_RANGE_M, ' m');
  return finiteResult(
    'implied speed',
    impliedSpeedUnchecked(observerSpeedMs, objectRange, landmarkRange),
    'the landmark is too close for the ratio of ranges to be represented',
  );
}

/** The arithmetic of impliedSpeedFromLandmark without its checks, for Monte Carlo loops that validated once. */
export function impliedSpeedUnchecked(observerSpeedMs: number, objectRange: number, landmarkRange: number): number {
  return observerSpeedMs * (1 - objectRange / landmarkRange);
}

export type Direction = 'opposite' | 'same' | 'stationary';

export interface ImpliedMotion {
  /** Magnitude of the object's ground speed, m/s (never negative). */
  speed: number;
  /** Relative to the observer's direction of travel. */
  direction: Direction;
  /** Signed speed along the observer's direction of travel, m/s. */
  velocity: number;
}

/**
 * impliedSpeedFromLandmark with the direction spelled out. Ranges equal to one part in 1e9
 * (FIXED_POINT_TOLERANCE) count as stationary, matching the fixed-point regimes.
 */
export function impliedMotionFromLandmark(u: number, R: number, d: number): ImpliedMotion {
  const velocity = impliedSpeedFromLandmark(u, R, d);
  if (Math.abs(1 - R / d) <= FIXED_POINT_TOLERANCE) return { speed: 0, direction: 'stationary', velocity: 0 };
  // the sign of 1 - R/d, not of the product, so that an underflowing product keeps its direction
  return { speed: Math.abs(velocity), direction: R > d ? 'opposite' : 'same', velocity };
}

/**
 * Kernel: w = u (1 - 1/s) for a fixed point at fraction s of the way to the object (s = Dfix / D
 * for parallel tracks). s = 0 would need an infinite speed and is refused.
 */
export function impliedSpeedFromFraction(observerSpeedMs: number, fraction: number): number {
  observerSpeed(observerSpeedMs);
  finite('fraction', fraction);
  if (fraction === 0) throw new InputError('fraction', fraction, 'a finite number other than 0');
  return finiteResult(
    'implied speed',
    observerSpeedMs * (1 - 1 / fraction),
    'the fraction is too close to 0 for the speed to be represented',
  );
}

function halfAngle(A: number): void {
  inRange('half angle', A, 0, Math.PI / 2, ' rad', true, true);
}

/**
 * Time the object stays within +/- A of the beam when passing at closest distance D with relative
 * speed V along a straight line: the along-track offset D tan(A) on each side, covered at V.
 */
export function observationWindow(closestDistance: number, relativeSpeed: number, halfAngleRad: number): number {
  positive('closest distance', closestDistance, MAX_RANGE_M, ' m');
  positive('relative speed', relativeSpeed, MAX_RELATIVE_SPEED_MS, ' m/s');
  halfAngle(halfAngleRad);
  return finiteResult(
    'observation window',
    (2 * closestDistance * Math.tan(halfAngleRad)) / relativeSpeed,
    'the window is too long to be represented',
  );
}

/** Inverse of observationWindow for the relative speed: V = 2 D tan(A) / T. */
export function relativeSpeedFromWindow(closestDistance: number, windowS: number, halfAngleRad: number): number {
  positive('closest distance', closestDistance, MAX_RANGE_M, ' m');
  positive('window', windowS, MAX_TIME_S, ' s');
  halfAngle(halfAngleRad);
  return finiteResult(
    'relative speed',
    (2 * closestDistance * Math.tan(halfAngleRad)) / windowS,
    'the speed is too large to be represented',
  );
}

/** Inverse of observationWindow for the closest distance: D = V T / (2 tan(A)). */
export function closestDistanceFromWindow(relativeSpeed: number, windowS: number, halfAngleRad: number): number {
  positive('relative speed', relativeSpeed, MAX_RELATIVE_SPEED_MS, ' m/s');
  positive('window', windowS, MAX_TIME_S, ' s');
  halfAngle(halfAngleRad);
  return finiteResult(
    'closest distance',
    (relativeSpeed * windowS) / (2 * Math.tan(halfAngleRad)),
    'the distance is too large to be represented',
  );
}

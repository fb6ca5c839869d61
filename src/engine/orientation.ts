import { DEG } from './constants';
import { InputError } from './errors';
import { finite, inRange, positive } from './validate';

/*
 * Where a pixel's ray points in the world: its elevation above the horizontal and its azimuth, from
 * the camera's pitch and roll. Pinhole camera, principal point at the camera frame's centre, image
 * coordinates X right and Y up from that centre in pixels, focal length f in pixels.
 *
 * Pitch p tilts the optical axis up; roll r turns the image's right axis up (counter-clockwise as
 * seen by the camera). With no yaw, the ray through (X, Y) has the world direction
 *   up:      X sin r cos p + Y cos r cos p + f sin p
 *   forward: f cos p - sin p (X sin r + Y cos r)
 *   right:   X cos r - Y sin r
 * so the horizon (rays of elevation 0) is the image line X sin r + Y cos r = -f tan p: a line whose
 * upward normal is (sin r, cos r), at signed distance -f tan p from the centre. Marking that line
 * gives the pitch and roll; a ground point at a known depression gives the pitch (no roll assumed).
 */

export interface CameraTilt {
  /** rad, the optical axis above the horizontal */
  pitch: number;
  /** rad, the image's right axis above the horizontal */
  roll: number;
}

/** Pixel of the camera frame (origin top-left, y down) to centred coordinates (Y up). */
export function centred(x: number, y: number, widthPx: number, heightPx: number): { X: number; Y: number } {
  return { X: x - widthPx / 2, Y: heightPx / 2 - y };
}

/**
 * Pitch and roll from two points on the true horizon (camera-frame pixels). The horizon of flat
 * ground or the sea is where rays are level; a skyline of hills stands above it, which the caller's
 * uncertainty must allow for.
 */
export function tiltFromHorizon(
  x1: number,
  y1: number,
  x2: number,
  y2: number,
  widthPx: number,
  heightPx: number,
  focalPx: number,
): CameraTilt {
  positive('focal length', focalPx, 1e7, ' px');
  for (const [k, v] of [
    ['horizon first point x', x1],
    ['horizon first point y', y1],
    ['horizon second point x', x2],
    ['horizon second point y', y2],
  ] as const) finite(k, v);
  const len = Math.hypot(x2 - x1, y2 - y1);
  if (!(len >= 2)) throw new InputError('horizon length', len, 'at least 2 px between its two points');
  const t = tiltFromHorizonUnchecked(x1, y1, x2, y2, widthPx, heightPx, focalPx);
  inRange('horizon slope', t.roll / DEG, -45, 45, ' deg (a horizon steeper than that is not a horizon)');
  return t;
}

/**
 * Pitch and roll from two horizon points into `out` ([pitch, roll]), for Monte Carlo loops. Points are
 * centred pixels (X right, Y up).
 */
export function tiltFromCentredHorizon(X1: number, Y1: number, X2: number, Y2: number, focalPx: number, out: Float64Array): void {
  let dx = X2 - X1;
  let dy = Y2 - Y1;
  if (dx < 0) {
    dx = -dx;
    dy = -dy;
  }
  const len = Math.hypot(dx, dy);
  const sr = -dy / len;
  const cr = dx / len;
  out[0] = Math.atan(-(sr * X1 + cr * Y1) / focalPx);
  out[1] = Math.atan2(sr, cr);
}

export function tiltFromHorizonUnchecked(
  x1: number,
  y1: number,
  x2: number,
  y2: number,
  widthPx: number,
  heightPx: number,
  focalPx: number,
): CameraTilt {
  const a = centred(x1, y1, widthPx, heightPx);
  const b = centred(x2, y2, widthPx, heightPx);
  const out = new Float64Array(2);
  tiltFromCentredHorizon(a.X, a.Y, b.X, b.Y, focalPx, out);
  return { pitch: out[0]!, roll: out[1]! };
}

/** Elevation (rad, above the horizontal) of the ray through centred pixel (X, Y). */
export function rayElevation(X: number, Y: number, focalPx: number, tilt: CameraTilt): number {
  return rayElevationUnchecked(X, Y, focalPx, tilt.pitch, tilt.roll);
}

/** rayElevation with the tilt as two numbers: Monte Carlo loops allocate nothing per draw. */
export function rayElevationUnchecked(X: number, Y: number, focalPx: number, pitch: number, roll: number): number {
  const sp = Math.sin(pitch);
  const cp = Math.cos(pitch);
  const sr = Math.sin(roll);
  const cr = Math.cos(roll);
  const up = X * sr * cp + Y * cr * cp + focalPx * sp;
  return Math.asin(up / Math.sqrt(X * X + Y * Y + focalPx * focalPx));
}

/**
 * Azimuth (rad) of the ray through centred pixel (X, Y) from the optical axis's own azimuth,
 * positive to the LEFT (toward +y in the ground frame, as DESIGN.md's frame has it), measured in the
 * horizontal plane.
 */
export function rayAzimuthFromAxis(X: number, Y: number, focalPx: number, tilt: CameraTilt): number {
  return rayAzimuthUnchecked(X, Y, focalPx, tilt.pitch, tilt.roll);
}

/** rayAzimuthFromAxis with the tilt as two numbers: Monte Carlo loops allocate nothing per draw. */
export function rayAzimuthUnchecked(X: number, Y: number, focalPx: number, pitch: number, roll: number): number {
  const sp = Math.sin(pitch);
  const cp = Math.cos(pitch);
  const sr = Math.sin(roll);
  const cr = Math.cos(roll);
  const forward = focalPx * cp - sp * (X * sr + Y * cr);
  const right = X * cr - Y * sr;
  return -Math.atan2(right, forward);
}

/**
 * Pitch of a camera without roll from one pixel whose ray is known to point `elevation` rad above
 * the horizontal (a ground point: minus its depression). Solves Y cos p + f sin p = sin(e) |ray|,
 * i.e. A sin(p + phi) = sin(e) |ray| with A = hypot(Y, f), phi = atan2(Y, f). NaN when no pitch fits
 * (a point that cannot be at that elevation with this focal length).
 */
export function pitchFromKnownElevationUnchecked(X: number, Y: number, focalPx: number, elevation: number): number {
  const n = Math.sqrt(X * X + Y * Y + focalPx * focalPx);
  const A = Math.hypot(Y, focalPx);
  const s = (Math.sin(elevation) * n) / A;
  if (!(s >= -1 && s <= 1)) return Number.NaN;
  return Math.asin(s) - Math.atan2(Y, focalPx);
}

import { InputError } from './errors';
import { finite, inRange, positive } from './validate';

/*
 * How the landscape moves in the picture between two frames of a moving, turning pinhole camera.
 *
 * The camera of frame A stands at height h above flat ground with pitch p and roll r (the project's
 * convention, orientation.ts: pitch tilts the axis up, roll turns the image's right axis up). Its yaw
 * is taken as 0: only the turn between frames matters, not where the camera points on the map. Frame
 * B's camera has turned by dYaw about the vertical (positive to the left, as the fixture scenes'
 * yaw), dPitch, dRoll, and moved by (forward, left) along the ground in units of h, in frame A's
 * heading (forward = the horizontal direction of A's optical axis).
 *
 * A pixel below the horizon sees the ground, whose depth follows from h and the ray: that is what
 * separates the turn (the same for every depth) from the travel (the nearer the ground, the faster it
 * slides). A pixel above the horizon sees something far (a ridge, clouds): one shared inverse depth
 * `farInvDepth` (h / distance) stands for it, 0 meaning infinitely far, so that a distant ridge's
 * small parallax does not leak into the turn.
 *
 * Parameters as a vector: [dYaw, dPitch, dRoll, forward, left, farInvDepth].
 */

export const N_PARAMS = 6;
export const P_YAW = 0;
export const P_PITCH = 1;
export const P_ROLL = 2;
export const P_FORWARD = 3;
export const P_LEFT = 4;
export const P_FAR = 5;

export interface LandscapeCamera {
  /** focal length in px of the image the frames are given in */
  focalPx: number;
  /** principal point in px (pixel i covers [i, i + 1)) */
  cx: number;
  cy: number;
  /** rad, optical axis above the horizontal in frame A */
  pitchRad: number;
  /** rad, image's right axis above the horizontal in frame A */
  rollRad: number;
}

export function checkLandscapeCamera(c: LandscapeCamera): void {
  if (typeof c !== 'object' || c === null) throw new InputError('camera', c, 'an object with focalPx, cx, cy, pitchRad, rollRad');
  positive('camera focalPx', c.focalPx, 1e6, ' px');
  finite('camera cx', c.cx);
  finite('camera cy', c.cy);
  inRange('camera pitchRad', c.pitchRad, -1.2, 1.2, ' rad');
  inRange('camera rollRad', c.rollRad, -0.8, 0.8, ' rad');
}

/** Camera axes in A's heading frame (x forward-horizontal, y left, z up), 9 numbers: right, up, fwd. */
export function cameraAxes(yaw: number, pitch: number, roll: number, out: Float64Array): Float64Array {
  const cy = Math.cos(yaw);
  const sy = Math.sin(yaw);
  const cp = Math.cos(pitch);
  const sp = Math.sin(pitch);
  const cr = Math.cos(roll);
  const sr = Math.sin(roll);
  // before roll: right0 = (sy, -cy, 0), up0 = (-sp cy, -sp sy, cp)
  const r0x = sy;
  const r0y = -cy;
  const u0x = -sp * cy;
  const u0y = -sp * sy;
  const u0z = cp;
  out[0] = cr * r0x + sr * u0x;
  out[1] = cr * r0y + sr * u0y;
  out[2] = sr * u0z;
  out[3] = cr * u0x - sr * r0x;
  out[4] = cr * u0y - sr * r0y;
  out[5] = cr * u0z;
  out[6] = cp * cy;
  out[7] = cp * sy;
  out[8] = sp;
  return out;
}

/** World direction (A's heading frame) of the ray through pixel (x, y) of a camera with these axes. */
export function rayOf(ax: Float64Array, f: number, cx: number, cy: number, x: number, y: number, out: Float64Array): Float64Array {
  const a = x - cx;
  const b = y - cy;
  out[0] = ax[6]! * f + ax[0]! * a - ax[3]! * b;
  out[1] = ax[7]! * f + ax[1]! * a - ax[4]! * b;
  out[2] = ax[8]! * f + ax[2]! * a - ax[5]! * b;
  return out;
}

/**
 * Rays that fall less steeply than this (rad below the horizontal) are treated as far: the ground
 * there lies beyond 100 000 camera heights. Kept that small on purpose: the ground a pixel or two
 * below the horizon (500 to 1000 heights off) still slides by a fifth of the turn with the travel, and
 * taking it as infinitely far biased the turn by 3 % (the bench's drawn pair: 8 % before, 5 % after).
 */
export const GROUND_MIN_DEPRESSION = 1e-5;

/**
 * Where pixel (x, y) of frame A lands in frame B under the motion `theta`, exactly (no small-angle
 * step): the ground point (or the far point) is found from A's ray and projected through B's camera.
 * Returns false when it lands behind B's camera.
 */
export function warpPixel(
  cam: LandscapeCamera,
  axesA: Float64Array,
  axesB: Float64Array,
  theta: ArrayLike<number>,
  x: number,
  y: number,
  out: Float64Array,
): boolean {
  const f = cam.focalPx;
  rayOf(axesA, f, cam.cx, cam.cy, x, y, out);
  const wx = out[0]!;
  const wy = out[1]!;
  const wz = out[2]!;
  const n = Math.hypot(wx, wy, wz);
  const tF = theta[P_FORWARD]!;
  const tL = theta[P_LEFT]!;
  let qx: number;
  let qy: number;
  let qz: number;
  if (wz < -GROUND_MIN_DEPRESSION * n) {
    const s = 1 / -wz;
    qx = wx * s - tF;
    qy = wy * s - tL;
    qz = wz * s;
  } else {
    const k = theta[P_FAR]!;
    qx = wx / n - k * tF;
    qy = wy / n - k * tL;
    qz = wz / n;
  }
  const X = qx * axesB[0]! + qy * axesB[1]! + qz * axesB[2]!;
  const Y = qx * axesB[3]! + qy * axesB[4]! + qz * axesB[5]!;
  const Z = qx * axesB[6]! + qy * axesB[7]! + qz * axesB[8]!;
  if (!(Z > 1e-9)) return false;
  out[0] = cam.cx + (f * X) / Z;
  out[1] = cam.cy - (f * Y) / Z;
  return true;
}

/**
 * The image motion per unit of each parameter at theta = 0 (first order), at pixel (x, y) of A:
 * du[k], dv[k] in px per unit of parameter k. The far layer's column is the travel flow of a point at
 * inverse depth 1 along the given travel (tF, tL); the travel columns of a far pixel carry farInvDepth.
 * Returns whether the pixel sees the ground.
 */
export function flowBasis(
  cam: LandscapeCamera,
  axesA: Float64Array,
  x: number,
  y: number,
  tF: number,
  tL: number,
  farInvDepth: number,
  du: Float64Array,
  dv: Float64Array,
  scratch: Float64Array,
): boolean {
  const f = cam.focalPx;
  const u = x - cam.cx;
  const v = y - cam.cy;
  rayOf(axesA, f, cam.cx, cam.cy, x, y, scratch);
  const wz = scratch[2]!;
  const n = Math.hypot(scratch[0]!, scratch[1]!, wz);
  const ground = wz < -GROUND_MIN_DEPRESSION * n;
  // angular velocity in camera axes (right, down, forward) for each rotation parameter:
  // yaw about the vertical, pitch about A's horizontal right axis, roll about minus the optical axis
  const r = axesA;
  const sr = Math.sin(cam.rollRad);
  const crr = Math.cos(cam.rollRad);
  rotFlow(f, u, v, r[2]!, -r[5]!, r[8]!, du, dv, P_YAW);
  rotFlow(f, u, v, crr, sr, 0, du, dv, P_PITCH);
  rotFlow(f, u, v, 0, 0, -1, du, dv, P_ROLL);
  // a camera displacement V (axes right, down, forward) moves the image by (-f Vx + u Vz) / Z
  const invZ = ground ? -wz / f : n / f;
  const scaleT = ground ? invZ : invZ * farInvDepth;
  transFlow(f, u, v, r[0]!, -r[3]!, r[6]!, scaleT, du, dv, P_FORWARD);
  transFlow(f, u, v, r[1]!, -r[4]!, r[7]!, scaleT, du, dv, P_LEFT);
  if (ground) {
    du[P_FAR] = 0;
    dv[P_FAR] = 0;
  } else {
    const vx = tF * r[0]! + tL * r[1]!;
    const vd = -(tF * r[3]! + tL * r[4]!);
    const vz = tF * r[6]! + tL * r[7]!;
    du[P_FAR] = (-f * vx + u * vz) * invZ;
    dv[P_FAR] = (-f * vd + v * vz) * invZ;
  }
  return ground;
}

function rotFlow(f: number, u: number, v: number, ox: number, oy: number, oz: number, du: Float64Array, dv: Float64Array, k: number): void {
  // a point's camera coordinates change by -Omega x q under a camera rotation Omega
  du[k] = -oy * (f + (u * u) / f) + oz * v + (ox * u * v) / f;
  dv[k] = ox * (f + (v * v) / f) - oz * u - (oy * u * v) / f;
}

function transFlow(f: number, u: number, v: number, vx: number, vd: number, vz: number, invZ: number, du: Float64Array, dv: Float64Array, k: number): void {
  du[k] = (-f * vx + u * vz) * invZ;
  dv[k] = (-f * vd + v * vz) * invZ;
}

import { DEG, MAX_RANGE_M, MAX_SPEED_MS, MAX_TIME_S } from './constants';
import { InputError } from './errors';
import { inRange, positive } from './validate';

/*
 * Fixed camera (DESIGN.md "Fixed camera"): a windscreen mount or a tripod keeps its yaw, so a mark's
 * column gives a bearing from the optical axis, and with the range at that moment a position. Adding
 * the camera's own straight, steady motion turns the positions into the object's ground track.
 * Ground frame as in DESIGN.md: x along the road in the direction of travel, y toward the object's side.
 */

export interface TrackSample {
  /** s, video time */
  t: number;
  /** rad, from the optical axis, positive toward +y (right of the axis looking along it when the axis points along +x) */
  bearing: number;
  /** m, line-of-sight range to the object */
  range: number;
  /** rad above horizontal, default 0: the range is then horizontal */
  elevation?: number;
}

export interface FixedCamera {
  /** rad, heading of the optical axis in the ground frame, 0 = +x (direction of travel), positive toward +y */
  axisHeading: number;
  /** m/s; {0, 0} for a tripod */
  velocity: { x: number; y: number };
  /** s, the time at which the camera stands at the origin; default the first sample's time */
  t0?: number;
}

export interface GroundTrack {
  /** m/s, the object's fitted ground velocity */
  velocity: { x: number; y: number };
  /** m/s */
  speed: number;
  /** rad, atan2(vy, vx); 0 when the object stands still */
  heading: number;
  /** the object's horizontal position at each sample, camera at the origin at t0 */
  positions: { t: number; x: number; y: number }[];
  /**
   * m, RMS distance of the positions from the fitted line's positions at the same times, divided by
   * n - 2 for the two parameters fitted per axis; null for two samples, where it is undefined.
   */
  residualRms: number | null;
  /** m/s, the object's velocity relative to the camera */
  relativeVelocity: { x: number; y: number };
  /** m, least horizontal distance between camera and object on the fitted tracks (extrapolated beyond the samples if need be) */
  closestApproach: number;
  /** s, when that distance is reached; null when the relative velocity is below 1e-9 m/s (the distance then never changes) */
  tClosest: number | null;
}

/** Below this relative speed (m/s) the object keeps its distance, and a time of closest approach means nothing. */
const STILL_MS = 1e-9;

function checkSamples(samples: readonly TrackSample[]): void {
  if (!Array.isArray(samples)) throw new InputError('samples', samples, 'a list of at least 2 track samples');
  if (samples.length < 2) throw new InputError('samples', samples, 'at least 2 track samples');
  let prev = -Infinity;
  for (let i = 0; i < samples.length; i++) {
    const s = samples[i];
    if (typeof s !== 'object' || s === null) throw new InputError(`samples[${i}]`, s, 'an object with t, bearing, range');
    inRange(`timestamp[${i}]`, s.t, 0, MAX_TIME_S, ' s');
    if (!(s.t > prev)) {
      throw new InputError(`timestamp[${i}]`, s.t, `more than timestamp[${i - 1}] = ${prev} s (strictly increasing)`);
    }
    prev = s.t;
    inRange(`bearing[${i}]`, s.bearing, -90 * DEG, 90 * DEG, ' rad (within 90 degrees of the axis)', true, true);
    positive(`range[${i}]`, s.range, MAX_RANGE_M, ' m');
    if (s.elevation !== undefined) {
      inRange(`elevation[${i}]`, s.elevation, -90 * DEG, 90 * DEG, ' rad (within 90 degrees of horizontal)', true, true);
    }
  }
}

function checkCamera(camera: FixedCamera): void {
  if (typeof camera !== 'object' || camera === null) throw new InputError('camera', camera, 'an object with axisHeading and velocity');
  inRange('camera axis heading', camera.axisHeading, -2 * Math.PI, 2 * Math.PI, ' rad');
  const v = camera.velocity;
  if (typeof v !== 'object' || v === null) throw new InputError('camera velocity', v, 'an object {x, y} in m/s');
  inRange('camera velocity x', v.x, -MAX_SPEED_MS, MAX_SPEED_MS, ' m/s');
  inRange('camera velocity y', v.y, -MAX_SPEED_MS, MAX_SPEED_MS, ' m/s');
  if (Math.hypot(v.x, v.y) > MAX_SPEED_MS) {
    throw new InputError('camera speed', Math.hypot(v.x, v.y), `at most ${MAX_SPEED_MS} m/s`);
  }
  if (camera.t0 !== undefined) inRange('camera t0', camera.t0, 0, MAX_TIME_S, ' s');
}

/**
 * The object's ground track from a fixed camera: each sample placed at the camera's position at t
 * (velocity x (t - t0)) plus the horizontal range along heading axisHeading + bearing, then a straight
 * constant-velocity line fitted to those positions by ordinary least squares, each axis on its own
 * (n >= 2). Assumes the camera moves straight at a steady speed and does not yaw, and that the
 * object flies straight and steadily; the residual is the check on both.
 */
export function fixedCameraTrack(samples: readonly TrackSample[], camera: FixedCamera): GroundTrack {
  checkSamples(samples);
  checkCamera(camera);
  const n = samples.length;
  const first = samples[0]!;
  const t0 = camera.t0 ?? first.t;
  const cvx = camera.velocity.x;
  const cvy = camera.velocity.y;
  const h = camera.axisHeading;

  const positions: { t: number; x: number; y: number }[] = [];
  let tMean = 0;
  let xMean = 0;
  let yMean = 0;
  for (const s of samples) {
    const horizontal = s.range * Math.cos(s.elevation ?? 0);
    const az = h + s.bearing;
    const x = cvx * (s.t - t0) + horizontal * Math.cos(az);
    const y = cvy * (s.t - t0) + horizontal * Math.sin(az);
    positions.push({ t: s.t, x, y });
    tMean += s.t;
    xMean += x;
    yMean += y;
  }
  tMean /= n;
  xMean /= n;
  yMean /= n;

  let stt = 0;
  let stx = 0;
  let sty = 0;
  for (const p of positions) {
    const dt = p.t - tMean;
    stt += dt * dt;
    stx += dt * (p.x - xMean);
    sty += dt * (p.y - yMean);
  }
  // strictly increasing timestamps make stt > 0
  const vx = stx / stt;
  const vy = sty / stt;

  let residualRms: number | null = null;
  if (n > 2) {
    let ss = 0;
    for (const p of positions) {
      const dt = p.t - tMean;
      const ex = p.x - (xMean + vx * dt);
      const ey = p.y - (yMean + vy * dt);
      ss += ex * ex + ey * ey;
    }
    residualRms = Math.sqrt(ss / (n - 2));
  }

  // relative motion: object minus camera, as a line through (qx, qy) at tMean
  const rvx = vx - cvx;
  const rvy = vy - cvy;
  const qx = xMean - cvx * (tMean - t0);
  const qy = yMean - cvy * (tMean - t0);
  const rv2 = rvx * rvx + rvy * rvy;
  let closestApproach: number;
  let tClosest: number | null;
  if (Math.sqrt(rv2) < STILL_MS) {
    closestApproach = Math.hypot(qx, qy);
    tClosest = null;
  } else {
    closestApproach = Math.abs(qx * rvy - qy * rvx) / Math.sqrt(rv2);
    tClosest = tMean - (qx * rvx + qy * rvy) / rv2;
  }

  return {
    velocity: { x: vx, y: vy },
    speed: Math.hypot(vx, vy),
    heading: Math.atan2(vy, vx),
    positions,
    residualRms,
    relativeVelocity: { x: rvx, y: rvy },
    closestApproach,
    tClosest,
  };
}

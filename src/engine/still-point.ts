import { InputError } from './errors';
import { N_PARAMS, P_FORWARD, P_LEFT, P_PITCH, P_ROLL, P_YAW, cameraAxes, checkLandscapeCamera, rayOf, type LandscapeCamera } from './ground-motion';
import type { TurnFitOk } from './turn-fit';
import { finite, positive } from './validate';

/*
 * Where the ground stands still relative to the sight line (issue 15, point 3), from the landscape's
 * motion alone: the point of the ground, on the object's sight line, that the sight line still passes
 * through one frame later. Any landmark standing there keeps the object's column; one elsewhere does
 * not, however well it lines up in a single frame.
 *
 * From the turn fit (ground-motion.ts frame: A's heading, camera heights): the sight line leaves the
 * camera at azimuth a in frame A and at azimuth b in frame B (B's ray turned by the camera's own turn),
 * from a camera that has moved by t = (forward, left). The ground point at horizontal distance d along
 * the first line lies on the second when
 *     d sin(b - a) = t_F sin b - t_L cos b,
 * the discrete form of d = u sin(bearing) / (sight line's turn rate). Its column and row follow by
 * projecting it into frame A; the uncertainty comes from the fit's covariance and the object's own
 * pixel noise, carried through numerically.
 */

export interface SightObject {
  /** the object's image position in frame A, video px */
  x: number;
  y: number;
  /** its image displacement from frame A to frame B, video px (0, 0 for a camera that tracks it) */
  dx: number;
  dy: number;
  /** sigma of its position in each frame, px (default 0.3) */
  sigmaPx?: number;
}

export interface StillPointOk {
  ok: true;
  /** the motionless ground point's image in frame A, video px */
  x: number;
  y: number;
  /** horizontal distance from the camera along the sight line, camera heights, and its sigma */
  distanceH: number;
  sigmaDistanceH: number;
  /** the same in metres when the camera height was given */
  distanceM: number | null;
  /** 2-sigma band of the distance (camera heights) and the image rows it spans */
  bandH: [number, number];
  rowBand: [number, number];
  sigmaColumnPx: number;
  sigmaRowPx: number;
}

export interface StillPointFail {
  ok: false;
  reason: string;
}

export type StillPoint = StillPointOk | StillPointFail;

const DEFAULT_SIGMA_PX = 0.3;

interface Raw {
  d: number;
  x: number;
  y: number;
}

function solve(cam: LandscapeCamera, th: ArrayLike<number>, ox: number, oy: number, bx: number, by: number): Raw {
  const axA = cameraAxes(0, cam.pitchRad, cam.rollRad, new Float64Array(9));
  const axB = cameraAxes(th[P_YAW]!, cam.pitchRad + th[P_PITCH]!, cam.rollRad + th[P_ROLL]!, new Float64Array(9));
  const r = new Float64Array(3);
  rayOf(axA, cam.focalPx, cam.cx, cam.cy, ox, oy, r);
  const a = Math.atan2(r[1]!, r[0]!);
  rayOf(axB, cam.focalPx, cam.cx, cam.cy, bx, by, r);
  const b = Math.atan2(r[1]!, r[0]!);
  const s = Math.sin(b - a);
  const d = (th[P_FORWARD]! * Math.sin(b) - th[P_LEFT]! * Math.cos(b)) / s;
  // the ground point (d cos a, d sin a, -1) in camera heights, projected into frame A
  const px = d * Math.cos(a);
  const py = d * Math.sin(a);
  const X = px * axA[0]! + py * axA[1]! - axA[2]!;
  const Y = px * axA[3]! + py * axA[4]! - axA[5]!;
  const Z = px * axA[6]! + py * axA[7]! - axA[8]!;
  return { d, x: cam.cx + (cam.focalPx * X) / Z, y: cam.cy - (cam.focalPx * Y) / Z };
}

export function motionlessPoint(fit: TurnFitOk, cam: LandscapeCamera, obj: SightObject, heightM?: number): StillPoint {
  checkLandscapeCamera(cam);
  if (typeof obj !== 'object' || obj === null) throw new InputError('object', obj, 'an object with x, y, dx, dy');
  finite('object x', obj.x);
  finite('object y', obj.y);
  finite('object dx', obj.dx);
  finite('object dy', obj.dy);
  const sp = obj.sigmaPx === undefined ? DEFAULT_SIGMA_PX : positive('object sigmaPx', obj.sigmaPx, 100, ' px');
  if (heightM !== undefined) positive('camera height', heightM, 1e4, ' m');
  const th = fit.theta;
  const bx = obj.x + obj.dx;
  const by = obj.y + obj.dy;
  const base = solve(cam, th, obj.x, obj.y, bx, by);
  if (!Number.isFinite(base.d)) {
    return { ok: false, reason: 'the sight line does not turn relative to the ground (constant bearing): no point of the ground stands still on it' };
  }
  if (base.d <= 0) {
    return { ok: false, reason: `the ground stands still behind the observer (${(-base.d).toFixed(1)} camera heights back along the sight line): not in the picture` };
  }
  // numerical propagation: the fit's parameters through their covariance, and the object's pixels
  const grads: number[][] = [];
  const steps = [1e-6, 1e-6, 1e-6, 1e-4, 1e-4];
  const idx = [P_YAW, P_PITCH, P_ROLL, P_FORWARD, P_LEFT];
  const t2 = Float64Array.from(th);
  for (let k = 0; k < idx.length; k++) {
    const q = idx[k]!;
    t2[q] = th[q]! + steps[k]!;
    const s = solve(cam, t2, obj.x, obj.y, bx, by);
    t2[q] = th[q]!;
    grads.push([(s.d - base.d) / steps[k]!, (s.x - base.x) / steps[k]!, (s.y - base.y) / steps[k]!]);
  }
  const varOut = [0, 0, 0];
  for (let i = 0; i < idx.length; i++) {
    for (let j = 0; j < idx.length; j++) {
      const c = fit.cov[idx[i]! * N_PARAMS + idx[j]!]!;
      for (let o = 0; o < 3; o++) varOut[o] = varOut[o]! + grads[i]![o]! * c * grads[j]![o]!;
    }
  }
  // the object's position in each frame: x and y of A and of B, independent
  const h = 0.01;
  const pix: [number, number, number, number][] = [
    [h, 0, 0, 0],
    [0, h, 0, 0],
    [0, 0, h, 0],
    [0, 0, 0, h],
  ];
  for (const [ax, ay, qx, qy] of pix) {
    const s = solve(cam, th, obj.x + ax, obj.y + ay, bx + qx, by + qy);
    const g = [(s.d - base.d) / h, (s.x - base.x) / h, (s.y - base.y) / h];
    for (let o = 0; o < 3; o++) varOut[o] = varOut[o]! + g[o]! * g[o]! * sp * sp;
  }
  const sd = Math.sqrt(varOut[0]!);
  const near = Math.max(1e-3, base.d - 2 * sd);
  const far = base.d + 2 * sd;
  const rowOf = (dist: number): number => {
    const f = dist / base.d;
    return solveRowAt(cam, base, f);
  };
  return {
    ok: true,
    x: base.x,
    y: base.y,
    distanceH: base.d,
    sigmaDistanceH: sd,
    distanceM: heightM === undefined ? null : base.d * heightM,
    bandH: [near, far],
    rowBand: [rowOf(far), rowOf(near)],
    sigmaColumnPx: Math.sqrt(varOut[1]!),
    sigmaRowPx: Math.sqrt(varOut[2]!),
  };
}

/** The image row of the ground point at `f` times the motionless point's distance on the same line. */
function solveRowAt(cam: LandscapeCamera, base: Raw, f: number): number {
  const axA = cameraAxes(0, cam.pitchRad, cam.rollRad, new Float64Array(9));
  const r = new Float64Array(3);
  rayOf(axA, cam.focalPx, cam.cx, cam.cy, base.x, base.y, r);
  // the ray to the point hits the ground (z = -1) at horizontal distance d; scale the horizontal part
  const s = -1 / r[2]!;
  const px = r[0]! * s * f;
  const py = r[1]! * s * f;
  const Y = px * axA[3]! + py * axA[4]! - axA[5]!;
  const Z = px * axA[6]! + py * axA[7]! - axA[8]!;
  return cam.cy - (cam.focalPx * Y) / Z;
}

export interface LandmarkCheck {
  /** true when the landmark stands where the ground stands still, within k sigmas and the tolerance */
  atStill: boolean;
  columnDiffPx: number;
  columnDiffSigma: number;
  /** when the landmark's base row was given */
  rowDiffPx: number | null;
  rowDiffSigma: number | null;
  reason: string;
}

export interface LandmarkMark {
  /** the landmark's column (its vertical axis) in frame A, video px */
  x: number;
  /** where it meets the ground, video px (optional: without it only the column is compared) */
  baseY?: number;
  /** sigma of the marked column and base, px (default 0.5) */
  sigmaPx?: number;
}

/**
 * Whether a marked landmark stands at the motionless point: its column against the point's column,
 * and, when its base is marked, its base row against the distance band. Flagged (atStill false) when
 * either differs by more than k sigmas (default 3).
 */
export function checkLandmark(sp: StillPointOk, lm: LandmarkMark, k = 3): LandmarkCheck {
  finite('landmark x', lm.x);
  if (lm.baseY !== undefined) finite('landmark baseY', lm.baseY);
  const sl = lm.sigmaPx === undefined ? 0.5 : positive('landmark sigmaPx', lm.sigmaPx, 100, ' px');
  positive('sigmas', k, 100);
  const dc = lm.x - sp.x;
  const sc = Math.hypot(sp.sigmaColumnPx, sl);
  const zc = dc / sc;
  let dr: number | null = null;
  let zr: number | null = null;
  if (lm.baseY !== undefined) {
    dr = lm.baseY - sp.y;
    // the band's half-width in rows stands for two sigmas
    const sr = Math.hypot(Math.abs(sp.rowBand[1] - sp.rowBand[0]) / 4, sp.sigmaRowPx, sl);
    zr = dr / sr;
  }
  const colOk = Math.abs(zc) <= k;
  const rowOk = zr === null || Math.abs(zr) <= k;
  const atStill = colOk && rowOk;
  const parts: string[] = [];
  parts.push(`column ${dc >= 0 ? '+' : ''}${dc.toFixed(1)} px (${zc.toFixed(1)} sigma)`);
  if (dr !== null && zr !== null) parts.push(`base row ${dr >= 0 ? '+' : ''}${dr.toFixed(1)} px (${zr.toFixed(1)} sigma)`);
  const reason = atStill
    ? `stands where the ground stands still: ${parts.join(', ')}`
    : `not where the ground stands still: ${parts.join(', ')} from the motionless point`;
  return { atStill, columnDiffPx: dc, columnDiffSigma: zc, rowDiffPx: dr, rowDiffSigma: zr, reason };
}

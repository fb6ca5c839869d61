import { DEG, FULL_FRAME_DIAGONAL_MM, MAX_FRAME_PX } from './constants';
import { InputError, UndeterminedError } from './errors';
import { inRange } from './validate';

/*
 * Pinhole (rectilinear) camera. Every kernel here works from tan(HFOV/2) scaled by the frame's
 * half-width rather than from the focal length in pixels: for a field of view near 0 the focal length
 * overflows to Infinity and Infinity - Infinity would be NaN, while the scaled tangent stays finite.
 */

/**
 * Validates an angle that must lie strictly between 0 and 180 degrees. Users enter these in degrees,
 * so the error shows the value in degrees.
 */
export function openAngle(field: string, rad: number): number {
  if (typeof rad !== 'number' || !Number.isFinite(rad) || rad <= 0 || rad >= Math.PI) {
    throw new InputError(field, typeof rad === 'number' ? rad / DEG : rad, 'more than 0 and less than 180 deg');
  }
  return rad;
}

function hfov(rad: number): number {
  return openAngle('horizontal field of view', rad);
}

function frameWidth(field: string, px: number): number {
  // Below one pixel the half-width can underflow and nothing real is that small.
  return inRange(field, px, 1, MAX_FRAME_PX, ' px');
}

/** A computed field of view that rounds to 0 or 180 deg cannot be used downstream. */
function fovResult(what: string, rad: number): number {
  if (!(rad > 0 && rad < Math.PI)) {
    throw new UndeterminedError(what, 'the result rounds to 0 or 180 deg; use less extreme inputs');
  }
  return rad;
}

/** Angle (rad) that a format dimension d subtends at focal length f: 2 atan(d / 2f). */
export function fovAlong(dimensionMm: number, focalMm: number): number {
  inRange('format dimension', dimensionMm, 0, 1000, ' mm', true);
  inRange('focal length', focalMm, 0.1, 100000, ' mm');
  return 2 * Math.atan(dimensionMm / (2 * focalMm));
}

/**
 * Width (mm, on the 43.27 mm-diagonal equivalent scale) of the horizontal side of the recorded frame.
 * The quoted frame is laid on the diagonal; the recorded frame is the largest crop of it with the
 * recorded shape, so a wider shape keeps the quoted long side and a narrower one the short side.
 */
export function equivalentFrameWidthMm(quotedAspect: number, recordedAspect: number, portrait: boolean): number {
  inRange('quoted aspect (long/short)', quotedAspect, 1, 10);
  inRange('recorded aspect (long/short)', recordedAspect, 1, 10);
  if (typeof portrait !== 'boolean') throw new InputError('portrait', portrait, 'true or false');
  const quotedShort = FULL_FRAME_DIAGONAL_MM / Math.sqrt(quotedAspect * quotedAspect + 1);
  const quotedLong = quotedShort * quotedAspect;
  let long: number;
  let short: number;
  if (recordedAspect >= quotedAspect) {
    long = quotedLong;
    short = quotedLong / recordedAspect;
  } else {
    short = quotedShort;
    long = quotedShort * recordedAspect;
  }
  return portrait ? short : long;
}

/**
 * Plain-number kernel behind hfovFromEquivalentFocal, for use inside sampling loops.
 * Zoom and stabilisation crop both shrink the recorded frame about its centre, hence divide tan(HFOV/2).
 */
export function hfovFromEquivalentFocalN(
  focalEq: number,
  quotedAspect: number,
  recordedAspect: number,
  portrait: boolean,
  zoom: number,
  stabilisationCrop: number,
): number {
  inRange('35 mm-equivalent focal length', focalEq, 1, 10000, ' mm');
  inRange('digital zoom', zoom, 1, 100, 'x');
  inRange('stabilisation crop', stabilisationCrop, 0, 0.9);
  const widthMm = equivalentFrameWidthMm(quotedAspect, recordedAspect, portrait);
  const tanHalf = widthMm / (2 * focalEq) / (zoom * (1 + stabilisationCrop));
  return fovResult('horizontal field of view', 2 * Math.atan(tanHalf));
}

export interface EquivalentFocalOptions {
  /** 35 mm-equivalent focal length (mm), defined on the 43.27 mm diagonal (CIPA DCG-001). */
  focalEq: number;
  /** Long/short shape of the frame the device quotes focalEq for; default 4/3 (3/2 = 36 x 24 mm). */
  quotedAspect?: number;
  /** Long/short shape of the recorded video; default 16/9. */
  recordedAspect?: number;
  orientation?: 'landscape' | 'portrait';
  /** Digital zoom factor, 1 to 100. */
  zoom?: number;
  /** Stabilisation crop as a fraction, 0 to 0.9 (0.15 = 15 %). */
  stabilisationCrop?: number;
}

/** Horizontal field of view (rad) of a recording from its 35 mm-equivalent focal length. */
export function hfovFromEquivalentFocal(opts: EquivalentFocalOptions): number {
  if (typeof opts !== 'object' || opts === null) {
    throw new InputError('camera settings', opts, 'an object with at least focalEq');
  }
  const orientation = opts.orientation ?? 'landscape';
  if (orientation !== 'landscape' && orientation !== 'portrait') {
    throw new InputError('orientation', orientation, '"landscape" or "portrait"');
  }
  return hfovFromEquivalentFocalN(
    opts.focalEq,
    opts.quotedAspect ?? 4 / 3,
    opts.recordedAspect ?? 16 / 9,
    orientation === 'portrait',
    opts.zoom ?? 1,
    opts.stabilisationCrop ?? 0,
  );
}

/** Focal length in pixels: f = (W/2) / tan(HFOV/2). Overflows to Infinity only for a vanishing field. */
export function focalLengthPx(widthPx: number, hfovRad: number): number {
  frameWidth('frame width', widthPx);
  hfov(hfovRad);
  return widthPx / 2 / Math.tan(hfovRad / 2);
}

/** (u - W/2) / f, i.e. the tangent of a column's bearing, without forming f. */
function columnTangent(u: number, widthPx: number, tanHalf: number): number {
  return ((u - widthPx / 2) * 2 * tanHalf) / widthPx;
}

function column(field: string, u: number, widthPx: number): number {
  // A marked end may sit a fraction of a pixel past the edge; a frame-width margin is generous.
  return inRange(field, u, -widthPx, 2 * widthPx, ' px');
}

/** Bearing (rad, positive to the right) of camera-frame column u from the optical axis. */
export function bearingOfColumn(u: number, widthPx: number, hfovRad: number): number {
  frameWidth('frame width', widthPx);
  hfov(hfovRad);
  column('column', u, widthPx);
  return Math.atan(columnTangent(u, widthPx, Math.tan(hfovRad / 2)));
}

/**
 * Exact angle between the sight lines through two columns of the centre row, |phi(u2) - phi(u1)|,
 * written as atan2(cross, dot) of the rays (t1, 1) and (t2, 1) with the cross term taken from the
 * pixel span, so it keeps full precision for small spans far off centre, where a difference of two
 * large bearings would cancel.
 */
export function angleBetweenColumns(u1: number, u2: number, widthPx: number, hfovRad: number): number {
  frameWidth('frame width', widthPx);
  hfov(hfovRad);
  column('first column', u1, widthPx);
  column('second column', u2, widthPx);
  const span = Math.abs(u2 - u1);
  if (span === 0 || span > widthPx) {
    throw new InputError('span between the marked columns', span, `more than 0 and at most ${widthPx} px (the frame width)`);
  }
  const tanHalf = Math.tan(hfovRad / 2);
  const t1 = columnTangent(u1, widthPx, tanHalf);
  const t2 = columnTangent(u2, widthPx, tanHalf);
  // t2 - t1 formed from the pixel difference, not by subtracting two rounded tangents
  const cross = (span * 2 * tanHalf) / widthPx;
  return Math.atan2(cross, 1 + t1 * t2);
}

/**
 * Exact angle between the rays through two image points (square pixels, origin top-left), for spans
 * at any slant and position. Rays are (x - W/2, y - H/2, f) scaled by 1/f.
 */
export function angleBetweenPoints(
  x1: number,
  y1: number,
  x2: number,
  y2: number,
  widthPx: number,
  heightPx: number,
  hfovRad: number,
): number {
  frameWidth('frame width', widthPx);
  frameWidth('frame height', heightPx);
  hfov(hfovRad);
  column('first point x', x1, widthPx);
  column('second point x', x2, widthPx);
  inRange('first point y', y1, -heightPx, 2 * heightPx, ' px');
  inRange('second point y', y2, -heightPx, 2 * heightPx, ' px');
  const span = Math.hypot(x2 - x1, y2 - y1);
  const diagonal = Math.hypot(widthPx, heightPx);
  if (span === 0 || span > diagonal) {
    throw new InputError('span between the marked points', span, `more than 0 and at most ${diagonal} px (the frame diagonal)`);
  }
  return rayAngleUnchecked(x1, y1, x2, y2, widthPx, heightPx, Math.tan(hfovRad / 2));
}

/**
 * The arithmetic of angleBetweenPoints without its checks, taking tan(HFOV/2) directly: for Monte
 * Carlo loops that have validated the marks and field of view once and then perturb them by a few
 * pixels per draw. Coincident points give 0; callers must treat that as no span.
 */
export function rayAngleUnchecked(
  x1: number,
  y1: number,
  x2: number,
  y2: number,
  widthPx: number,
  heightPx: number,
  tanHalfHfov: number,
): number {
  const k = (2 * tanHalfHfov) / widthPx;
  const ax = (x1 - widthPx / 2) * k;
  const ay = (y1 - heightPx / 2) * k;
  const bx = (x2 - widthPx / 2) * k;
  const by = (y2 - heightPx / 2) * k;
  // a x b for a = (ax, ay, 1), b = a + d, written through the pixel differences d so that a short
  // span does not come out as the difference of two nearly equal rounded numbers
  const dx = (x2 - x1) * k;
  const dy = (y2 - y1) * k;
  const cz = ax * dy - ay * dx;
  const cross = Math.sqrt(dx * dx + dy * dy + cz * cz);
  const dot = ax * bx + ay * by + 1;
  return Math.atan2(cross, dot);
}

/**
 * A span's constants for moving its ends along its own line, the way an edge uncertainty acts:
 * [length, C0 = X1 Dy - Y1 Dx, Q0 = X1 X2 + Y1 Y2] with X, Y measured from the frame centre and D
 * the span vector, written to `out` (a caller solving many spans passes one array for all). See
 * spanHalfAngleTanUnchecked.
 */
export function spanLineConstants(
  x1: number,
  y1: number,
  x2: number,
  y2: number,
  widthPx: number,
  heightPx: number,
  out: Float64Array = new Float64Array(3),
): Float64Array {
  const X1 = x1 - widthPx / 2;
  const Y1 = y1 - heightPx / 2;
  const X2 = x2 - widthPx / 2;
  const Y2 = y2 - heightPx / 2;
  out[0] = Math.hypot(X2 - X1, Y2 - Y1);
  out[1] = X1 * (Y2 - Y1) - Y1 * (X2 - X1);
  out[2] = X1 * X2 + Y1 * Y2;
  return out;
}

/**
 * tan(theta/2) for the span lengthened by e pixels, half at each end, along its own line, with
 * k = 2 tan(HFOV/2) / W. Moving the ends along the line leaves the cross term's z part k^2 C0 and
 * scales the in-plane part by g = 1 + e/len, and the dot product becomes k^2 (Q0 - e len/2 - e^2/4)
 * + 1: two square roots a draw instead of the general kernel's full arithmetic. Equal to
 * tan(theta/2) of angleBetweenPoints on the moved ends (tested).
 */
export function spanHalfAngleTanUnchecked(len: number, c0: number, q0: number, e: number, k: number): number {
  const g = 1 + e / len;
  const cross = k * g * Math.sqrt(len * len + k * k * c0 * c0);
  const dot = k * k * (q0 - (e * len) / 2 - (e * e) / 4) + 1;
  return cross / (Math.sqrt(cross * cross + dot * dot) + dot);
}

/**
 * The rule-of-thumb span/W x HFOV. Kept only to cross-check the exact kernels: it overstates angles
 * near the frame edge and understates them at the centre (at the centre the exact value is larger by
 * 2 tan(HFOV/2) / HFOV, at the edge smaller by sin(HFOV) / HFOV). Do not use it for results.
 */
export function smallAngleSpan(spanPx: number, widthPx: number, hfovRad: number): number {
  frameWidth('frame width', widthPx);
  hfov(hfovRad);
  inRange('span', spanPx, 0, widthPx, ' px', true);
  return (spanPx / widthPx) * hfovRad;
}

function aspectWH(aspect: number): number {
  return inRange('aspect (width/height)', aspect, 0.1, 10);
}

/** Vertical field of view from the horizontal one; aspect is W/H. */
export function vfovFromHfov(hfovRad: number, aspect: number): number {
  hfov(hfovRad);
  aspectWH(aspect);
  return fovResult('vertical field of view', 2 * Math.atan(Math.tan(hfovRad / 2) / aspect));
}

/** Horizontal field of view from the vertical one; aspect is W/H. */
export function hfovFromVfov(vfovRad: number, aspect: number): number {
  openAngle('vertical field of view', vfovRad);
  aspectWH(aspect);
  return fovResult('horizontal field of view', 2 * Math.atan(Math.tan(vfovRad / 2) * aspect));
}

import { angleBetweenColumns, openAngle } from './camera';
import { DEG, MAX_RANGE_M, MAX_SIZE_M } from './constants';
import { InputError } from './errors';
import { positive } from './validate';

/*
 * Range from apparent size. An object of true size L seen at aspect angle a presents L sin(a) across
 * the sight line; treating that as a segment centred on the sight line and square to it gives the
 * exact relation theta = 2 atan(L sin a / 2R). At other aspects this neglects the depth of the
 * foreshortened object, which is tiny whenever R is many times L.
 */

const BROADSIDE = Math.PI / 2;

function size(trueSizeM: number): number {
  return positive('true size', trueSizeM, MAX_SIZE_M, ' m');
}

function aspect(aspectRad: number): number {
  return openAngle('aspect angle', aspectRad);
}

/** Range (m) at which an object of true size L subtends theta at aspect angle a (pi/2 = broadside). */
export function rangeFromAngularSize(trueSizeM: number, thetaRad: number, aspectRad = BROADSIDE): number {
  size(trueSizeM);
  openAngle('angular size', thetaRad);
  aspect(aspectRad);
  const r = rangeUnchecked(trueSizeM, Math.tan(thetaRad / 2), Math.sin(aspectRad));
  if (!(r > 0 && r <= MAX_RANGE_M)) {
    throw new InputError(
      'range',
      r,
      `more than 0 and at most ${MAX_RANGE_M} m; a ${trueSizeM} m object spanning ${thetaRad / DEG} deg at aspect ${aspectRad / DEG} deg is out of bounds, check the marks, size and field of view`,
    );
  }
  return r;
}

/**
 * rangeFromAngularSize's arithmetic without checks, for Monte Carlo loops that validated once. It
 * takes tan(theta/2) and sin(aspect) so that a loop can get the first straight from the rays
 * (camera.ts spanHalfAngleTanUnchecked) and compute the second once when the aspect is exact.
 */
export function rangeUnchecked(trueSizeM: number, tanHalfTheta: number, sinAspect: number): number {
  return (trueSizeM * sinAspect) / (2 * tanHalfTheta);
}

/**
 * Horizontal distance to the foot of an upright landmark of height L standing on level ground, seen
 * from a camera h above that ground, from the exact angle theta between its foot and top (t = tan
 * theta): tan theta = L d / (d^2 - (L - h) h), solved for d > 0. Exact for a vertical segment off the
 * camera's height, where L / (2 tan(theta/2)) is not (it treats the segment as square to the sight
 * line through its middle). NaN when theta does not fit the height.
 */
export function footDistanceUnchecked(L: number, tanTheta: number, h: number): number {
  const disc = L * L + 4 * tanTheta * tanTheta * (L - h) * h;
  const d = (L + Math.sqrt(disc)) / (2 * tanTheta);
  return d > 0 && disc >= 0 ? d : Number.NaN;
}

/** Angle (rad, 0 to 180 deg) an object of true size L subtends at range R and aspect angle a. */
export function angularSizeAt(trueSizeM: number, rangeM: number, aspectRad = BROADSIDE): number {
  size(trueSizeM);
  positive('range', rangeM, MAX_RANGE_M, ' m');
  aspect(aspectRad);
  // atan2 keeps the quotient from overflowing when the range is tiny next to the size
  return 2 * Math.atan2(trueSizeM * Math.sin(aspectRad), 2 * rangeM);
}

/** Range from two marked columns of the centre row (camera-frame pixels). */
export function rangeFromColumns(
  u1: number,
  u2: number,
  widthPx: number,
  hfovRad: number,
  trueSizeM: number,
  aspectRad = BROADSIDE,
): number {
  return rangeFromAngularSize(trueSizeM, angleBetweenColumns(u1, u2, widthPx, hfovRad), aspectRad);
}

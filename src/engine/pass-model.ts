/*
 * The straight pass in the ground frame (DESIGN.md): the observer at the origin at the reference
 * time tr, moving along +x at u; the object level at height h above the camera, flying straight at
 * signed speed w along the track direction (cos beta, sin beta), beta the track's angle to the road
 * (0: parallel). At tr the object stands at (xr, yr, h) with yr = rho cos eps, h = rho sin eps: rho is
 * its slant distance from the road's line and eps that line-of-sight's elevation, square to the road.
 * Relative position at time t, tau = t - tr:
 *   r(t) = (xr + (w cos beta - u) tau, yr + w sin beta tau, h).
 *
 * What a span sees: a segment of length L along unit axis e centred on the object subtends exactly
 *   theta = atan2(L |r x e|, R^2 - L^2/4)
 * (the rays to r +- L e / 2: their cross product is L (e x r), their dot product R^2 - L^2/4). For the
 * length axis on a parallel pass |r x e| = rho', the slant distance at closest approach, so the span
 * goes as L rho' / R^2, not L / R: the aspect turns through the pass. The wing axis is level and
 * square to the track; a height is vertical; a "square" span (a ball, a disc facing the camera, the
 * old flat test target) subtends 2 atan(L / 2R) whatever the direction.
 */

export const Axis = {
  /** along the track: nose to tail */
  LENGTH: 0,
  /** level, square to the track: wing tip to wing tip */
  WINGSPAN: 1,
  /** vertical */
  HEIGHT: 2,
  /** kept square to the line of sight: the same from every direction */
  SQUARE: 3,
} as const;
export type AxisCode = (typeof Axis)[keyof typeof Axis];

/** Slots of a pass's physical parameters (PassParams). */
export const P = {
  /** signed ground speed along the track direction, m/s */
  w: 0,
  /** the track's angle to the road, rad, |beta| < pi/2 */
  beta: 1,
  /** along-road position of the object relative to the observer at tr, m */
  xr: 2,
  /** slant distance from the road's line at tr, square to the road, m */
  rho: 3,
  /** elevation of that distance, rad */
  eps: 4,
} as const;
export const PASS_PARAMS = 5;

/** The relative position at time t into out[0..2]; `p` holds the PassParams, u the observer's speed. */
export function relativePosition(p: Float64Array, u: number, tr: number, t: number, out: Float64Array): void {
  const tau = t - tr;
  const cb = Math.cos(p[P.beta]!);
  const sb = Math.sin(p[P.beta]!);
  const w = p[P.w]!;
  const rho = p[P.rho]!;
  out[0] = p[P.xr]! + (w * cb - u) * tau;
  out[1] = rho * Math.cos(p[P.eps]!) + w * sb * tau;
  out[2] = rho * Math.sin(p[P.eps]!);
}

/** Exact angle subtended by a span of length L along `axis` at relative position (rx, ry, rz). */
export function spanAngle(axis: AxisCode, L: number, beta: number, rx: number, ry: number, rz: number): number {
  return spanAngleTrig(axis, L, Math.cos(beta), Math.sin(beta), rx, ry, rz);
}

/** spanAngle with cos and sin of the track's angle given, for loops over marks of one pass. */
export function spanAngleTrig(axis: AxisCode, L: number, cb: number, sb: number, rx: number, ry: number, rz: number): number {
  const R2 = rx * rx + ry * ry + rz * rz;
  if (axis === Axis.SQUARE) return 2 * Math.atan(L / (2 * Math.sqrt(R2)));
  let along: number; // r . e
  if (axis === Axis.LENGTH) along = rx * cb + ry * sb;
  else if (axis === Axis.WINGSPAN) along = -rx * sb + ry * cb;
  else along = rz;
  const across = Math.sqrt(Math.max(R2 - along * along, 0));
  return Math.atan2(L * across, R2 - (L * L) / 4);
}

/** sin of the aspect: the share of the axis square to the line of sight, |r x e| / R. */
export function aspectSine(axis: AxisCode, beta: number, rx: number, ry: number, rz: number): number {
  return aspectSineTrig(axis, Math.cos(beta), Math.sin(beta), rx, ry, rz);
}

/** aspectSine with cos and sin of the track's angle given, for loops over marks of one pass. */
export function aspectSineTrig(axis: AxisCode, cb: number, sb: number, rx: number, ry: number, rz: number): number {
  const R2 = rx * rx + ry * ry + rz * rz;
  if (axis === Axis.SQUARE) return 1;
  let along: number;
  if (axis === Axis.LENGTH) along = rx * cb + ry * sb;
  else if (axis === Axis.WINGSPAN) along = -rx * sb + ry * cb;
  else along = rz;
  return Math.sqrt(Math.max(R2 - along * along, 0) / R2);
}

/**
 * The sight-line fixed point at relative position (rx, ry) (DESIGN.md): s* = -(n . u)/(n . (w - u))
 * along the horizontal sight line, n square to it. Infinity when the bearing does not change.
 */
export function fixedPointFractionAt(p: Float64Array, u: number, rx: number, ry: number): number {
  const w = p[P.w]!;
  const beta = p[P.beta]!;
  const vx = w * Math.cos(beta) - u;
  const vy = w * Math.sin(beta);
  const den = rx * vy - ry * vx;
  const scale = Math.hypot(rx, ry) * (Math.abs(u) + Math.abs(w));
  if (!(Math.abs(den) > 1e-9 * scale)) return Number.POSITIVE_INFINITY;
  return (ry * u) / den;
}

/** Closest approach of the relative motion: [tClosest, slant distance, horizontal distance] into out. */
export function closestApproach(p: Float64Array, u: number, tr: number, out: Float64Array): void {
  const w = p[P.w]!;
  const beta = p[P.beta]!;
  const vx = w * Math.cos(beta) - u;
  const vy = w * Math.sin(beta);
  const rho = p[P.rho]!;
  const x = p[P.xr]!;
  const y = rho * Math.cos(p[P.eps]!);
  const z = rho * Math.sin(p[P.eps]!);
  const v2 = vx * vx + vy * vy;
  const tau = v2 > 0 ? -(x * vx + y * vy) / v2 : 0;
  const hx = x + vx * tau;
  const hy = y + vy * tau;
  const h = Math.hypot(hx, hy);
  out[0] = tr + tau;
  out[1] = Math.sqrt(h * h + z * z);
  out[2] = h;
}

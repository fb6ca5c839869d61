import { MAX_FRAME_PX } from './constants';
import { InputError } from './errors';
import { devicePixelsPerIntrinsic, type Mapping } from './display';
import { lumaAt, type Gray } from './gray';
import { snapAlong } from './snap';
import { finite, inRange, positive } from './validate';

/*
 * The ends of a marked span: how well the hand placed them, and snapping them to the object's edge.
 *
 * A snap may only refine an end along the span. It looks for the edge nearest the user's point (the
 * object giving way to the background going outward), in a window that shrinks with the span, and
 * is refused when it would move the end more than MAX_MOVE_PX or change the span by more than
 * MAX_SPAN_CHANGE: then the user's point stands and the caller says so. Each end carries its own
 * sigma, never below what the method has been measured to achieve (SNAP_FLOOR_PX) and, for a point
 * the snap did not move, the hand's floor (handSigmaPx).
 */

/** A hand-placed point is good to about half a CSS pixel (common practice). */
export const HAND_CSS_PX = 0.5;
/** Rounding to the nearest pixel is uniform over it: sigma 1/sqrt(12) of a pixel. */
export const ROUND_SIGMA = 1 / Math.sqrt(12);
/**
 * How many intrinsic video pixels one CSS pixel on screen covers along the direction (dx, dy) (any
 * non-zero vector), for a picture drawn through the mapping: the zoom at which an end is placed.
 */
export function intrinsicPerCssAlong(m: Mapping, dx: number, dy: number): number {
  finite('direction x', dx);
  finite('direction y', dy);
  const d = Math.hypot(dx, dy);
  if (!(d > 0)) throw new InputError('direction', `(${dx}, ${dy})`, 'a non-zero vector');
  const css = devicePixelsPerIntrinsic(m, 1);
  return 1 / Math.hypot((dx / d) * css.x, (dy / d) * css.y);
}

/**
 * One-sigma placement error of a hand-placed end, intrinsic px: the hand's, at the zoom of the
 * moment (intrinsic px per CSS px along the span), and the picture's own rounding to whole pixels
 * (an edge is seen only to the pixel that holds it), added in quadrature. With the overlay's lens
 * showing (each video pixel 8 CSS px wide) the eye no longer limits the placement; the pointer's
 * step of a whole CSS px does, rounding uniformly: ROUND_SIGMA of a CSS px instead of half of one.
 */
export function handSigmaPx(intrinsicPerCss: number, magnified: boolean): number {
  positive('intrinsic px per CSS px', intrinsicPerCss, 1000);
  const css = magnified ? ROUND_SIGMA : HAND_CSS_PX;
  return Math.hypot(css * intrinsicPerCss, ROUND_SIGMA);
}

/**
 * The one sigma a mark stores for its two ends (the schema keeps one per mark): their root mean
 * square, so that sqrt(2) * edgeSigmaPx, the sigma the engine draws for the span's length, equals
 * sqrt(sa^2 + sb^2) exactly.
 */
export function markSigmaPx(sa: number, sb: number): number {
  inRange('end sigma', sa, 0, 50, ' px');
  inRange('end sigma', sb, 0, 50, ' px');
  return Math.sqrt((sa * sa + sb * sb) / 2);
}

/** Largest move of an end a snap may make, px (issue 12: a snap refines, never jumps). */
export const MAX_MOVE_PX = 1.5;
/** Largest change of the span, as a share of it, that snapping may make (issue 12). */
export const MAX_SPAN_CHANGE = 0.05;
/**
 * Least sigma of a snapped end, px: it covers at two sigmas the snapper's own bias on the blunt ends
 * of the tests' silhouettes (span-ends.test.ts measures 0.07 px at a flat nose and 0.53 px at a
 * blunt tail whose fin's trailing edge stands 1.8 px inside the end, with a line drawn 0.5 px toward
 * the fin and a blur of 1 px).
 */
export const SNAP_FLOOR_PX = 0.3;
/**
 * The floor for a landmark's ends: a foot standing on the ground and the thin top of a mast are
 * poorer edges than an object against the sky. On the truth matrix's clips (test/fixtures) the
 * snapped feet and tops of masts and towers erred by up to 1.0 px (0.32 px RMS) where the object's
 * ends erred by 0.22 px RMS.
 */
export const LANDMARK_SNAP_FLOOR_PX = 0.5;
/**
 * Sigma added for a taper that is not a straight cone, as a share of its correction: the moment
 * estimate is exact for a cone, over-corrects a rounded nose (width growing as a square root) and
 * an end with another edge close inside it (a fin's), and under-corrects a spike. A quarter keeps
 * every kind of end in the tests within two sigmas in at least 90 % of trials.
 */
const TAPER_SHAPE_SHARE = 0.25;

/** Window either side of the user's point in which the edge is sought: a fifth of the span, 1 to 6 px. */
export function snapRadiusPx(spanPx: number): number {
  return Math.min(6, Math.max(1, spanPx / 5));
}

/** Widest smoothing used: a tenth of the span (0.5 to 3 px), so that the ends' structures stay apart. */
function maxScalePx(spanPx: number): number {
  return Math.min(3, Math.max(0.5, spanPx / 10));
}

/**
 * Spacing of the snap's three parallel lines: a fortieth of the span, at most the usual pixel. The
 * band must stay inside the object's thickness (about a tenth of a side view's length) or its outer
 * lines run along the sides and take a fin's or an engine's edge for the end.
 */
function lineSpacingPx(spanPx: number): number {
  return Math.min(1, spanPx / 40);
}

export interface EndInput {
  x: number;
  y: number;
  /** What the end claims if the snap does not move it (the hand's floor for a new end), px. */
  sigmaPx: number;
}

/**
 * unchanged: not asked to snap; snapped; no-edge: nothing clear near the point; too-far: the edge
 * lies beyond MAX_MOVE_PX or the span's share; span-change: both ends together would change the span
 * too much, and this one moved more; not-better: the snap's sigma is above the end's own.
 */
export type EndOutcome = 'unchanged' | 'snapped' | 'no-edge' | 'too-far' | 'span-change' | 'not-better';

export interface EndResult {
  /** Where the end is now, intrinsic px (the user's point unless snapped). */
  x: number;
  y: number;
  sigmaPx: number;
  outcome: EndOutcome;
  /** How far the snap moved the end, or would have: px along the span, positive outward (longer). */
  movePx: number;
  /** The outward correction for a tapering end inside movePx, px. */
  taperPx: number;
}

interface Found {
  offset: number;
  sigma: number;
  spread2: number;
  spread2Sd: number;
  crisp2: number;
}

/**
 * Snaps the ends of the span a-b that `which` names (the other is measured, not moved).
 *
 * Tapering ends: a gradient snap finds a pointed nose where its width fills the profile, inside the
 * tip. Such an end is wider along the span than a crisp edge: for a linear taper whose profile
 * rises over R px the snap lands R/2 inside the tip, and the gradient's second moment exceeds a
 * crisp edge's by R^2/12, so the tip lies sqrt(3 * excess) further out. Blur widens an end the same
 * way without moving it, and one picture cannot tell the two apart; it blurs both ends alike, so the
 * smaller excess of the two ends bounds the blur's share. The correction is the middle of what the
 * excess allows, [sqrt(3 (excess - blur bound)), sqrt(3 excess)], and its sigma covers that range as
 * a uniform, plus TAPER_SHAPE_SHARE of it for shapes other than a cone. The correction is one-sided:
 * it only ever moves an end outward.
 */
export function snapSpanEnds(img: Gray, ends: readonly [EndInput, EndInput], which: 0 | 1 | 'both', floorPx: number = SNAP_FLOOR_PX): [EndResult, EndResult] {
  const [a, b] = ends;
  for (const [k, e] of [a, b].entries()) {
    if (typeof e !== 'object' || e === null) throw new InputError(`end ${k + 1}`, e, 'an object with x, y, sigmaPx');
    inRange(`end ${k + 1} x`, e.x, -MAX_FRAME_PX, 2 * MAX_FRAME_PX, ' px');
    inRange(`end ${k + 1} y`, e.y, -MAX_FRAME_PX, 2 * MAX_FRAME_PX, ' px');
    inRange(`end ${k + 1} sigma`, e.sigmaPx, 0, 50, ' px');
  }
  if (which !== 0 && which !== 1 && which !== 'both') throw new InputError('ends to snap', which, "0, 1 or 'both'");
  const keep = (e: EndInput, outcome: EndOutcome, movePx = 0, taperPx = 0): EndResult => ({ x: e.x, y: e.y, sigmaPx: e.sigmaPx, outcome, movePx, taperPx });
  const asked = (k: 0 | 1) => which === 'both' || which === k;
  const len = Math.hypot(b.x - a.x, b.y - a.y);
  if (!(len >= 2)) return [keep(a, asked(0) ? 'no-edge' : 'unchanged'), keep(b, asked(1) ? 'no-edge' : 'unchanged')];
  const ux = (b.x - a.x) / len;
  const uy = (b.y - a.y) / len;
  const radius = snapRadiusPx(len);
  const objectLevel = median(img, a.x + 0.25 * (b.x - a.x), a.y + 0.25 * (b.y - a.y), a.x + 0.75 * (b.x - a.x), a.y + 0.75 * (b.y - a.y));
  const found: (Found | null)[] = [a, b].map((e, k) => {
    const ox = k === 0 ? -ux : ux;
    const oy = k === 0 ? -uy : uy;
    if (!(e.x >= 0 && e.x <= img.width && e.y >= 0 && e.y <= img.height)) return null;
    // outward, the object gives way to the background: only an edge of that sense is this end
    const bg = median(img, e.x + (radius + 1) * ox, e.y + (radius + 1) * oy, e.x + (radius + 3) * ox, e.y + (radius + 3) * oy);
    const sign = Math.abs(bg - objectLevel) > 0.02 * Math.max(Math.abs(bg), Math.abs(objectLevel)) ? (bg > objectLevel ? 1 : -1) : undefined;
    const s = snapAlong(img, e.x, e.y, ox, oy, radius, { pick: 'nearest', maxScalePx: maxScalePx(len), lineSpacingPx: lineSpacingPx(len), ...(sign ? { sign } : {}) });
    if (!s || !(s.spreadPx > 0)) return s ? { offset: s.offsetPx, sigma: s.sigmaPx, spread2: 0, spread2Sd: 0, crisp2: 0 } : null;
    const crisp = crispSpread(s.x, s.y, ox, oy, lineSpacingPx(len));
    return { offset: s.offsetPx, sigma: s.sigmaPx, spread2: s.spreadPx ** 2, spread2Sd: 2 * s.spreadPx * s.spreadSigmaPx, crisp2: crisp * crisp };
  });
  const excess = found.map((f) => (f ? f.spread2 - f.crisp2 : Number.POSITIVE_INFINITY));
  // the blur's share is at most the smaller end's excess (taken one noise sigma high, since the
  // smaller of two noisy values runs low)
  const blurBound = Math.max(0, Math.min(...found.map((f, k) => (f ? excess[k]! + f.spread2Sd : Number.POSITIVE_INFINITY))));
  const out: EndResult[] = [a, b].map((e, k) => {
    if (!asked(k as 0 | 1)) return keep(e, 'unchanged');
    const f = found[k];
    if (!f) return keep(e, 'no-edge');
    const ex = excess[k]!;
    const hi = Math.sqrt(3 * Math.max(0, ex));
    const lo = Math.sqrt(3 * Math.max(0, ex - blurBound));
    const taper = (lo + hi) / 2;
    // the noise of the excess, carried through the square root at one sigma either side
    const noise = (Math.sqrt(3 * Math.max(0, ex + f.spread2Sd)) - Math.sqrt(3 * Math.max(0, ex - f.spread2Sd))) / 2;
    const taperSigma = Math.hypot((hi - lo) / Math.sqrt(12), TAPER_SHAPE_SHARE * taper, noise);
    const move = f.offset + taper;
    const sigma = Math.hypot(Math.max(f.sigma, floorPx), taperSigma);
    if (Math.abs(move) > Math.min(MAX_MOVE_PX, MAX_SPAN_CHANGE * len)) return keep(e, 'too-far', move, taper);
    if (sigma > e.sigmaPx) return keep(e, 'not-better', move, taper);
    const ox = k === 0 ? -ux : ux;
    const oy = k === 0 ? -uy : uy;
    return { x: e.x + move * ox, y: e.y + move * oy, sigmaPx: sigma, outcome: 'snapped', movePx: move, taperPx: taper };
  });
  // together the ends may not change the span more than one may: the one that moved more goes back
  const [ra, rb] = out as [EndResult, EndResult];
  if (ra.outcome === 'snapped' && rb.outcome === 'snapped' && Math.abs(ra.movePx + rb.movePx) > MAX_SPAN_CHANGE * len) {
    if (Math.abs(ra.movePx) >= Math.abs(rb.movePx)) out[0] = keep(a, 'span-change', ra.movePx, ra.taperPx);
    else out[1] = keep(b, 'span-change', rb.movePx, rb.taperPx);
  }
  return [out[0]!, out[1]!];
}

/** Median luminance along a segment, one sample per 0.5 px (bilinear, clamped to the picture). */
function median(img: Gray, x1: number, y1: number, x2: number, y2: number): number {
  const n = Math.max(2, Math.ceil(Math.hypot(x2 - x1, y2 - y1) / 0.5) + 1);
  const v = new Float64Array(n);
  for (let k = 0; k < n; k++) v[k] = lumaAt(img, x1 + ((x2 - x1) * k) / (n - 1), y1 + ((y2 - y1) * k) / (n - 1));
  v.sort();
  return n % 2 ? v[n >> 1]! : 0.5 * (v[(n >> 1) - 1]! + v[n >> 1]!);
}

const PATCH = 24;
const patch = new Float32Array(PATCH * PATCH);

/**
 * The spread snapAlong measures on a crisp straight edge through (x, y) across the direction, at
 * the same sub-pixel phase: it varies from 0.3 to 0.58 px with the phase (bilinear interpolation
 * between pixel centres), more than a taper of a pixel adds, so each end is held against its own.
 */
function crispSpread(x: number, y: number, dx: number, dy: number, spacing: number): number {
  const ox = Math.floor(x) - PATCH / 2;
  const oy = Math.floor(y) - PATCH / 2;
  const cx = x - ox;
  const cy = y - oy;
  const c = dx * cx + dy * cy;
  for (let j = 0; j < PATCH; j++) for (let i = 0; i < PATCH; i++) patch[j * PATCH + i] = 100 * halfPlaneCoverage(i, j, dx, dy, c);
  const s = snapAlong({ data: patch, width: PATCH, height: PATCH, channels: 1 }, cx, cy, dx, dy, 1, { pick: 'nearest', maxScalePx: 0.5, lineSpacingPx: spacing });
  return s ? s.spreadPx : 0;
}

/**
 * Area of the pixel [i, i+1] x [j, j+1] where nx x + ny y > c: one minus the distribution function,
 * at c, of nx x + ny y over the pixel, which is the sum of two uniforms of widths |nx| and |ny| (a
 * trapezoid's distribution, measured from the pixel's corner where the sum is least).
 */
function halfPlaneCoverage(i: number, j: number, nx: number, ny: number, c: number): number {
  const a = Math.min(Math.abs(nx), Math.abs(ny));
  const b = Math.max(Math.abs(nx), Math.abs(ny));
  const t = c - nx * (nx < 0 ? i + 1 : i) - ny * (ny < 0 ? j + 1 : j);
  // a = 0 (an edge along an axis) never reaches the branches that divide by it
  const below = t <= 0 ? 0 : t >= a + b ? 1 : t < a ? (t * t) / (2 * a * b) : t <= b ? (2 * t - a) / (2 * b) : 1 - (a + b - t) ** 2 / (2 * a * b);
  return 1 - below;
}

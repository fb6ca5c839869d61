import { MAX_FRAME_PX } from './constants';
import { InputError } from './errors';
import { finite, inRange, integer } from './validate';

/*
 * Snapping a marked end to the edge under it, to a fraction of a pixel.
 *
 * Coordinates are the video's intrinsic pixels with pixel (i, j) covering [i, i+1) x [j, j+1): its
 * value sits at its centre (i + 0.5, j + 0.5). That is the convention of the marks themselves, so an
 * edge between pixels 9 and 10 lies at x = 10, and a snapped point needs no half-pixel shift.
 * Outside the image the border pixels are repeated (clamp to edge).
 *
 * Luminance is 0.2126 R + 0.7152 G + 0.0722 B (ITU-R BT.709 coefficients) applied to the values as
 * given. Canvas data are gamma-encoded, so this is luma rather than linear luminance; an edge's
 * position does not depend on that choice as long as it is the same on both sides of the edge.
 */

export interface Gray {
  data: Float32Array | Uint8ClampedArray;
  width: number;
  height: number;
  /** 1 = one luminance value per pixel; 4 = RGBA as from canvas getImageData (alpha is ignored). */
  channels: 1 | 4;
}

export interface Snap {
  /** The snapped point, intrinsic px. */
  x: number;
  y: number;
  /** Signed distance moved along the (normalised) search direction, px. */
  offsetPx: number;
  /** Peak luminance gradient along the direction, smoothed at the scale that located the edge, per px. */
  strength: number;
  /** One-sigma uncertainty of the edge position along the direction, px, in [0.1, 3]. */
  sigmaPx: number;
  /**
   * Root of the second central moment of the unsmoothed gradient about the edge, within
   * SPREAD_WINDOW_PX of it (px): how wide the edge is along the direction. A crisp straight edge
   * across the direction at sub-pixel phase f gives sqrt(1/12 + f (1 - f) + 1/96); blur, slant and
   * a tapering end widen it.
   */
  spreadPx: number;
  /** Noise sigma of spreadPx, px, by the same linear propagation as sigmaPx (0 in a noise-free float image). */
  spreadSigmaPx: number;
}

/** How snapAlong chooses among the edges inside its radius. */
export interface SnapOptions {
  /**
   * 'strongest' (the default): the edge that stands out most. 'nearest': the significant edge
   * nearest the point, tracked from the narrowest scale to the wider ones, so that a strong edge of
   * other structure a few pixels off does not win over the weaker one under the point.
   */
  pick?: 'strongest' | 'nearest';
  /** Only edges whose luminance changes with this sign along the direction (+1 rising, -1 falling). */
  sign?: 1 | -1;
  /** Widest smoothing scale used, px (0.5 to 3): wide filters merge the close edges of a small object. */
  maxScalePx?: number;
  /**
   * Spacing of the three parallel lines averaged into the profile, px (0 to 1, default 1). Across
   * a thin object the outer lines run along its sides and catch what stands on them (a fin, an
   * engine), so a small object is profiled along a narrower band.
   */
  lineSpacingPx?: number;
}

const LUMA_R = 0.2126;
const LUMA_G = 0.7152;
const LUMA_B = 0.0722;

/** Sample spacing of the profile that snapAlong searches: fine enough for a parabola over 3 samples. */
const STEP_PX = 0.25;
/**
 * Gaussian smoothing scales tried before differencing. The lightest (0.5 px) keeps single-pixel
 * noise from making the peak of a crisp edge; the wider ones match blurred edges in noise, where a
 * filter as wide as the edge finds it best (the peak's signal-to-noise ratio is largest there).
 */
const SCALES_PX = [0.5, 1, 2, 3];
const N_SCALES = SCALES_PX.length;
const KERNEL_HALF = SCALES_PX.map((s) => Math.ceil((3 * s) / STEP_PX));
const KERNEL_HALF_MAX = KERNEL_HALF[N_SCALES - 1]!;
const KERNELS = SCALES_PX.map((sigma, i) => {
  const half = KERNEL_HALF[i]!;
  const k = new Float64Array(2 * half + 1);
  let sum = 0;
  for (let j = -half; j <= half; j++) {
    const u = (j * STEP_PX) / sigma;
    k[j + half] = Math.exp(-0.5 * u * u);
    sum += k[j + half]!;
  }
  for (let j = 0; j < k.length; j++) k[j]! /= sum;
  return k;
});
/** Widest half-window of the centroid refinement; covers an edge blurred by a Gaussian of about 3 px. */
const WINDOW_MAX_PX = 8;
/** The centroid window ends where the gradient falls to this share of its peak, or at a valley. */
const WINDOW_FLOOR = 0.05;
/** Narrowest centroid half-window: a crisp edge's gradient spans a pixel either side of it. */
const MIN_WINDOW_PX = 1.5;
/** An edge must stand this many noise sigmas above the baseline gradient (a false alarm among the
 * few dozen independent samples of a pure-noise profile is then very unlikely). */
const DETECT_Z = 5;
/** ... and its gradient must reach this share of the profile's luminance level per px, so that
 * rounding in a noise-free float image is never taken for an edge. */
const MIN_RELATIVE_GRADIENT = 1e-3;
/** The first scale, narrowest first, where the edge stands this far out is the one that locates it;
 * below that the noise would move the peak by more than a linear analysis can tell. */
const LOCALISE_Z = 10;
/** An edge narrower than this (Gaussian sigma, px, pixel and interpolation included) counts as crisp. */
const CRISP_WIDTH_PX = 1;
/** Bias of the centroid on noise-free edges (crisp, blurred, slanted), as the tests measure it. */
const CENTROID_BIAS_PX = 0.05;
/** Bias of the parabola peak at smoothing scale s on a crisp edge is at most this / s (measured:
 * 0.19 px at 0.5, 0.05 at 1, 0.015 at 2, 0.01 at 3). */
const PARABOLA_BIAS_PX = 0.1;
/**
 * Half-window of the spread, px: the tails of a wide window gather more noise than edge (its
 * weights grow as the square of the distance). Two pixels hold the ramp of any taper whose bias a
 * 1.5 px snap could correct, blurred by up to a pixel.
 */
const SPREAD_WINDOW_PX = 2;
/** In 'nearest' mode a candidate must reach this share of the strongest peak in the window: in a
 * noise-free picture the 5-sigma rule alone would take the ripple of an anti-aliased slant. */
const NEAREST_MIN_SHARE = 0.15;
/** In 'nearest' mode a wider scale must find the edge within this many of its own sigmas (plus a
 * pixel) of where the narrower scale found it, or it has merged it with a neighbour and is not used. */
const TRACK_SCALES = 1;
const MIN_SIGMA_PX = 0.1;
const MAX_SIGMA_PX = 3;
/** Largest search radius accepted: the scratch buffers below are sized for it. */
export const MAX_SNAP_RADIUS_PX = 32;
/** Parallel lines averaged into the profile, and their spacing across the direction. */
const LINES = 3;
const LINE_MID = (LINES - 1) / 2;
const LINE_SPACING_PX = 1;
/** The spacing of the call under way (SnapOptions.lineSpacingPx). */
let lineSpacing = LINE_SPACING_PX;
/** Profile beyond the search radius: room for the widest kernel and the centroid window. */
const MARGIN_PX = Math.max(WINDOW_MAX_PX, KERNEL_HALF_MAX * STEP_PX) + 2 * STEP_PX;
const HALF_MAX = MAX_SNAP_RADIUS_PX + MARGIN_PX;
const MAX_SAMPLES = 2 * Math.ceil(HALF_MAX / STEP_PX) + 1;
// scratch, reused across calls (so snapAlong must not be re-entered, which single-threaded callers
// cannot do): snapping runs on every drag end and should not churn the heap
const prof = new Float64Array(MAX_SAMPLES);
const smooth = new Float64Array(MAX_SAMPLES);
const GRADS = SCALES_PX.map(() => new Float64Array(MAX_SAMPLES));
const scPeakAt = new Int32Array(N_SCALES);
const scPeak = new Float64Array(N_SCALES);
const scBase = new Float64Array(N_SCALES);
const scSigma = new Float64Array(N_SCALES);
const scZ = new Float64Array(N_SCALES);
const sorted = new Float64Array(MAX_SAMPLES);
const rawGrad = new Float64Array(MAX_SAMPLES);
const coef = new Float64Array(MAX_SAMPLES);
const GRID_SIDE = Math.ceil(2 * HALF_MAX + (LINES - 1) * LINE_SPACING_PX) + 4;
const grid = new Float64Array(GRID_SIDE * GRID_SIDE);
const PATCH_SIDE = 2 * MAX_SNAP_RADIUS_PX + 14;
const patchAbs = new Float32Array(PATCH_SIDE * PATCH_SIDE);

function checkGray(img: Gray): void {
  if (typeof img !== 'object' || img === null) throw new InputError('image', img, 'an object with data, width, height, channels');
  integer('image width', img.width, 1, MAX_FRAME_PX);
  integer('image height', img.height, 1, MAX_FRAME_PX);
  if (img.channels !== 1 && img.channels !== 4) throw new InputError('image channels', img.channels, '1 or 4');
  if (!(img.data instanceof Float32Array || img.data instanceof Uint8ClampedArray)) {
    throw new InputError('image data', img.data, 'a Float32Array or Uint8ClampedArray');
  }
  const need = img.width * img.height * img.channels;
  if (img.data.length < need) {
    throw new InputError('image data length', img.data.length, `at least ${need} (width x height x channels)`);
  }
}

function pixelLuma(img: Gray, i: number, j: number): number {
  const d = img.data;
  if (img.channels === 1) return d[j * img.width + i]!;
  const k = (j * img.width + i) * 4;
  return LUMA_R * d[k]! + LUMA_G * d[k + 1]! + LUMA_B * d[k + 2]!;
}

/** Bilinear luminance at (x, y), pixel centres at integer + 0.5, clamped to the border. */
function lumaAt(img: Gray, x: number, y: number): number {
  const fx = x - 0.5;
  const fy = y - 0.5;
  const fi = Math.floor(fx);
  const fj = Math.floor(fy);
  const tx = fx - fi;
  const ty = fy - fj;
  const wm = img.width - 1;
  const hm = img.height - 1;
  const i0 = fi < 0 ? 0 : fi > wm ? wm : fi;
  const i1 = fi + 1 < 0 ? 0 : fi + 1 > wm ? wm : fi + 1;
  const j0 = fj < 0 ? 0 : fj > hm ? hm : fj;
  const j1 = fj + 1 < 0 ? 0 : fj + 1 > hm ? hm : fj + 1;
  const top = (1 - tx) * pixelLuma(img, i0, j0) + tx * pixelLuma(img, i1, j0);
  const bottom = (1 - tx) * pixelLuma(img, i0, j1) + tx * pixelLuma(img, i1, j1);
  return (1 - ty) * top + ty * bottom;
}

/** Number of samples sampleLine takes: one every stepPx from the first end, up to the second. */
export function sampleCount(x1: number, y1: number, x2: number, y2: number, stepPx = 0.25): number {
  checkSegment(x1, y1, x2, y2, stepPx);
  return countOf(x1, y1, x2, y2, stepPx);
}

function countOf(x1: number, y1: number, x2: number, y2: number, stepPx: number): number {
  // the small slack keeps a length that is a whole number of steps from losing its last sample
  return Math.floor(Math.hypot(x2 - x1, y2 - y1) / stepPx + 1e-9) + 1;
}

function checkSegment(x1: number, y1: number, x2: number, y2: number, stepPx: number): void {
  const lo = -MAX_FRAME_PX;
  const hi = 2 * MAX_FRAME_PX;
  inRange('line start x', x1, lo, hi, ' px');
  inRange('line start y', y1, lo, hi, ' px');
  inRange('line end x', x2, lo, hi, ' px');
  inRange('line end y', y2, lo, hi, ' px');
  inRange('sample step', stepPx, 0.01, 16, ' px');
}

/**
 * Bilinear luminance samples along the segment from (x1, y1) toward (x2, y2), one every stepPx,
 * starting exactly at the first end; the last lies at the second end when the length is a whole
 * number of steps, else short of it by less than a step (sampleCount says how many). With out, the
 * samples are written into it (it must hold them) and out itself is returned when its length is
 * exactly the count, else a view of its first sampleCount entries.
 */
export function sampleLine(
  img: Gray,
  x1: number,
  y1: number,
  x2: number,
  y2: number,
  stepPx = 0.25,
  out?: Float32Array,
): Float32Array {
  checkGray(img);
  checkSegment(x1, y1, x2, y2, stepPx);
  const n = countOf(x1, y1, x2, y2, stepPx);
  if (out !== undefined) {
    if (!(out instanceof Float32Array)) throw new InputError('sample buffer', out, 'a Float32Array');
    if (out.length < n) throw new InputError('sample buffer length', out.length, `at least ${n} (the number of samples)`);
  }
  const res = out ?? new Float32Array(n);
  const len = Math.hypot(x2 - x1, y2 - y1);
  const ux = len > 0 ? (x2 - x1) / len : 0;
  const uy = len > 0 ? (y2 - y1) / len : 0;
  for (let k = 0; k < n; k++) res[k] = lumaAt(img, x1 + k * stepPx * ux, y1 + k * stepPx * uy);
  return res.length === n ? res : res.subarray(0, n);
}

/**
 * Snaps (x, y) to the strongest edge crossed by the line through it along (dirX, dirY) (any
 * non-zero vector; it is normalised), within radiusPx either side.
 *
 * Profile: luminance every 0.25 px along the line, averaged with the parallel lines 1 px either
 * side (symmetric offsets leave a straight edge where it is and cut the noise).
 *
 * Detection: the profile is smoothed by Gaussians of 0.5, 1, 2 and 3 px and differenced centrally;
 * at each scale the edge is the largest local maximum of |gradient - median gradient| within the
 * radius, and its noise sigma follows exactly from the pixel noise, because every stage is linear
 * in the pixel values. null when at every scale the peak stands less than 5 sigmas out, or its
 * gradient is below 1e-3 of the luminance level per px. The pixel noise is estimated around the
 * point by Immerkaer's (1996) mask [1 -2 1; -2 4 -2; 1 -2 1], which ramps do not excite, through the
 * median of its absolute response so that the edges themselves do not count; integer data never
 * count below their rounding noise (1/12 of a level squared per channel).
 *
 * Scale: a crisp edge (Gaussian width under 1 px, judged by how its peak falls from the narrowest
 * reliable scale to the widest) is located at the narrowest scale where it stands 10 sigmas out:
 * wider filters trade position for signal-to-noise and reach into neighbouring structure. A
 * blurred edge is located at the scale where it stands out most, which is about as wide as itself.
 *
 * Position: a parabola through the three samples around the peak gives a sub-sample peak. At the
 * narrowest scale that peak is biased on crisp edges (up to 0.2 px: a pixel that the edge cuts makes
 * the gradient lopsided), so there the position is refined to the centroid of the unsmoothed
 * gradient over a window centred on the centroid itself (mean shift), as wide as the gradient's
 * spread but never past a valley into a neighbouring edge. For pixels that average the picture over
 * their area and are interpolated linearly, that centroid is the edge (the moment method: the
 * interpolant's area equals the picture's), crisp or symmetrically blurred. At the wider scales the
 * parabola's bias is small and its peak stands.
 *
 * sigmaPx: the position's noise sigma by the same linear propagation, combined with the method's
 * bias (0.05 px for the centroid, 0.1 px / scale for the parabola), clamped to [0.1, 3] px: large
 * for a weak or broad edge in noise, small for a crisp strong one. Seeded simulations in the tests
 * check that the scatter of snapped edges matches it. The rest of the engine treats it as a normal
 * error along the span.
 */
export function snapAlong(img: Gray, x: number, y: number, dirX: number, dirY: number, radiusPx = 6, opts: SnapOptions = {}): Snap | null {
  checkGray(img);
  inRange('snap point x', x, 0, img.width, ' px');
  inRange('snap point y', y, 0, img.height, ' px');
  finite('snap direction x', dirX);
  finite('snap direction y', dirY);
  const dl = Math.hypot(dirX, dirY);
  if (!(dl > 1e-9)) throw new InputError('snap direction', `(${dirX}, ${dirY})`, 'a non-zero vector');
  inRange('snap radius', radiusPx, 1, MAX_SNAP_RADIUS_PX, ' px');
  const nearest = opts.pick === 'nearest';
  if (opts.pick !== undefined && opts.pick !== 'strongest' && !nearest) throw new InputError('snap pick', opts.pick, "'strongest' or 'nearest'");
  const wantSign = opts.sign ?? 0;
  if (wantSign !== 0 && wantSign !== 1 && wantSign !== -1) throw new InputError('snap sign', opts.sign, '1 or -1');
  let nSc = N_SCALES;
  if (opts.maxScalePx !== undefined) {
    inRange('snap widest scale', opts.maxScalePx, SCALES_PX[0]!, SCALES_PX[N_SCALES - 1]!, ' px');
    nSc = 1;
    while (nSc < N_SCALES && SCALES_PX[nSc]! <= opts.maxScalePx + 1e-9) nSc++;
  }
  lineSpacing = opts.lineSpacingPx === undefined ? LINE_SPACING_PX : inRange('snap line spacing', opts.lineSpacingPx, 0, LINE_SPACING_PX, ' px');
  const dx = dirX / dl;
  const dy = dirY / dl;

  const h = STEP_PX;
  const halfCount = Math.ceil((radiusPx + MARGIN_PX) / h);
  const n = 2 * halfCount + 1;
  const s0 = -halfCount * h;
  const level = buildProfile(img, x, y, dx, dy, s0, n);
  const noise = noiseSigma(img, x, y, dx, dy, radiusPx);
  const rSteps = Math.floor(radiusPx / h + 1e-9);
  const jLo = halfCount - rSteps;
  const jHi = halfCount + rSteps;

  let best = -1;
  let firstReliable = -1;
  let track = halfCount;
  for (let sc = 0; sc < nSc; sc++) {
    const g = GRADS[sc]!;
    smoothAndDifference(sc, n, g);
    for (let j = 1; j < n - 1; j++) sorted[j - 1] = g[j]!;
    // baseline: the median gradient over the whole profile, which a broad edge cannot dominate; it
    // removes a smooth ramp (vignetting, sky) that would otherwise count as edge everywhere
    const b = medianInPlace(sorted, n - 2);
    let j: number;
    if (nearest) {
      const spHere = noise * functionalNorm(img, x, y, dx, dy, s0, h, n, gradientCoefficients(sc, track, n, 1, true));
      j = nearestPeak(g, b, jLo, jHi, track, wantSign, Math.max(DETECT_Z * spHere, MIN_RELATIVE_GRADIENT * level));
      // a wider scale that finds it elsewhere has merged it with a neighbour
      if (j >= 0 && best >= 0 && Math.abs(j - track) * h > 1 + TRACK_SCALES * SCALES_PX[sc]!) j = -1;
    } else {
      j = largestPeak(g, b, jLo, jHi, wantSign);
    }
    scPeakAt[sc] = j;
    scZ[sc] = -1;
    if (j < 0) continue;
    if (nearest && best < 0) track = j;
    const p = Math.abs(g[j]! - b);
    const sp = noise * functionalNorm(img, x, y, dx, dy, s0, h, n, gradientCoefficients(sc, j, n, 1, true));
    const z = sp > 0 ? p / sp : Number.POSITIVE_INFINITY;
    scBase[sc] = b;
    scPeak[sc] = p;
    scSigma[sc] = sp;
    scZ[sc] = z;
    if (best < 0 || z > scZ[best]!) best = sc;
    if (firstReliable < 0 && z >= LOCALISE_Z) firstReliable = sc;
  }
  if (best < 0 || scZ[best]! < DETECT_Z || scPeak[best]! < MIN_RELATIVE_GRADIENT * level) return null;
  // Which scale locates the edge: for a crisp edge the narrowest that finds it reliably (wider
  // filters trade position for signal-to-noise and reach into neighbouring structure); for a
  // blurred one the one where it stands out most, since a filter as wide as the edge locates it
  // best. The width comes from how the peak falls with scale: for an edge of Gaussian width w, the
  // peak at scale s goes as 1 / sqrt(w^2 + s^2).
  let scale = best;
  if (firstReliable >= 0 && firstReliable < nSc - 1 && scPeakAt[nSc - 1]! >= 0) {
    const sa = SCALES_PX[firstReliable]!;
    const sw = SCALES_PX[nSc - 1]!;
    const r2 = (scPeak[firstReliable]! / scPeak[nSc - 1]!) ** 2;
    const w2 = r2 > 1 ? (sw * sw - sa * sa * r2) / (r2 - 1) : Number.POSITIVE_INFINITY;
    if (w2 < CRISP_WIDTH_PX * CRISP_WIDTH_PX) scale = firstReliable;
  }
  const grad = GRADS[scale]!;
  const jPeak = scPeakAt[scale]!;
  const peak = scPeak[scale]!;
  const base = scBase[scale]!;
  const sigmaPeak = scSigma[scale]!;
  const sign = grad[jPeak]! - base > 0 ? 1 : -1;

  // parabola through the three samples around the peak
  const ga = sign * (grad[jPeak - 1]! - base);
  const gb = sign * (grad[jPeak]! - base);
  const gc = sign * (grad[jPeak + 1]! - base);
  const den = ga - 2 * gb + gc;
  const delta = den < 0 ? Math.max(-0.5, Math.min(0.5, (0.5 * (ga - gc)) / den)) : 0;
  const sParabola = s0 + (jPeak + delta) * h;

  let offset = sParabola;
  // a peak with no curvature (a plateau) gives no position better than the clamp
  let sigma = MAX_SIGMA_PX;
  if (den < 0) {
    // d delta = (d g_(j-1) - d g_(j+1)) / 2 den, to first order
    gradientCoefficients(scale, jPeak - 1, n, 0.5 / den, true);
    gradientCoefficients(scale, jPeak + 1, n, -0.5 / den, false);
    const noiseSd = h * noise * functionalNorm(img, x, y, dx, dy, s0, h, n, coef);
    sigma = Math.hypot(noiseSd, PARABOLA_BIAS_PX / SCALES_PX[scale]!);
  }
  const half = edgeWindow(grad, jPeak, peak, sign, base, sigmaPeak, n);
  rawGradient(sign, base, n);
  if (scale === 0) {
    const c = refineByCentroid(half, sParabola, s0, n);
    if (!Number.isNaN(c)) {
      offset = c;
      const cn = centroidCoefficients(rawGrad, s0, h, n, c, half, centroidMass, sign);
      sigma = Math.hypot(noise * functionalNorm(img, x, y, dx, dy, s0, h, n, cn), CENTROID_BIAS_PX);
    }
  }
  const sigmaPx = Math.min(MAX_SIGMA_PX, Math.max(MIN_SIGMA_PX, sigma));
  const spreadHalf = Math.min(half, SPREAD_WINDOW_PX);
  const spreadPx = windowSpread(rawGrad, s0, h, n, offset, spreadHalf);
  let spreadSigmaPx = 0;
  if (spreadPx > 0 && noise > 0) {
    const sn = spreadCoefficients(rawGrad, s0, h, n, offset, spreadHalf, spreadPx * spreadPx, sign);
    spreadSigmaPx = (noise * functionalNorm(img, x, y, dx, dy, s0, h, n, sn)) / (2 * spreadPx);
  }
  return { x: x + offset * dx, y: y + offset * dy, offsetPx: offset, strength: peak, sigmaPx, spreadPx, spreadSigmaPx };
}

/** Fills prof[0..n) with the mean of the parallel lines; returns the largest |luminance| seen. */
function buildProfile(img: Gray, x: number, y: number, dx: number, dy: number, s0: number, n: number): number {
  const px = -dy;
  const py = dx;
  let level = 0;
  for (let j = 0; j < n; j++) {
    const s = s0 + j * STEP_PX;
    let v = 0;
    for (let l = 0; l < LINES; l++) {
      const t = (l - LINE_MID) * lineSpacing;
      v += lumaAt(img, x + s * dx + t * px, y + s * dy + t * py);
    }
    v /= LINES;
    prof[j] = v;
    if (Math.abs(v) > level) level = Math.abs(v);
  }
  return level;
}

/** out = central difference (per px) of prof smoothed at scale sc; the ends repeat the border sample. */
function smoothAndDifference(sc: number, n: number, out: Float64Array): void {
  const k = KERNELS[sc]!;
  const half = KERNEL_HALF[sc]!;
  for (let j = 0; j < n; j++) {
    let a = 0;
    for (let i = -half; i <= half; i++) a += k[i + half]! * prof[clampIndex(j + i, n)]!;
    smooth[j] = a;
  }
  out[0] = 0;
  out[n - 1] = 0;
  for (let j = 1; j < n - 1; j++) out[j] = (smooth[j + 1]! - smooth[j - 1]!) / (2 * STEP_PX);
}

/** Whether sample j is a strict local maximum of |g - base| of the wanted sign (0: either). */
function isPeak(g: Float64Array, base: number, j: number, sign: number): boolean {
  const v = g[j]! - base;
  const a = Math.abs(v);
  return a > 0 && (sign === 0 || sign * v > 0) && a >= Math.abs(g[j - 1]! - base) && a > Math.abs(g[j + 1]! - base);
}

/** Index of the largest strict local maximum of |g - base| in [jLo, jHi] (of the sign, if one), or -1. */
function largestPeak(g: Float64Array, base: number, jLo: number, jHi: number, sign: number): number {
  let best = -1;
  let peak = 0;
  for (let j = jLo; j <= jHi; j++) {
    const a = Math.abs(g[j]! - base);
    if (a > peak && isPeak(g, base, j, sign)) {
      peak = a;
      best = j;
    }
  }
  return best;
}

/**
 * Index of the local maximum of |g - base| in [jLo, jHi] nearest jRef that reaches the threshold
 * and NEAREST_MIN_SHARE of the largest there (of the sign, if one), or -1.
 */
function nearestPeak(g: Float64Array, base: number, jLo: number, jHi: number, jRef: number, sign: number, threshold: number): number {
  const top = largestPeak(g, base, jLo, jHi, sign);
  if (top < 0) return -1;
  const need = Math.max(threshold, NEAREST_MIN_SHARE * Math.abs(g[top]! - base));
  let best = -1;
  for (let j = jLo; j <= jHi; j++) {
    if (Math.abs(g[j]! - base) >= need && isPeak(g, base, j, sign) && (best < 0 || Math.abs(j - jRef) < Math.abs(best - jRef))) best = j;
  }
  return best;
}

let centroidMass = 0;

/**
 * Half-width of the window that holds the edge at jPeak (see snapAlong): as wide as the gradient's
 * spread, never past a valley into a neighbouring edge, at least MIN_WINDOW_PX.
 */
function edgeWindow(grad: Float64Array, jPeak: number, peak: number, sign: number, base: number, sigmaPeak: number, n: number): number {
  const h = STEP_PX;
  const wSteps = Math.round(WINDOW_MAX_PX / h);
  const floor = Math.max(WINDOW_FLOOR * peak, 2 * sigmaPeak);
  const rise = 3 * sigmaPeak;
  let spread = 0;
  let valley = WINDOW_MAX_PX;
  for (let side = -1; side <= 1; side += 2) {
    let low = peak;
    let lowK = 0;
    let k = 1;
    for (; k <= wSteps; k++) {
      const j = jPeak + side * k;
      if (j < 1 || j > n - 2) break;
      const v = sign * (grad[j]! - base);
      if (v <= floor) break;
      if (v > low + rise) {
        valley = Math.min(valley, lowK * h);
        break;
      }
      if (v < low) {
        low = v;
        lowK = k;
      }
    }
    spread = Math.max(spread, k * h);
  }
  return Math.max(MIN_WINDOW_PX, Math.min(spread, valley));
}

/** rawGrad = the unsmoothed gradient, baseline removed, signed so that the edge is positive. */
function rawGradient(sign: number, base: number, n: number): void {
  rawGrad[0] = 0;
  rawGrad[n - 1] = 0;
  for (let k = 1; k < n - 1; k++) rawGrad[k] = sign * ((prof[k + 1]! - prof[k - 1]!) / (2 * STEP_PX) - base);
}

/**
 * The centroid of rawGrad about the edge, over a window of the given half-width, or NaN when the
 * window holds no positive mass or the centroid leaves it. Sets centroidMass.
 */
function refineByCentroid(half: number, start: number, s0: number, n: number): number {
  const h = STEP_PX;
  // mean shift: re-centre the window on its own centroid until it stays put, so that the noisy
  // first guess does not leave the window lopsided about the edge
  let c = start;
  for (let it = 0; it < 20; it++) {
    const r = windowCentroid(rawGrad, s0, h, n, c, half);
    if (!(r.mass > 0)) return Number.NaN;
    centroidMass = r.mass;
    const moved = Math.abs(r.c - c);
    c = r.c;
    if (moved < 1e-6) break;
  }
  return Math.abs(c - start) <= half ? c : Number.NaN;
}

/**
 * Adds to coef (cleared first when fresh) w times the coefficients, on the profile samples, of the
 * gradient at sample j and scale sc; returns coef.
 */
function gradientCoefficients(sc: number, j: number, n: number, w: number, fresh: boolean): Float64Array {
  if (fresh) coef.fill(0, 0, n);
  const k = KERNELS[sc]!;
  const half = KERNEL_HALF[sc]!;
  const f = w / (2 * STEP_PX);
  for (let i = -half; i <= half; i++) {
    coef[clampIndex(j + 1 + i, n)]! += f * k[i + half]!;
    coef[clampIndex(j - 1 + i, n)]! -= f * k[i + half]!;
  }
  return coef;
}

/** Fractional weight of sample cell [s - h/2, s + h/2] inside [lo, hi]. */
function cellWeight(s: number, h: number, lo: number, hi: number): number {
  const a = Math.max(s - 0.5 * h, lo);
  const b = Math.min(s + 0.5 * h, hi);
  return b > a ? (b - a) / h : 0;
}

const centroidOut = { c: 0, mass: 0 };

/** Centroid of g over [c - half, c + half], end samples weighted by how much of their cell is inside. */
function windowCentroid(g: Float64Array, s0: number, h: number, n: number, c: number, half: number): { c: number; mass: number } {
  const lo = c - half;
  const hi = c + half;
  const kl = Math.max(1, Math.floor((lo - s0) / h));
  const kr = Math.min(n - 2, Math.ceil((hi - s0) / h));
  let mass = 0;
  let moment = 0;
  for (let k = kl; k <= kr; k++) {
    const s = s0 + k * h;
    const w = cellWeight(s, h, lo, hi) * g[k]!;
    mass += w;
    moment += w * s;
  }
  centroidOut.mass = mass;
  centroidOut.c = mass > 0 ? moment / mass : c;
  return centroidOut;
}

/** Root of the second moment of g about c over [c - half, c + half] (weighted as windowCentroid), 0 without mass. */
function windowSpread(g: Float64Array, s0: number, h: number, n: number, c: number, half: number): number {
  const lo = c - half;
  const hi = c + half;
  const kl = Math.max(1, Math.floor((lo - s0) / h));
  const kr = Math.min(n - 2, Math.ceil((hi - s0) / h));
  let mass = 0;
  let m2 = 0;
  for (let k = kl; k <= kr; k++) {
    const s = s0 + k * h;
    const w = cellWeight(s, h, lo, hi) * g[k]!;
    mass += w;
    m2 += w * (s - c) * (s - c);
  }
  return mass > 0 && m2 > 0 ? Math.sqrt(m2 / mass) : 0;
}

/**
 * Coefficients on the profile samples of the first-order change of windowSpread's square m2 about
 * c: dm2 = sum w_k ((s_k - c)^2 - m2) dg_k / M (c held: at the centroid its own change drops out of
 * the first order), with dg_k as in centroidCoefficients.
 */
function spreadCoefficients(g: Float64Array, s0: number, h: number, n: number, c: number, half: number, m2: number, sign: number): Float64Array {
  coef.fill(0, 0, n);
  const lo = c - half;
  const hi = c + half;
  const kl = Math.max(1, Math.floor((lo - s0) / h));
  const kr = Math.min(n - 2, Math.ceil((hi - s0) / h));
  let mass = 0;
  for (let k = kl; k <= kr; k++) mass += cellWeight(s0 + k * h, h, lo, hi) * g[k]!;
  if (!(mass > 0)) return coef;
  for (let k = kl; k <= kr; k++) {
    const s = s0 + k * h;
    const w = (cellWeight(s, h, lo, hi) * ((s - c) * (s - c) - m2) * sign) / (mass * 2 * h);
    coef[k + 1]! += w;
    coef[k - 1]! -= w;
  }
  return coef;
}

/**
 * Coefficients on the profile samples of the first-order change of the window centroid c at its
 * fixed point: dc = [sum w_k (s_k - c) dg_k / M] / (1 - half (g(lo) + g(hi)) / M), the denominator
 * because the window moves with c; dg_k = sign (dp_(k+1) - dp_(k-1)) / 2h.
 */
function centroidCoefficients(g: Float64Array, s0: number, h: number, n: number, c: number, half: number, mass: number, sign: number): Float64Array {
  coef.fill(0, 0, n);
  const lo = c - half;
  const hi = c + half;
  const kl = Math.max(1, Math.floor((lo - s0) / h));
  const kr = Math.min(n - 2, Math.ceil((hi - s0) / h));
  const gLo = g[clampIndex(Math.round((lo - s0) / h), n)]!;
  const gHi = g[clampIndex(Math.round((hi - s0) / h), n)]!;
  const shrink = 1 - (half * (gLo + gHi)) / mass;
  const scale = shrink > 0.1 ? 1 / (mass * shrink) : 10 / mass;
  for (let k = kl; k <= kr; k++) {
    const s = s0 + k * h;
    const w = (cellWeight(s, h, lo, hi) * (s - c) * scale * sign) / (2 * h);
    coef[k + 1]! += w;
    coef[k - 1]! -= w;
  }
  return coef;
}

function clampIndex(j: number, n: number): number {
  return j < 0 ? 0 : j >= n ? n - 1 : j;
}

/**
 * Root of the sum of squared pixel weights of a linear functional of the profile (coefficients c on
 * its samples): multiplied by the pixel noise sigma it gives the functional's noise sigma.
 */
function functionalNorm(img: Gray, x: number, y: number, dx: number, dy: number, s0: number, h: number, n: number, c: Float64Array): number {
  const sEnd = s0 + (n - 1) * h;
  const tMax = LINE_MID * lineSpacing;
  const px = -dy;
  const py = dx;
  const gx0 = Math.floor(Math.min(x + s0 * dx, x + sEnd * dx) - tMax * Math.abs(px) - 0.5);
  const gy0 = Math.floor(Math.min(y + s0 * dy, y + sEnd * dy) - tMax * Math.abs(py) - 0.5);
  const side = GRID_SIDE;
  grid.fill(0);
  const wm = img.width - 1;
  const hm = img.height - 1;
  for (let q = 0; q < n * LINES; q++) {
    const j = q % n;
    const cj = c[j]! / LINES;
    if (cj === 0) continue;
    const s = s0 + j * h;
    const t = (Math.floor(q / n) - LINE_MID) * lineSpacing;
    const fx = x + s * dx + t * px - 0.5;
    const fy = y + s * dy + t * py - 0.5;
    const fi = Math.floor(fx);
    const fj = Math.floor(fy);
    const tx = fx - fi;
    const ty = fy - fj;
    // clamped pixels are the same pixel, so their weights must add before squaring
    const i0 = (fi < 0 ? 0 : fi > wm ? wm : fi) - gx0;
    const i1 = (fi + 1 < 0 ? 0 : fi + 1 > wm ? wm : fi + 1) - gx0;
    const j0 = (fj < 0 ? 0 : fj > hm ? hm : fj) - gy0;
    const j1 = (fj + 1 < 0 ? 0 : fj + 1 > hm ? hm : fj + 1) - gy0;
    addWeight(i0, j0, cj * (1 - tx) * (1 - ty), side);
    addWeight(i1, j0, cj * tx * (1 - ty), side);
    addWeight(i0, j1, cj * (1 - tx) * ty, side);
    addWeight(i1, j1, cj * tx * ty, side);
  }
  let ss = 0;
  for (let k = 0; k < side * side; k++) ss += grid[k]! * grid[k]!;
  return Math.sqrt(ss);
}

function addWeight(i: number, j: number, w: number, side: number): void {
  // clamping to the image can only move a pixel toward the grid's interior, never out of it
  if (i >= 0 && i < side && j >= 0 && j < side) grid[j * side + i]! += w;
}

/**
 * Pixel noise sigma around the search segment (Immerkaer 1996, median form), never below the
 * rounding noise of integer data.
 */
function noiseSigma(img: Gray, x: number, y: number, dx: number, dy: number, r: number): number {
  const pad = 6;
  const i0 = Math.max(0, Math.floor(Math.min(x - r * dx, x + r * dx)) - pad);
  const i1 = Math.min(img.width - 1, Math.floor(Math.max(x - r * dx, x + r * dx)) + pad);
  const j0 = Math.max(0, Math.floor(Math.min(y - r * dy, y + r * dy)) - pad);
  const j1 = Math.min(img.height - 1, Math.floor(Math.max(y - r * dy, y + r * dy)) + pad);
  let m = 0;
  for (let j = j0 + 1; j < j1; j++) {
    for (let i = i0 + 1; i < i1; i++) {
      const v =
        pixelLuma(img, i - 1, j - 1) - 2 * pixelLuma(img, i, j - 1) + pixelLuma(img, i + 1, j - 1) -
        2 * pixelLuma(img, i - 1, j) + 4 * pixelLuma(img, i, j) - 2 * pixelLuma(img, i + 1, j) +
        pixelLuma(img, i - 1, j + 1) - 2 * pixelLuma(img, i, j + 1) + pixelLuma(img, i + 1, j + 1);
      patchAbs[m++] = Math.abs(v);
    }
  }
  // the mask's weights square-sum to 36, and the median of |N(0, 1)| is 0.67449
  const est = m > 0 ? medianF32(patchAbs, m) / (6 * 0.6744897501960817) : 0;
  const rounding = img.data instanceof Uint8ClampedArray ? roundingSigma(img.channels) : 0;
  return Math.max(est, rounding);
}

function roundingSigma(channels: 1 | 4): number {
  const w2 = channels === 1 ? 1 : LUMA_R * LUMA_R + LUMA_G * LUMA_G + LUMA_B * LUMA_B;
  return Math.sqrt(w2 / 12);
}

function medianInPlace(a: Float64Array, m: number): number {
  const v = a.subarray(0, m).sort();
  const h = m >> 1;
  return m % 2 === 1 ? v[h]! : 0.5 * (v[h - 1]! + v[h]!);
}

function medianF32(a: Float32Array, m: number): number {
  const v = a.subarray(0, m).sort();
  const h = m >> 1;
  return m % 2 === 1 ? v[h]! : 0.5 * (v[h - 1]! + v[h]!);
}

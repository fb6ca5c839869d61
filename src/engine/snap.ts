import { InputError } from './errors';
import { checkGray, lumaAt, noiseSigma, NOISE_RADIUS_MAX_PX, type Gray } from './gray';
import { clampIndex, largestPeak, medianInPlace, nearestPeak } from './peaks';
import { functionalNorm, reserveNoiseGrid } from './snap-noise';
import { centroidCoefficients, spreadCoefficients, windowCentroid, windowSpread } from './snap-moments';
import { finite, inRange } from './validate';

export { sampleCount, sampleLine, type Gray } from './gray';

/*
 * Snapping a marked end to the edge under it, to a fraction of a pixel (coordinates and luminance
 * as in gray.ts).
 */

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
export const MAX_SNAP_RADIUS_PX = NOISE_RADIUS_MAX_PX;
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
reserveNoiseGrid(Math.ceil(2 * HALF_MAX + (LINES - 1) * LINE_SPACING_PX) + 4);


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
      const spHere = noise * functionalNorm(img, x, y, dx, dy, s0, h, n, gradientCoefficients(sc, track, n, 1, true), LINES, lineSpacing);
      j = nearestPeak(g, b, jLo, jHi, track, wantSign, Math.max(DETECT_Z * spHere, MIN_RELATIVE_GRADIENT * level), NEAREST_MIN_SHARE);
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
    const sp = noise * functionalNorm(img, x, y, dx, dy, s0, h, n, gradientCoefficients(sc, j, n, 1, true), LINES, lineSpacing);
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
    const noiseSd = h * noise * functionalNorm(img, x, y, dx, dy, s0, h, n, coef, LINES, lineSpacing);
    sigma = Math.hypot(noiseSd, PARABOLA_BIAS_PX / SCALES_PX[scale]!);
  }
  const half = edgeWindow(grad, jPeak, peak, sign, base, sigmaPeak, n);
  rawGradient(sign, base, n);
  if (scale === 0) {
    const c = refineByCentroid(half, sParabola, s0, n);
    if (!Number.isNaN(c)) {
      offset = c;
      const cn = centroidCoefficients(coef, rawGrad, s0, h, n, c, half, centroidMass, sign);
      sigma = Math.hypot(noise * functionalNorm(img, x, y, dx, dy, s0, h, n, cn, LINES, lineSpacing), CENTROID_BIAS_PX);
    }
  }
  const sigmaPx = Math.min(MAX_SIGMA_PX, Math.max(MIN_SIGMA_PX, sigma));
  const spreadHalf = Math.min(half, SPREAD_WINDOW_PX);
  const spreadPx = windowSpread(rawGrad, s0, h, n, offset, spreadHalf);
  let spreadSigmaPx = 0;
  if (spreadPx > 0 && noise > 0) {
    const sn = spreadCoefficients(coef, rawGrad, s0, h, n, offset, spreadHalf, spreadPx * spreadPx, sign);
    spreadSigmaPx = (noise * functionalNorm(img, x, y, dx, dy, s0, h, n, sn, LINES, lineSpacing)) / (2 * spreadPx);
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

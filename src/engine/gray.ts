import { MAX_FRAME_PX } from './constants';
import { InputError } from './errors';
import { inRange, integer } from './validate';

/*
 * The paused frame as luminance, for snapping: sampling it along lines and estimating its noise.
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

const LUMA_R = 0.2126;
const LUMA_G = 0.7152;
const LUMA_B = 0.0722;

/** Largest half-length of the segment whose noise noiseSigma estimates: its scratch is sized for it. */
export const NOISE_RADIUS_MAX_PX = 32;
const PATCH_SIDE = 2 * NOISE_RADIUS_MAX_PX + 14;
const patchAbs = new Float32Array(PATCH_SIDE * PATCH_SIDE);

export function checkGray(img: Gray): void {
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

export function pixelLuma(img: Gray, i: number, j: number): number {
  const d = img.data;
  if (img.channels === 1) return d[j * img.width + i]!;
  const k = (j * img.width + i) * 4;
  return LUMA_R * d[k]! + LUMA_G * d[k + 1]! + LUMA_B * d[k + 2]!;
}

/** Bilinear luminance at (x, y), pixel centres at integer + 0.5, clamped to the border. */
export function lumaAt(img: Gray, x: number, y: number): number {
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
 * Pixel noise sigma around the search segment (Immerkaer 1996, median form), never below the
 * rounding noise of integer data.
 */
export function noiseSigma(img: Gray, x: number, y: number, dx: number, dy: number, r: number): number {
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

function medianF32(a: Float32Array, m: number): number {
  const v = a.subarray(0, m).sort();
  const h = m >> 1;
  return m % 2 === 1 ? v[h]! : 0.5 * (v[h - 1]! + v[h]!);
}

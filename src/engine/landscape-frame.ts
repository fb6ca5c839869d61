import { checkGray, type Gray } from './gray';
import { integer } from './validate';

/*
 * A frame made ready for the landscape-motion fit: its luminance at a working scale (at most
 * `maxWidth` wide, an integer box reduction of the video) and a pyramid of 2x2 box reductions, each
 * level half the size of the one before, down to `minWidth`. The coarse levels let the fit catch
 * motions of tens of pixels (the near ground), the fine ones pin the turn to a fraction of a pixel.
 *
 * A pixel of a reduced level covers the video pixels it averages, so a level's coordinates map to
 * video pixels by x_video = x_level * scale (pixel i covers [i, i + 1) at every level).
 */

export interface LumaLevel {
  data: Float32Array;
  width: number;
  height: number;
  /** video pixels per pixel of this level */
  scale: number;
}

export interface LandscapeFrame {
  levels: LumaLevel[];
  videoWidth: number;
  videoHeight: number;
}

export interface PyramidOptions {
  /** widest working level, px (default 640: the turn is still a fraction of a pixel there) */
  maxWidth?: number;
  /** narrowest level, px (default 80) */
  minWidth?: number;
}

const LUMA_R = 0.2126;
const LUMA_G = 0.7152;
const LUMA_B = 0.0722;

export function landscapeFrame(img: Gray, opts: PyramidOptions = {}): LandscapeFrame {
  checkGray(img);
  const maxWidth = integer('maxWidth', opts.maxWidth ?? 640, 16, 20000);
  const minWidth = integer('minWidth', opts.minWidth ?? 80, 8, maxWidth);
  const k = Math.max(1, Math.ceil(img.width / maxWidth));
  const levels: LumaLevel[] = [smooth(reduceVideo(img, k))];
  for (;;) {
    const last = levels[levels.length - 1]!;
    if (last.width / 2 < minWidth || last.height < 16) break;
    levels.push(halve(last));
  }
  return { levels, videoWidth: img.width, videoHeight: img.height };
}

/** Luminance averaged over k x k video pixels (the trailing part that does not fill a box is left out). */
function reduceVideo(img: Gray, k: number): LumaLevel {
  const w = Math.floor(img.width / k);
  const h = Math.floor(img.height / k);
  const out = new Float32Array(w * h);
  const d = img.data;
  const W = img.width;
  const inv = 1 / (k * k);
  if (img.channels === 1) {
    for (let j = 0; j < h; j++) {
      for (let i = 0; i < w; i++) {
        let s = 0;
        for (let b = 0; b < k; b++) {
          const row = (j * k + b) * W + i * k;
          for (let a = 0; a < k; a++) s += d[row + a]!;
        }
        out[j * w + i] = s * inv;
      }
    }
  } else {
    for (let j = 0; j < h; j++) {
      for (let i = 0; i < w; i++) {
        let s = 0;
        for (let b = 0; b < k; b++) {
          let m = ((j * k + b) * W + i * k) * 4;
          for (let a = 0; a < k; a++, m += 4) s += LUMA_R * d[m]! + LUMA_G * d[m + 1]! + LUMA_B * d[m + 2]!;
        }
        out[j * w + i] = s * inv;
      }
    }
  }
  return { data: out, width: w, height: h, scale: k };
}

/**
 * A binomial blur (1 4 6 4 1) / 16 each way, sigma 1 px: the anti-aliasing steps of a straight edge
 * (and the blocks of a video codec) would otherwise look like corners that stand still while the
 * edge slides along itself.
 */
function smooth(lv: LumaLevel): LumaLevel {
  const { width: w, height: h, data: d } = lv;
  const tmp = new Float32Array(w * h);
  const out = new Float32Array(w * h);
  for (let j = 0; j < h; j++) {
    const o = j * w;
    for (let i = 0; i < w; i++) {
      const a = d[o + (i < 2 ? 0 : i - 2)]!;
      const b = d[o + (i < 1 ? 0 : i - 1)]!;
      const c = d[o + i]!;
      const e = d[o + (i + 1 < w ? i + 1 : w - 1)]!;
      const f = d[o + (i + 2 < w ? i + 2 : w - 1)]!;
      tmp[o + i] = (a + 4 * b + 6 * c + 4 * e + f) * 0.0625;
    }
  }
  for (let j = 0; j < h; j++) {
    const ja = (j < 2 ? 0 : j - 2) * w;
    const jb = (j < 1 ? 0 : j - 1) * w;
    const jc = j * w;
    const je = (j + 1 < h ? j + 1 : h - 1) * w;
    const jf = (j + 2 < h ? j + 2 : h - 1) * w;
    for (let i = 0; i < w; i++) {
      out[jc + i] = (tmp[ja + i]! + 4 * tmp[jb + i]! + 6 * tmp[jc + i]! + 4 * tmp[je + i]! + tmp[jf + i]!) * 0.0625;
    }
  }
  return { ...lv, data: out };
}

function halve(src: LumaLevel): LumaLevel {
  const w = src.width >> 1;
  const h = src.height >> 1;
  const out = new Float32Array(w * h);
  const d = src.data;
  const W = src.width;
  for (let j = 0; j < h; j++) {
    const r0 = 2 * j * W;
    const r1 = r0 + W;
    for (let i = 0; i < w; i++) {
      const a = 2 * i;
      out[j * w + i] = 0.25 * (d[r0 + a]! + d[r0 + a + 1]! + d[r1 + a]! + d[r1 + a + 1]!);
    }
  }
  return { data: out, width: w, height: h, scale: src.scale * 2 };
}

/** Bilinear luminance at (x, y) of a level, pixel centres at integer + 0.5; the caller keeps it inside. */
export function bilinearAt(lv: LumaLevel, x: number, y: number): number {
  const fx = x - 0.5;
  const fy = y - 0.5;
  const i = Math.floor(fx);
  const j = Math.floor(fy);
  const tx = fx - i;
  const ty = fy - j;
  const w = lv.width;
  const m = j * w + i;
  const d = lv.data;
  const top = d[m]! + tx * (d[m + 1]! - d[m]!);
  const bot = d[m + w]! + tx * (d[m + w + 1]! - d[m + w]!);
  return top + ty * (bot - top);
}

/** Contrast (luma) above which a ridge or trough one to three pixels wide counts as a thin line. */
const THIN_CONTRAST = 4;

/**
 * Pixels on or beside lines at most three pixels wide (lane paint far off, wires, field edges seen
 * edge-on). Their pixels hold a fraction of the line that the sampling grid, the rasteriser or the
 * encoder rounds differently in each frame: the brightness of a whole row of them changes between
 * frames with no motion at all, and along a long line that adds up to a pull on the turn. Edges of
 * wider things are kept.
 */
export function thinLineMask(lv: LumaLevel): Uint8Array {
  const { width: w, height: h, data: d } = lv;
  const out = new Uint8Array(w * h);
  for (let j = 2; j < h - 2; j++) {
    for (let i = 2; i < w - 2; i++) {
      const m = j * w + i;
      const v = d[m]!;
      if (ridgeAcross(v, d[m - w]!, d[m + w]!, d[m - 2 * w]!, d[m + 2 * w]!)) {
        out[m] = out[m - w] = out[m + w] = out[m - 2 * w] = out[m + 2 * w] = 1;
      }
      if (ridgeAcross(v, d[m - 1]!, d[m + 1]!, d[m - 2]!, d[m + 2]!)) {
        out[m] = out[m - 1] = out[m + 1] = out[m - 2] = out[m + 2] = 1;
      }
    }
  }
  return out;
}

/** v stands above (or below) both sides two pixels off, and is not on a slope one pixel off. */
function ridgeAcross(v: number, a1: number, b1: number, a2: number, b2: number): boolean {
  const up = Math.min(v - a2, v - b2);
  const down = Math.min(a2 - v, b2 - v);
  if (up > THIN_CONTRAST) return v >= a1 || v >= b1;
  if (down > THIN_CONTRAST) return v <= a1 || v <= b1;
  return false;
}

/**
 * Cubic convolution (Keys 1981, a = -0.5: Catmull-Rom) at (x, y) of a level: a moved pattern read
 * between pixels keeps its place far better than with bilinear weights, whose error follows the
 * sub-pixel phase (about 0.04 px RMS on a smooth pattern; the tests' analytic shift). The caller keeps
 * (x, y) at least two pixels inside.
 */
export function cubicAt(lv: LumaLevel, x: number, y: number): number {
  const fx = x - 0.5;
  const fy = y - 0.5;
  const i = Math.floor(fx);
  const j = Math.floor(fy);
  const tx = fx - i;
  const ty = fy - j;
  const w = lv.width;
  const d = lv.data;
  const ax0 = keys(1 + tx);
  const ax1 = keys(tx);
  const ax2 = keys(1 - tx);
  const ax3 = keys(2 - tx);
  let s = 0;
  for (let b = -1; b <= 2; b++) {
    const o = (j + b) * w + i;
    const row = ax0 * d[o - 1]! + ax1 * d[o]! + ax2 * d[o + 1]! + ax3 * d[o + 2]!;
    s += keys(b - ty < 0 ? ty - b : b - ty) * row;
  }
  return s;
}

function keys(t: number): number {
  if (t < 1) return (1.5 * t - 2.5) * t * t + 1;
  if (t < 2) return ((-0.5 * t + 2.5) * t - 4) * t + 2;
  return 0;
}

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

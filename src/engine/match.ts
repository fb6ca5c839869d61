import { pixelLuma, type Gray } from './gray';

/*
 * Template matching by normalised cross-correlation (NCC): where a small patch cut from one frame
 * lies in another. NCC is the textbook measure (zero-mean, unit-norm correlation, as in
 * Lewis 1995, "Fast normalized cross-correlation"): it ignores a change of brightness and contrast
 * between the frames, and its peak value says how alike the two are (1 = the same up to gain and
 * offset). The search is coarse to fine: the whole window at half resolution (2 x 2 means), then
 * whole pixels around the coarse best, then a parabola through the peak and its neighbours in x and
 * in y for the sub-pixel shift (common practice).
 *
 * Pixels outside the picture repeat the border (the clamping of gray.ts), so a window that runs off
 * the picture still reads, but a patch that matches only the repeated border scores low.
 */

export interface Template {
  /** Zero-mean, unit-norm luma, row by row. */
  data: Float32Array;
  w: number;
  h: number;
  /** The picture pixel of the patch's top-left cell. */
  left: number;
  top: number;
  /** The same at half resolution (2 x 2 means, w2 x h2), for the coarse pass. */
  half: Float32Array;
  w2: number;
  h2: number;
  /** Luma variance over the patch before normalising, grey levels squared. */
  variance: number;
}

export interface Match {
  /** Shift of the patch from where it was cut, px (sub-pixel). */
  dx: number;
  dy: number;
  /** NCC at the best whole-pixel shift, -1 to 1. */
  score: number;
  /** The best whole-pixel shift lies on the window's edge: the true peak may lie beyond. */
  atEdge: boolean;
}

/** Luma of the picture's w x h block at (left, top), border pixels repeated outside. */
export function cutBlock(img: Gray, left: number, top: number, w: number, h: number, out = new Float32Array(w * h)): Float32Array {
  const wm = img.width - 1;
  const hm = img.height - 1;
  for (let j = 0; j < h; j++) {
    const y = Math.min(hm, Math.max(0, top + j));
    for (let i = 0; i < w; i++) out[j * w + i] = pixelLuma(img, Math.min(wm, Math.max(0, left + i)), y);
  }
  return out;
}

/** Mean of each 2 x 2 block (the odd last row or column dropped). */
function halve(src: Float32Array, w: number, h: number): Float32Array {
  const w2 = w >> 1;
  const h2 = h >> 1;
  const out = new Float32Array(w2 * h2);
  for (let j = 0; j < h2; j++) {
    for (let i = 0; i < w2; i++) {
      const k = 2 * j * w + 2 * i;
      out[j * w2 + i] = 0.25 * (src[k]! + src[k + 1]! + src[k + w]! + src[k + w + 1]!);
    }
  }
  return out;
}

/** Zero mean, unit norm in place; the variance it had, or 0 when the patch is flat (nothing to match). */
function normalise(a: Float32Array): number {
  let s = 0;
  for (let k = 0; k < a.length; k++) s += a[k]!;
  const m = s / a.length;
  let q = 0;
  for (let k = 0; k < a.length; k++) {
    const v = a[k]! - m;
    a[k] = v;
    q += v * v;
  }
  // below a hundredth of a grey level per pixel there is no structure to follow
  if (!(q > 1e-4 * a.length)) return 0;
  const r = 1 / Math.sqrt(q);
  for (let k = 0; k < a.length; k++) a[k] = a[k]! * r;
  return q / a.length;
}

/** The w x h patch with its top-left cell at (left, top), or null when it has no structure. */
export function cutTemplate(img: Gray, left: number, top: number, w: number, h: number): Template | null {
  const raw = cutBlock(img, left, top, w, h);
  const half = halve(raw, w, h);
  const variance = normalise(raw);
  if (!variance || !normalise(half)) return null;
  return { data: raw, w, h, left, top, half, w2: w >> 1, h2: h >> 1, variance };
}

/** NCC of a normalised template against the region's block at (ox, oy) (region row width rw). */
function ncc(t: Float32Array, tw: number, th: number, reg: Float32Array, rw: number, ox: number, oy: number): number {
  let s = 0;
  let q = 0;
  let c = 0;
  for (let j = 0; j < th; j++) {
    const r0 = (oy + j) * rw + ox;
    const t0 = j * tw;
    for (let i = 0; i < tw; i++) {
      const v = reg[r0 + i]!;
      s += v;
      q += v * v;
      c += t[t0 + i]! * v;
    }
  }
  const n = tw * th;
  // the template sums to zero, so c is already the covariance; the region's norm needs its mean out
  const var_ = q - (s * s) / n;
  return var_ > 1e-6 * n ? c / Math.sqrt(var_) : 0;
}

/**
 * Where the template lies in img, searching whole-pixel shifts within radius of (px, py) (the
 * predicted shift from where the template was cut). Null when the template cannot be compared.
 */
export function matchTemplate(img: Gray, t: Template, px: number, py: number, radius: number): Match {
  const cx = Math.round(px);
  const cy = Math.round(py);
  const r = Math.max(1, Math.ceil(radius));
  // the region holds every shift in [-r-1, r+1] around the prediction (one more for the parabola)
  const m = r + 1;
  const rw = t.w + 2 * m;
  const rh = t.h + 2 * m;
  const reg = cutBlock(img, t.left + cx - m, t.top + cy - m, rw, rh);
  let bx = 0;
  let by = 0;
  if (r > 2 && t.w2 >= 3 && t.h2 >= 3) {
    // coarse: the region at half resolution, shifts of 2 px
    const reg2 = halve(reg, rw, rh);
    const rw2 = rw >> 1;
    const rh2 = rh >> 1;
    let best = -2;
    // the half-resolution block at (ox, oy) covers the full-resolution one at (2 ox, 2 oy): shift 2 ox - m
    for (let oy = 0; oy + t.h2 <= rh2; oy++) {
      for (let ox = 0; ox + t.w2 <= rw2; ox++) {
        const v = ncc(t.half, t.w2, t.h2, reg2, rw2, ox, oy);
        if (v > best) {
          best = v;
          bx = Math.max(-r, Math.min(r, 2 * ox - m));
          by = Math.max(-r, Math.min(r, 2 * oy - m));
        }
      }
    }
  }
  // fine: whole pixels around the coarse best (or the whole window when it is small)
  const span = r > 2 ? 2 : r;
  const score = new Map<number, number>();
  const at = (sx: number, sy: number): number => {
    const key = (sy + m) * (2 * m + 1) + (sx + m);
    let v = score.get(key);
    if (v === undefined) {
      v = ncc(t.data, t.w, t.h, reg, rw, m + sx, m + sy);
      score.set(key, v);
    }
    return v;
  };
  let best = -2;
  let fx = 0;
  let fy = 0;
  for (let sy = Math.max(-r, by - span); sy <= Math.min(r, by + span); sy++) {
    for (let sx = Math.max(-r, bx - span); sx <= Math.min(r, bx + span); sx++) {
      const v = at(sx, sy);
      if (v > best) {
        best = v;
        fx = sx;
        fy = sy;
      }
    }
  }
  const atEdge = Math.abs(fx) >= r || Math.abs(fy) >= r;
  const sub = (a: number, b: number, c: number): number => {
    const d = a - 2 * b + c;
    return d < 0 ? Math.max(-0.5, Math.min(0.5, (0.5 * (a - c)) / d)) : 0;
  };
  const ux = sub(at(fx - 1, fy), best, at(fx + 1, fy));
  const uy = sub(at(fx, fy - 1), best, at(fx, fy + 1));
  // a parabola through NCC values leans toward the whole pixel (up to 0.2 px at half-pixel shifts on
  // sharp edges): two Lucas-Kanade steps on the normalised patches take that out
  const [lx, ly] = lucasKanade(t, reg, rw, rh, m + fx + ux, m + fy + uy);
  return { dx: cx + lx - m, dy: cy + ly - m, score: best, atEdge };
}

/**
 * Sub-pixel position of the template in the region, from a start (ox, oy) within half a pixel of
 * it: inverse-compositional Lucas-Kanade (Baker & Matthews 2004) on the zero-mean, unit-norm
 * patches, the region resampled bilinearly at each step. A step that would leave the half pixel
 * around the start is refused and the start kept (the whole-pixel search already placed it).
 */
function lucasKanade(t: Template, reg: Float32Array, rw: number, rh: number, ox: number, oy: number): [number, number] {
  const { w, h, data } = t;
  // the template's gradient and the 2 x 2 Gauss-Newton matrix, interior cells only
  let hxx = 0;
  let hxy = 0;
  let hyy = 0;
  const gx = new Float32Array(w * h);
  const gy = new Float32Array(w * h);
  for (let j = 1; j < h - 1; j++) {
    for (let i = 1; i < w - 1; i++) {
      const k = j * w + i;
      const x = 0.5 * (data[k + 1]! - data[k - 1]!);
      const y = 0.5 * (data[k + w]! - data[k - w]!);
      gx[k] = x;
      gy[k] = y;
      hxx += x * x;
      hxy += x * y;
      hyy += y * y;
    }
  }
  const det = hxx * hyy - hxy * hxy;
  if (!(det > 1e-12)) return [ox, oy];
  const warped = new Float32Array(w * h);
  let px = ox;
  let py = oy;
  for (let it = 0; it < 2; it++) {
    const fx0 = Math.floor(px);
    const fy0 = Math.floor(py);
    const ax = px - fx0;
    const ay = py - fy0;
    if (fx0 < 0 || fy0 < 0 || fx0 + w >= rw || fy0 + h >= rh) break;
    let sum = 0;
    for (let j = 0; j < h; j++) {
      for (let i = 0; i < w; i++) {
        const r = (fy0 + j) * rw + fx0 + i;
        const v = (1 - ay) * ((1 - ax) * reg[r]! + ax * reg[r + 1]!) + ay * ((1 - ax) * reg[r + rw]! + ax * reg[r + rw + 1]!);
        warped[j * w + i] = v;
        sum += v;
      }
    }
    const mean = sum / (w * h);
    let q = 0;
    for (let k = 0; k < w * h; k++) {
      const v = warped[k]! - mean;
      warped[k] = v;
      q += v * v;
    }
    if (!(q > 0)) break;
    const norm = 1 / Math.sqrt(q);
    let bx = 0;
    let by = 0;
    for (let j = 1; j < h - 1; j++) {
      for (let i = 1; i < w - 1; i++) {
        const k = j * w + i;
        const e = warped[k]! * norm - data[k]!;
        bx += gx[k]! * e;
        by += gy[k]! * e;
      }
    }
    // the template moved by the step matches the region at the start less the step
    const sx = (hyy * bx - hxy * by) / det;
    const sy = (hxx * by - hxy * bx) / det;
    const nxp = px - sx;
    const nyp = py - sy;
    if (Math.abs(nxp - ox) > 0.75 || Math.abs(nyp - oy) > 0.75) return [ox, oy];
    px = nxp;
    py = nyp;
  }
  return [px, py];
}

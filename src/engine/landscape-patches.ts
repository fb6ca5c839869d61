import { bilinearAt, cubicAt, type LandscapeFrame, type LumaLevel } from './landscape-frame';

/*
 * Small patches of the landscape followed from one frame to the next: each patch is a window with
 * texture in two directions (a corner, a dash end, the top of a mast, a bump of a ridge), chosen one
 * per grid cell where the smaller eigenvalue of the gradients' structure tensor is largest (Shi and
 * Tomasi's "good features to track", common practice), and followed by a pyramidal Lucas-Kanade step
 * (inverse compositional, translation only). A straight edge or a thin line has texture in one
 * direction only and is never chosen: it would show only the motion across it, and a line thinner
 * than a pixel changes its brightness between frames without moving.
 *
 * Coordinates are those of the finest pyramid level (pixel i covers [i, i + 1)); a level l point is
 * the same point divided by 2^l.
 */

export interface PatchOptions {
  /** grid cell, px of the finest level (default 12) */
  cellPx?: number;
  /** window half-side, px (default 4: a 9 x 9 window) */
  radius?: number;
  /** smallest accepted mean of the tensor's smaller eigenvalue, (luma per px)^2 (default 1) */
  minEigen?: number;
  /** most patches kept, strongest first (default 500) */
  maxPatches?: number;
  /** finest-level rectangles left out */
  exclude?: { left: number; top: number; right: number; bottom: number }[];
}

/** Smaller over larger eigenvalue below which a window is a straight edge, not a corner. */
const MIN_EIGEN_RATIO = 0.1;

export interface Patches {
  n: number;
  x: Float64Array;
  y: Float64Array;
  strength: Float64Array;
}

export function selectPatches(lv: LumaLevel, opts: PatchOptions = {}): Patches {
  const cell = opts.cellPx ?? 12;
  const rad = opts.radius ?? 4;
  const minEig = opts.minEigen ?? 1;
  const maxN = opts.maxPatches ?? 500;
  const { width: w, height: h, data: d } = lv;
  const n = w * h;
  const sxx = new Float32Array(n);
  const sxy = new Float32Array(n);
  const syy = new Float32Array(n);
  for (let j = 1; j < h - 1; j++) {
    for (let i = 1; i < w - 1; i++) {
      const m = j * w + i;
      const gx = 0.5 * (d[m + 1]! - d[m - 1]!);
      const gy = 0.5 * (d[m + w]! - d[m - w]!);
      sxx[m] = gx * gx;
      sxy[m] = gx * gy;
      syy[m] = gy * gy;
    }
  }
  boxSum(sxx, w, h, rad);
  boxSum(sxy, w, h, rad);
  boxSum(syy, w, h, rad);
  const area = (2 * rad + 1) * (2 * rad + 1);
  const margin = rad + 2;
  const cand: { x: number; y: number; s: number }[] = [];
  for (let cj = margin; cj < h - margin; cj += cell) {
    for (let ci = margin; ci < w - margin; ci += cell) {
      let best = 0;
      let bi = -1;
      let bj = -1;
      for (let j = cj; j < Math.min(cj + cell, h - margin); j++) {
        for (let i = ci; i < Math.min(ci + cell, w - margin); i++) {
          const m = j * w + i;
          const a = sxx[m]!;
          const c = syy[m]!;
          const b = sxy[m]!;
          const root = Math.sqrt(0.25 * (a - c) * (a - c) + b * b);
          const e = 0.5 * (a + c) - root;
          // a straight edge or line (texture in one direction only; its anti-aliasing steps do not
          // make it a corner) is left out: it shows no motion along itself
          if (e < MIN_EIGEN_RATIO * (0.5 * (a + c) + root)) continue;
          if (e > best) {
            best = e;
            bi = i;
            bj = j;
          }
        }
      }
      if (bi < 0 || best < minEig * area) continue;
      const x = bi + 0.5;
      const y = bj + 0.5;
      if (opts.exclude?.some((r) => x >= r.left && x < r.right && y >= r.top && y < r.bottom)) continue;
      cand.push({ x, y, s: best / area });
    }
  }
  cand.sort((p, q) => q.s - p.s);
  const k = Math.min(maxN, cand.length);
  const out: Patches = { n: k, x: new Float64Array(k), y: new Float64Array(k), strength: new Float64Array(k) };
  for (let i = 0; i < k; i++) {
    out.x[i] = cand[i]!.x;
    out.y[i] = cand[i]!.y;
    out.strength[i] = cand[i]!.s;
  }
  return out;
}

/** In-place sum over a (2r + 1)^2 window (clamped at the borders), separable running sums. */
function boxSum(a: Float32Array, w: number, h: number, r: number): void {
  const line = new Float32Array(Math.max(w, h));
  for (let j = 0; j < h; j++) {
    const o = j * w;
    for (let i = 0; i < w; i++) line[i] = a[o + i]!;
    let s = 0;
    for (let i = 0; i <= Math.min(r, w - 1); i++) s += line[i]!;
    for (let i = 0; i < w; i++) {
      a[o + i] = s;
      if (i + r + 1 < w) s += line[i + r + 1]!;
      if (i - r >= 0) s -= line[i - r]!;
    }
  }
  for (let i = 0; i < w; i++) {
    for (let j = 0; j < h; j++) line[j] = a[j * w + i]!;
    let s = 0;
    for (let j = 0; j <= Math.min(r, h - 1); j++) s += line[j]!;
    for (let j = 0; j < h; j++) {
      a[j * w + i] = s;
      if (j + r + 1 < h) s += line[j + r + 1]!;
      if (j - r >= 0) s -= line[j - r]!;
    }
  }
}

export interface Tracks {
  /** where each patch's centre is found in frame B (finest level px); NaN when lost */
  xb: Float64Array;
  yb: Float64Array;
  /** RMS brightness difference over the window after the match, luma */
  rms: Float64Array;
}

export interface TrackOptions {
  radius?: number;
  /** coarsest level the search starts from (default: the frames' coarsest) */
  topLevel?: number;
  /** steps per level (default 8) */
  iterations?: number;
}

function inside(lv: LumaLevel, x: number, y: number, r: number): boolean {
  return x - r - 2 >= 0.5 && x + r + 2 < lv.width - 1.5 && y - r - 2 >= 0.5 && y + r + 2 < lv.height - 1.5;
}

/**
 * Follows each patch from frame A to frame B, starting from a guess of where it went (finest-level
 * px; the patch's own place when no guess) at the top level and refining down to the finest.
 */
export function trackPatches(a: LandscapeFrame, b: LandscapeFrame, p: Patches, gx: Float64Array, gy: Float64Array, opts: TrackOptions = {}): Tracks {
  const rad = opts.radius ?? 4;
  const top = Math.min(opts.topLevel ?? a.levels.length - 1, a.levels.length - 1);
  const iters = opts.iterations ?? 8;
  const side = 2 * rad + 1;
  const win = side * side;
  const T = new Float64Array(win);
  const GX = new Float64Array(win);
  const GY = new Float64Array(win);
  const out: Tracks = { xb: new Float64Array(p.n).fill(NaN), yb: new Float64Array(p.n).fill(NaN), rms: new Float64Array(p.n).fill(NaN) };
  for (let k = 0; k < p.n; k++) {
    let dx = gx[k]! - p.x[k]!;
    let dy = gy[k]! - p.y[k]!;
    let lost = false;
    let rms = NaN;
    for (let l = top; l >= 0 && !lost; l--) {
      const la = a.levels[l]!;
      const lb = b.levels[l]!;
      const sc = 1 / (1 << l);
      const cx = p.x[k]! * sc;
      const cy = p.y[k]! * sc;
      let ddx = dx * sc;
      let ddy = dy * sc;
      if (!inside(la, cx, cy, rad)) {
        if (l === 0) lost = true;
        continue;
      }
      let hxx = 0;
      let hxy = 0;
      let hyy = 0;
      let m = 0;
      for (let v = -rad; v <= rad; v++) {
        for (let u = -rad; u <= rad; u++, m++) {
          const x = cx + u;
          const y = cy + v;
          T[m] = bilinearAt(la, x, y);
          const gxv = 0.5 * (bilinearAt(la, x + 1, y) - bilinearAt(la, x - 1, y));
          const gyv = 0.5 * (bilinearAt(la, x, y + 1) - bilinearAt(la, x, y - 1));
          GX[m] = gxv;
          GY[m] = gyv;
          hxx += gxv * gxv;
          hxy += gxv * gyv;
          hyy += gyv * gyv;
        }
      }
      const det = hxx * hyy - hxy * hxy;
      if (!(det > 1e-9 * (hxx + hyy) * (hxx + hyy)) || !(det > 0)) {
        if (l === 0) lost = true;
        continue;
      }
      for (let it = 0; it < iters; it++) {
        if (!inside(lb, cx + ddx, cy + ddy, rad)) {
          lost = true;
          break;
        }
        let bx = 0;
        let by = 0;
        let e2 = 0;
        m = 0;
        for (let v = -rad; v <= rad; v++) {
          for (let u = -rad; u <= rad; u++, m++) {
            const r = cubicAt(lb, cx + u + ddx, cy + v + ddy) - T[m]!;
            bx += GX[m]! * r;
            by += GY[m]! * r;
            e2 += r * r;
          }
        }
        rms = Math.sqrt(e2 / win);
        const sx = (hyy * bx - hxy * by) / det;
        const sy = (hxx * by - hxy * bx) / det;
        ddx -= sx;
        ddy -= sy;
        if (sx * sx + sy * sy < 1e-4) break;
      }
      dx = ddx / sc;
      dy = ddy / sc;
    }
    if (lost || !Number.isFinite(dx) || !Number.isFinite(dy)) continue;
    out.xb[k] = p.x[k]! + dx;
    out.yb[k] = p.y[k]! + dy;
    out.rms[k] = rms;
  }
  return out;
}

import type { Gray } from '../../src/engine/snap';
import { Rng } from '../../src/engine/rng';

/*
 * Invented test pictures with exact truth: a small side-view aircraft silhouette (no real type is
 * modelled), drawn as one simple polygon and rendered with the exact area of each pixel that it
 * covers (a camera pixel integrates light over its area), then optionally blurred, made noisy and
 * rounded to whole levels. Its ends are the polygon's extreme x on the axis, known exactly.
 */

export type Pt = readonly [number, number];

/** Area of a simple polygon clipped to the pixel [i, i+1] x [j, j+1]: Sutherland-Hodgman against
 * the pixel's four sides (a convex window clips any simple polygon to the right area), then the
 * shoelace formula. */
export function pixelCoverage(poly: readonly Pt[], i: number, j: number): number {
  let pts: Pt[] = poly.slice();
  const planes: [number, number, number][] = [
    [1, 0, i], // x >= i
    [-1, 0, -(i + 1)], // x <= i + 1
    [0, 1, j],
    [0, -1, -(j + 1)],
  ];
  for (const [nx, ny, c] of planes) {
    const out: Pt[] = [];
    for (let k = 0; k < pts.length; k++) {
      const a = pts[k]!;
      const b = pts[(k + 1) % pts.length]!;
      const fa = nx * a[0] + ny * a[1] - c;
      const fb = nx * b[0] + ny * b[1] - c;
      if (fa >= 0) out.push(a);
      if (fa >= 0 !== fb >= 0) {
        const t = fa / (fa - fb);
        out.push([a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])]);
      }
    }
    pts = out;
    if (pts.length < 3) return 0;
  }
  let area = 0;
  for (let k = 0; k < pts.length; k++) {
    const a = pts[k]!;
    const b = pts[(k + 1) % pts.length]!;
    area += a[0] * b[1] - b[0] * a[1];
  }
  return Math.abs(area) / 2;
}

export interface SceneOptions {
  /** Picture size, px. */
  width: number;
  height: number;
  /** Sky and object luminance. */
  background?: number;
  object?: number;
  /** Gaussian blur sigma after the area sampling (lens and compression), px; 0 for none. */
  blur?: number;
  /** Pixel noise sigma, levels; 0 for none. */
  noise?: number;
  rng?: Rng;
  /** Round to whole levels, 0..255 (8-bit video). */
  round?: boolean;
}

/** Renders the polygons (one colour, disjoint) over a flat sky. */
export function renderPolygons(polys: readonly (readonly Pt[])[], o: SceneOptions): Gray {
  const { width: w, height: h } = o;
  const bg = o.background ?? 200;
  const fg = o.object ?? 60;
  let cov: Float64Array = new Float64Array(w * h);
  for (const poly of polys) {
    let x0 = Infinity;
    let x1 = -Infinity;
    let y0 = Infinity;
    let y1 = -Infinity;
    for (const [x, y] of poly) {
      x0 = Math.min(x0, x);
      x1 = Math.max(x1, x);
      y0 = Math.min(y0, y);
      y1 = Math.max(y1, y);
    }
    for (let j = Math.max(0, Math.floor(y0)); j < Math.min(h, Math.ceil(y1)); j++) {
      for (let i = Math.max(0, Math.floor(x0)); i < Math.min(w, Math.ceil(x1)); i++) cov[j * w + i]! += pixelCoverage(poly, i, j);
    }
  }
  if (o.blur && o.blur > 0) cov = gaussianBlur(cov, w, h, o.blur);
  const d = new Float32Array(w * h);
  for (let k = 0; k < w * h; k++) {
    let v = bg + (fg - bg) * cov[k]!;
    if (o.noise && o.rng) v += o.noise * o.rng.normal();
    if (o.round) v = Math.max(0, Math.min(255, Math.round(v)));
    d[k] = v;
  }
  return { data: d, width: w, height: h, channels: 1 };
}

/** Separable Gaussian blur on the pixel grid, borders repeated. */
function gaussianBlur(src: Float64Array, w: number, h: number, sigma: number): Float64Array {
  const half = Math.ceil(4 * sigma);
  const k = new Float64Array(2 * half + 1);
  let s = 0;
  for (let i = -half; i <= half; i++) s += k[i + half] = Math.exp(-0.5 * (i / sigma) ** 2);
  for (let i = 0; i < k.length; i++) k[i]! /= s;
  const tmp = new Float64Array(w * h);
  const out = new Float64Array(w * h);
  const cl = (v: number, n: number) => (v < 0 ? 0 : v >= n ? n - 1 : v);
  for (let j = 0; j < h; j++) {
    for (let i = 0; i < w; i++) {
      let a = 0;
      for (let q = -half; q <= half; q++) a += k[q + half]! * src[j * w + cl(i + q, w)]!;
      tmp[j * w + i] = a;
    }
  }
  for (let j = 0; j < h; j++) {
    for (let i = 0; i < w; i++) {
      let a = 0;
      for (let q = -half; q <= half; q++) a += k[q + half]! * tmp[cl(j + q, h) * w + i]!;
      out[j * w + i] = a;
    }
  }
  return out;
}

/** blunt: a flat face; pointed: a straight taper (a cone); rounded: an elliptical nose (width growing as a square root). */
export type EndShape = 'blunt' | 'pointed' | 'rounded';

export interface AircraftSpec {
  /** Nose tip x (the nose points toward -x), axis y and overall length, px. */
  x0: number;
  y: number;
  length: number;
  nose: EndShape;
  /** (the fin stands over the tail, so the tail is blunt or pointed) */
  tail: Exclude<EndShape, 'rounded'>;
  /** Fuselage height as a share of the length (invented proportions; 0.13 unless given). */
  body?: number;
  /** Length of the pointed nose's taper as a share of the length (0.16 unless given). */
  noseTaper?: number;
  /** Length of the pointed tail cone's taper as a share of the length (0.22 unless given). */
  tailTaper?: number;
}

/**
 * A side-view silhouette as one polygon, clockwise on screen (y down): the fuselage with a blunt,
 * pointed or rounded nose and tail, an engine nacelle hanging below with a blunt intake face 0.3 of the length
 * behind the nose (a strong vertical edge), and a fin above the tail whose trailing edge stands 0.1
 * of the length ahead of the tail end. The ends
 * are the nose tip at x0 and the tail tip at x0 + length, both on the axis: `ends` gives them.
 */
export function aircraftSide(s: AircraftSpec): { polygon: Pt[]; ends: [number, number] } {
  const L = s.length;
  const r = ((s.body ?? 0.13) * L) / 2;
  const X = (f: number) => s.x0 + f * L;
  const y = s.y;
  const top = y - r;
  const bot = y + r;
  const nt = s.noseTaper ?? 0.16;
  const tt = s.tailTaper ?? 0.22;
  const p: Pt[] = [];
  // the nose, from the axis over the top; its lower half is added at the end, from the bottom up
  const arc = (k: number) => (k * Math.PI) / 16;
  if (s.nose === 'pointed') p.push([X(0), y], [X(nt), top]);
  else if (s.nose === 'rounded') for (let k = 0; k <= 8; k++) p.push([X(nt * (1 - Math.cos(arc(k)))), y - r * Math.sin(arc(k))]);
  else p.push([X(0), y - 0.8 * r], [X(0.03), top]);
  // the fin: leading edge swept back, trailing edge ahead of the tail end
  const finTop = top - 0.2 * L;
  p.push([X(0.7), top], [X(0.84), finTop], [X(0.9), finTop], [X(0.9), top]);
  // the tail, over the top to the end and back along the bottom
  if (s.tail === 'pointed') p.push([X(1), y], [X(1 - tt), bot]);
  else p.push([X(0.97), top], [X(1), y - 0.8 * r], [X(1), y + 0.8 * r], [X(0.97), bot]);
  // the nacelle under the fuselage, intake face vertical
  const nacBot = bot + 0.09 * L;
  p.push([X(0.5), bot], [X(0.5), nacBot], [X(0.3), nacBot], [X(0.3), bot]);
  // back to the nose along the bottom
  if (s.nose === 'pointed') p.push([X(nt * 0.8), bot]);
  else if (s.nose === 'rounded') for (let k = 8; k >= 1; k--) p.push([X(nt * (1 - Math.cos(arc(k)))), y + r * Math.sin(arc(k))]);
  else p.push([X(0.03), bot], [X(0), y + 0.8 * r]);
  return { polygon: p, ends: [X(0), X(1)] };
}

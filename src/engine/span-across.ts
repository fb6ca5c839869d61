import { lumaAt, type Gray } from './gray';

/*
 * Centring a span's ends across its line: the snap (span-ends.ts) refines an end only along the
 * span, so an end placed a little to the side stays there. A follow that carried such an offset
 * from frame to frame would let it grow; this puts each end back on the middle of the object's
 * cross-section just inside the end.
 *
 * The cross-section is read as coverage: 0 where the picture has the background's level (read
 * beyond the end, as the snap reads it), 1 where it has the object's (the median along the span's
 * middle half). Its centroid across the line is the middle of the object there, whatever the blur,
 * for any cross-section symmetric about the span's line (an end edge centred on the axis, a
 * fuselage seen from the side): the first moment of a box-filtered or bilinearly sampled shape is
 * the shape's own (common practice in centroiding). Only the run of coverage that holds the line
 * counts, so a fin or a wing a few pixels off does not pull it.
 *
 * Where an end's own cross-section is not clean (a fin standing at a tail), the end goes onto the
 * object's axis instead: a straight line fitted through the middles of the clean cross-sections
 * along the span, those that stray from it dropped (a wing, an engine). Either move is believed only
 * up to MAX_ACROSS_PX: a follow's ends arrive within a hand's error of the axis, and a larger move
 * means the cross-section read is not the object's.
 */

/** How far inside the end the cross-section is read: a fiftieth of the span, at least 0.75 px. */
export function acrossDepthPx(spanPx: number): number {
  return Math.max(0.75, spanPx / 50);
}

/** Half-width of the cross-section read: a sixth of the span, 3 to 10 px (a silhouette's end edge 0.15 of it tall fits). */
function halfWidthPx(spanPx: number): number {
  return Math.min(10, Math.max(3, spanPx / 6));
}

const STEP = 0.25;
/** Least contrast between object and background to centre on, grey levels. */
const MIN_CONTRAST = 4;
/** Largest move across that is believed: more means the cross-section is not the object's. */
const MAX_ACROSS_PX = 0.75;

interface P {
  x: number;
  y: number;
}

/**
 * The ends a, b moved across the line a-b onto the middle of the object's cross-section just inside
 * each (an end stays where it is when the picture shows no clear cross-section there).
 */
export function centreAcross(img: Gray, a: P, b: P): [P, P] {
  const len = Math.hypot(b.x - a.x, b.y - a.y);
  if (!(len >= 4)) return [{ ...a }, { ...b }];
  const ux = (b.x - a.x) / len;
  const uy = (b.y - a.y) / len;
  const nx = -uy;
  const ny = ux;
  const object = medianAlong(img, a.x + 0.25 * (b.x - a.x), a.y + 0.25 * (b.y - a.y), a.x + 0.75 * (b.x - a.x), a.y + 0.75 * (b.y - a.y));
  const depth = acrossDepthPx(len);
  const half = halfWidthPx(len);
  const bgs = [a, b].map((e, k) => {
    const o = k === 0 ? -1 : 1;
    return medianAlong(img, e.x + 3 * o * ux, e.y + 3 * o * uy, e.x + 5 * o * ux, e.y + 5 * o * uy);
  });
  const at = (e: P, k: number, d: number) => {
    const o = k === 0 ? -1 : 1;
    return crossCentroid(img, e.x - d * o * ux, e.y - d * o * uy, nx, ny, half, object, bgs[k]!);
  };
  // the axis through the middles of clean cross-sections along the span, for an end without its own
  const axis = axisFit(img, a, b, nx, ny, half, object, 0.5 * (bgs[0]! + bgs[1]!));
  return [a, b].map((e, k) => {
    const off = at(e, k, depth) ?? (axis ? axis[k]! : null);
    return off === null ? { ...e } : { x: e.x + off * nx, y: e.y + off * ny };
  }) as [P, P];
}

/**
 * Middle of the object's cross-section through (x, y) across (nx, ny), px from the point, or null
 * when the picture shows no clear cross-section there.
 */
function crossCentroid(img: Gray, x: number, y: number, nx: number, ny: number, half: number, object: number, bg: number): number | null {
  const contrast = object - bg;
  if (!(Math.abs(contrast) >= MIN_CONTRAST)) return null;
  const n = 2 * Math.round(half / STEP) + 1;
  const mid = (n - 1) / 2;
  for (let i = 0; i < n; i++) {
    const t = (i - mid) * STEP;
    const v = (lumaAt(img, x + t * nx, y + t * ny) - bg) / contrast;
    cover[i] = v < 0 ? 0 : v > 1 ? 1 : v;
  }
  // the run of coverage that holds the line
  if (!(cover[mid]! > 0.05)) return null;
  let lo = mid;
  let hi = mid;
  while (lo > 0 && cover[lo - 1]! > 0.05) lo--;
  while (hi < n - 1 && cover[hi + 1]! > 0.05) hi++;
  // a run that fills the window is no cross-section (the point is inside something wide)
  if (lo === 0 || hi === n - 1) return null;
  let s = 0;
  let m = 0;
  for (let i = lo; i <= hi; i++) {
    s += cover[i]!;
    m += cover[i]! * (i - mid) * STEP;
  }
  const off = m / s;
  return Math.abs(off) <= MAX_ACROSS_PX ? off : null;
}
const cover = new Float64Array(2 * Math.round(10 / STEP) + 1);

/** Where along the span the axis is sampled (shares of it from end a). */
const AXIS_AT = Array.from({ length: 17 }, (_, k) => 0.1 + 0.05 * k);
/** Least clean cross-sections for an axis fit, and the largest residual kept, px. */
const AXIS_MIN = 6;
const AXIS_KEEP_PX = 0.25;

/**
 * The across offsets of the object's axis at ends a and b: a straight line fitted through the
 * middles of the clean cross-sections along the span (a wing, an engine or a fin makes its
 * cross-section wide or lopsided: such points are dropped when they stray from the first fit by
 * more than AXIS_KEEP_PX). Null when too few are clean.
 */
function axisFit(img: Gray, a: P, b: P, nx: number, ny: number, half: number, object: number, bg: number): [number, number] | null {
  const fs: number[] = [];
  const cs: number[] = [];
  for (const f of AXIS_AT) {
    const c = crossCentroid(img, a.x + f * (b.x - a.x), a.y + f * (b.y - a.y), nx, ny, half, object, bg);
    if (c !== null) {
      fs.push(f);
      cs.push(c);
    }
  }
  let keep = fs.map(() => true);
  let line: [number, number] | null = null;
  for (let round = 0; round < 3; round++) {
    line = fitLine(fs, cs, keep);
    if (!line) return null;
    const [p, q] = line;
    const next = fs.map((f, i) => Math.abs(cs[i]! - (p + q * f)) <= AXIS_KEEP_PX);
    if (next.every((v, i) => v === keep[i])) break;
    keep = next;
  }
  if (!line) return null;
  if (keep.filter(Boolean).length < AXIS_MIN) return null;
  return [line[0], line[0] + line[1]];
}

/** Least-squares line c = p + q f through the kept points, or null with fewer than AXIS_MIN. */
function fitLine(fs: number[], cs: number[], keep: boolean[]): [number, number] | null {
  let n = 0;
  let sf = 0;
  let sc = 0;
  let sff = 0;
  let sfc = 0;
  for (let i = 0; i < fs.length; i++) {
    if (!keep[i]) continue;
    n++;
    sf += fs[i]!;
    sc += cs[i]!;
    sff += fs[i]! * fs[i]!;
    sfc += fs[i]! * cs[i]!;
  }
  const d = n * sff - sf * sf;
  if (n < AXIS_MIN || !(d > 1e-9)) return null;
  const q = (n * sfc - sf * sc) / d;
  return [(sc - q * sf) / n, q];
}

/** Median luminance along a segment, one sample per 0.5 px. */
function medianAlong(img: Gray, x1: number, y1: number, x2: number, y2: number): number {
  const n = Math.max(2, Math.ceil(Math.hypot(x2 - x1, y2 - y1) / 0.5) + 1);
  const v = new Float64Array(n);
  for (let k = 0; k < n; k++) v[k] = lumaAt(img, x1 + ((x2 - x1) * k) / (n - 1), y1 + ((y2 - y1) * k) / (n - 1));
  v.sort();
  return n % 2 ? v[n >> 1]! : 0.5 * (v[(n >> 1) - 1]! + v[n >> 1]!);
}

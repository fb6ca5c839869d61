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
const MAX_ACROSS_PX = 1.5;

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
  const n = 2 * Math.round(half / STEP) + 1;
  const mid = (n - 1) / 2;
  const w = new Float64Array(n);
  return [a, b].map((e, k) => {
    const ox = k === 0 ? -ux : ux;
    const oy = k === 0 ? -uy : uy;
    const bg = medianAlong(img, e.x + 3 * ox, e.y + 3 * oy, e.x + 5 * ox, e.y + 5 * oy);
    const contrast = object - bg;
    if (!(Math.abs(contrast) >= MIN_CONTRAST)) return { ...e };
    const cx = e.x - depth * ox;
    const cy = e.y - depth * oy;
    for (let i = 0; i < n; i++) {
      const t = (i - mid) * STEP;
      const v = (lumaAt(img, cx + t * nx, cy + t * ny) - bg) / contrast;
      w[i] = v < 0 ? 0 : v > 1 ? 1 : v;
    }
    // the run of coverage that holds the line
    if (!(w[mid]! > 0.05)) return { ...e };
    let lo = mid;
    let hi = mid;
    while (lo > 0 && w[lo - 1]! > 0.05) lo--;
    while (hi < n - 1 && w[hi + 1]! > 0.05) hi++;
    // a run that fills the window is no cross-section (the end is inside something wide)
    if (lo === 0 || hi === n - 1) return { ...e };
    let s = 0;
    let m = 0;
    for (let i = lo; i <= hi; i++) {
      s += w[i]!;
      m += w[i]! * (i - mid) * STEP;
    }
    const off = m / s;
    if (!(Math.abs(off) <= MAX_ACROSS_PX)) return { ...e };
    return { x: e.x + off * nx, y: e.y + off * ny };
  }) as [P, P];
}

/** Median luminance along a segment, one sample per 0.5 px. */
function medianAlong(img: Gray, x1: number, y1: number, x2: number, y2: number): number {
  const n = Math.max(2, Math.ceil(Math.hypot(x2 - x1, y2 - y1) / 0.5) + 1);
  const v = new Float64Array(n);
  for (let k = 0; k < n; k++) v[k] = lumaAt(img, x1 + ((x2 - x1) * k) / (n - 1), y1 + ((y2 - y1) * k) / (n - 1));
  v.sort();
  return n % 2 ? v[n >> 1]! : 0.5 * (v[(n >> 1) - 1]! + v[n >> 1]!);
}

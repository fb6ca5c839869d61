import { spanHalfAngleTanUnchecked, spanLineConstants } from './camera';
import { MAX_RANGE_M } from './constants';
import { InputError } from './errors';
import { rangeUnchecked } from './range';
import type { Rng } from './rng';
import { band, finite, inRange, integer } from './validate';

/*
 * Monte Carlo propagation of every input range to every result. Each draw picks one value for
 * every uncertain input (size, aspect, field of view, observer speed: uniform over their bands;
 * each marked end: moved along its span by a normal error with the mark's edge uncertainty) and runs
 * the plain-number kernels. The edge uncertainty is where an edge lies along the span line (that is
 * how edges are snapped); a shift across the span changes the angle only to second order.
 * Columns are filled pass by pass (all draws of one input, then the next), so each pass is a small
 * loop whose kernels inline and whose doubles stay unboxed. Draw
 * columns are preallocated typed arrays, so a draw allocates nothing. Results are the median and
 * the 5-95 % interval; a draw in which a kernel rejects its inputs (e.g. a span that noise shrank
 * to nothing) is dropped, and the share of kept draws is reported.
 */

/** An input known only to lie between lo and hi (same units as its field). lo = hi is exact. */
export interface Band {
  lo: number;
  hi: number;
}

/** Two marked ends in camera-frame pixels (0,0 top-left of the camera frame) with their uncertainty. */
export interface SpanMark {
  x1: number;
  y1: number;
  x2: number;
  y2: number;
  /** Standard deviation of each end's position along the span, pixels. */
  edgeSigmaPx: number;
}

export type RegimeShares = { between: number; beyond: number; behind: number; none: number };

export interface SolveOptions {
  draws?: number;
  seed?: number;
  /**
   * The share cut from each end of every interval (default 0.05: the 5-95 % interval). A caller that
   * runs fewer draws than usual passes stats.ts cautiousTail(draws), which widens the ends by their
   * Monte Carlo uncertainty.
   */
  tail?: number;
}

const DEFAULT_DRAWS = 20_000;
/*
 * Loops write `Number.NaN`, never the global `NaN`: V8 (Node 20) loads the global as a tagged value,
 * and a ternary that merges it with a raw double makes every iteration box its double, 16 bytes a
 * draw. A module constant does not help once a bundler turns it into a `var`; `Number.NaN` is
 * read-only, so the optimiser folds it.
 */
const DEFAULT_SEED = 1;

/** Reusable column storage: solving the same size twice (a live readout) allocates nothing new. */
export class Columns {
  private store: Float64Array[] = [];
  get(k: number, n: number): Float64Array {
    let c = this.store[k];
    if (!c || c.length < n) {
      c = new Float64Array(n);
      this.store[k] = c;
    }
    return c;
  }
}
/*
 * The passes. Each is a function of its own with nothing after its loop: V8 compiles a long loop on
 * the fly during the first solve, and a compiled loop followed by code that has never run bailed out
 * on every later solve (see stats.ts). Inputs were validated once up front, so each draw runs the unchecked arithmetic
 * (camera.ts, range.ts) and turns a degenerate draw into NaN, which summarize drops.
 */

export function fillUniform(rng: Rng, b: Band, out: Float64Array, n: number): void {
  if (b.lo === b.hi) out.fill(b.lo, 0, n);
  else rng.fillBetween(out, n, b.lo, b.hi);
}

export function fillTanHalf(rng: Rng, hfov: Band, out: Float64Array, n: number): void {
  fillUniform(rng, hfov, out, n);
  for (let i = 0; i < n; i++) out[i] = Math.tan(out[i]! / 2);
}

/**
 * tan(theta/2) of the angle subtended by a span whose ends each have an independent N(0, sigma) error
 * along the span. Only their difference changes the length, so one normal with sd sqrt(2) sigma is
 * split between the two ends; the dropped common shift of the whole span moves its angle only through
 * the off-centre factor, parts in ten thousand per pixel. Columns hold the half-angle tangent, not
 * the angle: range needs only that.
 */
export function fillHalfTans(rng: Rng, s: SpanMark, W: number, H: number, tanHalf: Float64Array, out: Float64Array, n: number): void {
  spanLineConstants(s.x1, s.y1, s.x2, s.y2, W, H, lineConstants);
  const len = lineConstants[0]!;
  const c0 = lineConstants[1]!;
  const q0 = lineConstants[2]!;
  // normals first, geometry second: two simple loops pipeline better than one mixed loop
  rng.fillNormal(out, n, Math.SQRT2 * s.edgeSigmaPx);
  for (let i = 0; i < n; i++) {
    const h = spanHalfAngleTanUnchecked(len, c0, q0, out[i]!, (2 * tanHalf[i]!) / W);
    out[i] = h > 0 ? h : Number.NaN;
  }
}

const lineConstants = new Float64Array(3);

export function fillSinAspect(rng: Rng, aspect: Band, out: Float64Array, n: number): void {
  if (aspect.lo === aspect.hi) out.fill(Math.sin(aspect.lo), 0, n);
  else {
    rng.fillBetween(out, n, aspect.lo, aspect.hi);
    for (let i = 0; i < n; i++) out[i] = Math.sin(out[i]!);
  }
}

/** Range per draw from tan(theta/2), size and sin(aspect); NaN where the angle is NaN or the range out of bounds. */
export function fillRanges(size: Float64Array, sinA: Float64Array, halfTan: Float64Array, out: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) {
    const r = rangeUnchecked(size[i]!, halfTan[i]!, sinA[i]!);
    out[i] = r > 0 && r <= MAX_RANGE_M ? r : Number.NaN;
  }
}

export type Tuple<N extends number, T extends unknown[] = []> = T['length'] extends N ? T : Tuple<N, [...T, Float64Array]>;

export function checkOptions(o: SolveOptions, defaultDraws = DEFAULT_DRAWS): { draws: number; seed: number; tail: number } {
  const draws = o.draws ?? defaultDraws;
  const seed = o.seed ?? DEFAULT_SEED;
  const tail = o.tail ?? 0.05;
  integer('draws', draws, 100, 1_000_000);
  integer('seed', seed, 0, 0xffffffff);
  inRange('interval tail', tail, 0.001, 0.05);
  return { draws, seed, tail };
}

export function checkHfov(b: Band): void {
  const deg = 180 / Math.PI;
  if (!b) throw new InputError('horizontal field of view', b, 'a band of degrees between 0 and 180');
  // checked in degrees, because that is what the user typed
  band('horizontal field of view', b.lo * deg, b.hi * deg, 1e-6, 179.999, ' deg');
}

export function checkAspect(field: string, b: Band): void {
  const deg = 180 / Math.PI;
  if (!b) throw new InputError(field, b, 'a band of degrees, more than 0 and less than 180');
  band(field, b.lo * deg, b.hi * deg, 1e-6, 179.999, ' deg');
}

export function checkSpan(field: string, s: SpanMark, W: number, H: number): void {
  if (!s) throw new InputError(field, s, 'two marked ends');
  // one pixel of slack: an end marked on the frame's edge may sit just past it after sub-pixel snapping
  inRange(`${field}: first end x`, s.x1, -1, W + 1, ' px');
  inRange(`${field}: first end y`, s.y1, -1, H + 1, ' px');
  inRange(`${field}: second end x`, s.x2, -1, W + 1, ' px');
  inRange(`${field}: second end y`, s.y2, -1, H + 1, ' px');
  inRange(`${field}: edge uncertainty`, s.edgeSigmaPx, 0, 50, ' px');
  const len = Math.hypot(finite(`${field}`, s.x2 - s.x1), s.y2 - s.y1);
  if (len < 0.5) throw new InputError(`${field} length`, len, 'at least 0.5 px between the two ends');
}

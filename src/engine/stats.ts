import { UndeterminedError } from './errors';

/** A figure with its 5-95 % interval. No figure leaves the engine without one. */
export interface Estimate {
  median: number;
  p05: number;
  p95: number;
}

/**
 * The median and 5 % / 95 % quantiles of the first n values (type 7, see quantileInPlace), exact.
 * Non-finite draws are dropped first, so that one degenerate draw cannot poison a result; `values`
 * is reordered in place. For large inputs, a counting pass into bins finds which bins hold the
 * wanted order statistics, and exact selection then runs only inside those few bins: far fewer
 * unpredictable branches than quickselect over all 20 000 draws.
 */
export function summarize(values: Float64Array, n = values.length, tail = 0.05): Estimate {
  const m = compactFinite(values, n);
  const min = extremes[0]!;
  const max = extremes[1]!;
  if (m === 0) throw new UndeterminedError('estimate', 'no draw gave a finite value');
  if (min === max) return { p05: min, median: min, p95: min };
  // a widened interval (cautiousTail): plain selection at its own ends
  if (tail !== 0.05) return selectedQuantiles(values, m, tail);
  // small inputs, and spreads too wide for a finite bin width, take plain selection
  if (m < 512 || !Number.isFinite(max - min)) {
    return {
      p05: quantileInPlace(values, m, 0.05),
      median: quantileInPlace(values, m, 0.5),
      p95: quantileInPlace(values, m, 0.95),
    };
  }
  return binnedQuantiles(values, m, min, max);
}

/**
 * Type 7 quantiles at tail, 1/2 and 1 - tail of a[0..m), by selection rather than a sort: the same
 * order statistics in the same arithmetic, so the same numbers, in linear time. A pass at the mark
 * limit summarizes tens of thousands of columns this way, and sorting each took a quarter of
 * `npm run solve` on it. The upper end's rank is counted from the top, the lower end's mirror: a
 * tail putting the lower end exactly on a draw (cautiousTail) then puts the upper end exactly on its
 * mirror, not a rounding short.
 */
function selectedQuantiles(a: Float64Array, m: number, tail: number): Estimate {
  const last = m - 1;
  let from = 0;
  const at = (h: number) => {
    const lo = Math.floor(h);
    const vLo = select(a, from, last, lo);
    // after select(lo), the smallest of a[lo+1..m) is the next order statistic
    let vHi = vLo;
    if (lo < last) {
      vHi = a[lo + 1]!;
      for (let i = lo + 2; i <= last; i++) if (a[i]! < vHi) vHi = a[i]!;
    }
    from = lo;
    return vLo + (h - lo) * (vHi - vLo);
  };
  const p05 = at(last * tail);
  const median = at(last * 0.5);
  return { p05, median, p95: at(last - last * tail) };
}

/*
 * Hot loops live in small functions of their own whose code after the loop is a bare return. V8
 * (Node 20) compiles a long first loop on the fly (on-stack replacement) before the code after it
 * has ever run, keeps that compiled loop, and then bails out of it at the code after the loop on
 * every later call: measured at a third of the bootstrap's time in some processes.
 */
const extremes = new Float64Array(2);

/**
 * Moves the finite values among the first n to the front, their min and max to `extremes`; returns
 * their count. The extremes are kept in `extremes` during the loop, not written after it: stores
 * after the loop had no type feedback in the code compiled on the fly, which then bailed out there
 * on every later call (a thousand times in one benchmark run).
 */
function compactFinite(values: Float64Array, n: number): number {
  const ext = extremes;
  ext[0] = Number.POSITIVE_INFINITY;
  ext[1] = Number.NEGATIVE_INFINITY;
  let m = 0;
  for (let i = 0; i < n; i++) {
    const v = values[i]!;
    if (v - v === 0) {
      // finite: Infinity - Infinity and NaN - NaN are NaN
      values[m++] = v;
      if (v < ext[0]!) ext[0] = v;
      if (v > ext[1]!) ext[1] = v;
    }
  }
  return m;
}

const BINS = 1024;
const binCount = new Int32Array(BINS + 1);
const binStart = new Int32Array(BINS + 2);
const binBase = new Int32Array(BINS + 1);
const binFill = new Int32Array(BINS + 1);
const binWanted = new Int8Array(BINS + 1);
const need = new Int32Array(6);
let scratch = new Float64Array(0);
const QS = [0.05, 0.5, 0.95] as const;

function binnedQuantiles(a: Float64Array, m: number, min: number, max: number): Estimate {
  const scale = BINS / (max - min);
  countBins(a, m, min, scale);
  // order statistics needed: floor(h) and floor(h) + 1 for each quantile
  for (let j = 0; j < 3; j++) {
    const lo = Math.floor((m - 1) * QS[j]!);
    need[2 * j] = lo;
    need[2 * j + 1] = Math.min(lo + 1, m - 1);
  }
  // mark the bins that hold them, then gather exactly those values (one pass)
  const wanted = binWanted;
  const base = binBase;
  const fill = binFill;
  wanted.fill(0);
  fill.fill(0);
  for (let j = 0; j < 6; j++) wanted[binOf(need[j]!)] = 1;
  let off = 0;
  for (let b = 0; b <= BINS; b++) {
    if (wanted[b]) {
      base[b] = off;
      off += binCount[b]!;
    }
  }
  // grow geometrically, so that columns of similar shape stop reallocating after the first
  if (scratch.length < off) scratch = new Float64Array(Math.max(off, 2 * scratch.length, 1024));
  gatherWanted(a, m, min, scale);
  for (let j = 0; j < 3; j++) {
    const h = (m - 1) * QS[j]!;
    const lo = need[2 * j]!;
    const vLo = orderStat(lo);
    qOut[j] = h === lo ? vLo : vLo + (h - lo) * (orderStat(need[2 * j + 1]!) - vLo);
  }
  return { p05: qOut[0]!, median: qOut[1]!, p95: qOut[2]! };
}

const qOut = new Float64Array(3);

/** Counts the values per bin into binCount, and their running totals into binStart. */
function countBins(a: Float64Array, m: number, min: number, scale: number): void {
  binCount.fill(0);
  // v = max lands exactly on BINS (the extra last bin), never past it
  for (let i = 0; i < m; i++) binCount[((a[i]! - min) * scale) | 0]!++;
  let acc = 0;
  for (let b = 0; b <= BINS; b++) {
    binStart[b] = acc;
    acc += binCount[b]!;
  }
  binStart[BINS + 1] = acc;
}

/** Copies the values of the wanted bins into scratch, bin by bin. */
function gatherWanted(a: Float64Array, m: number, min: number, scale: number): void {
  const wanted = binWanted;
  const base = binBase;
  const fill = binFill;
  const out = scratch;
  for (let i = 0; i < m; i++) {
    const v = a[i]!;
    const b = ((v - min) * scale) | 0;
    if (wanted[b]) out[base[b]! + fill[b]!++] = v;
  }
}

/** Order statistic k of the gathered values (see binnedQuantiles). */
function orderStat(k: number): number {
  const b = binOf(k);
  return select(scratch, binBase[b]!, binBase[b]! + binCount[b]! - 1, binBase[b]! + (k - binStart[b]!));
}

/** The bin holding order statistic k (binary search over the cumulative counts). */
function binOf(k: number): number {
  let lo = 0;
  let hi = BINS;
  while (lo < hi) {
    const mid = (lo + hi + 1) >>> 1;
    if (binStart[mid]! <= k) lo = mid;
    else hi = mid - 1;
  }
  return lo;
}

/** Share of finite draws among the first n (how often a quantity existed at all). */
export function finiteShare(values: Float64Array, n = values.length): number {
  return n === 0 ? 0 : countFinite(values, n) / n;
}

function countFinite(values: Float64Array, n: number): number {
  let m = 0;
  for (let i = 0; i < n; i++) if (Number.isFinite(values[i]!)) m++;
  return m;
}

/**
 * Quantile with linear interpolation between order statistics (the common "type 7" definition,
 * as in R's default and numpy's 'linear'), computed by quickselect on a[0..n).
 */
export function quantileInPlace(a: Float64Array, n: number, q: number): number {
  return quantileIn(a, 0, n, n, q);
}

/**
 * Type-7 quantile q of all n values, searching only a[from..to), which the caller guarantees holds
 * the order statistics needed (everything before `from` is no larger, everything from `to` on no
 * smaller, as a previous selection leaves it).
 */
function quantileIn(a: Float64Array, from: number, to: number, n: number, q: number): number {
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const vLo = select(a, from, to - 1, lo);
  if (lo + 1 >= n || h === lo) return vLo;
  // after select(lo), the smallest value of a[lo+1..to) is the next order statistic (or a[to] if empty)
  let vHi = to < n ? a[to]! : Number.POSITIVE_INFINITY;
  for (let i = lo + 1; i < to; i++) if (a[i]! < vHi) vHi = a[i]!;
  return vLo + (h - lo) * (vHi - vLo);
}

/** Hoare-style quickselect on a[left..right]: places the k-th smallest at a[k], smaller before, larger after. */
function select(a: Float64Array, left: number, right: number, k: number): number {
  while (right > left) {
    const mid = (left + right) >>> 1;
    // median of three as pivot keeps sorted input from going quadratic
    const x = a[left]!;
    const y = a[mid]!;
    const z = a[right]!;
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let i = left;
    let j = right;
    while (i <= j) {
      while (a[i]! < pivot) i++;
      while (a[j]! > pivot) j--;
      if (i <= j) {
        const t = a[i]!;
        a[i] = a[j]!;
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) right = j;
    else if (k >= i) left = i;
    else break;
  }
  return a[k]!;
}

/* ---- summaries over a pass's draws (pass-series.ts) ---- */

/** The summary of the finite values among `a` (a copy is summarized), or null when none is finite. */
export function summarizeOrNull(a: Float64Array, tail = 0.05): Estimate | null {
  const copy = Float64Array.from(a);
  let finite = 0;
  for (let i = 0; i < copy.length; i++) if (Number.isFinite(copy[i]!)) finite++;
  return finite > 0 ? summarize(copy, copy.length, tail) : null;
}

/**
 * The tail to cut from each end of an interval estimated from `draws` Monte Carlo draws so that it
 * still holds the central 90 % of what the inputs give, cautiously: each end reaches at least as far
 * out as the true 5 % (95 %) point with probability at least 95 %, whatever the distribution. The
 * k-th smallest of N draws lies at or below the true 5 % point exactly when k or more draws fall
 * below it, so with probability P(Binomial(N, 0.05) >= k) (the distribution-free confidence bound
 * for a quantile from order statistics, as in Conover's or Hahn & Meeker's texts). The tail returned
 * puts the lower end exactly on the largest such k (type 7 rank 1 + (N - 1) tail = k: no
 * interpolation toward the next draw in, which would lose the guarantee), and the upper end on its
 * mirror. It replaces the normal approximation 0.05 - 1.645 sqrt(0.05 x 0.95 / N), which ignored the
 * binomial's skew and the interpolation and fell short: 93.5 % at 300 draws (test/engine/stats-tail.test.ts).
 * Below 59 draws not even the smallest draw is far enough out; the tail is then 0 (the extremes).
 */
export function cautiousTail(draws: number): number {
  const n = Math.floor(draws);
  if (n < 2) return 0;
  // P(B <= j) summed term by term in logs (the first terms underflow harmlessly at 20 000 draws)
  const lp = Math.log(0.05);
  const lq = Math.log1p(-0.05);
  let logC = 0;
  let cum = 0;
  let j = 0;
  for (; j <= n; j++) {
    cum += Math.exp(logC + j * lp + (n - j) * lq);
    if (cum > 0.05) break;
    logC += Math.log(n - j) - Math.log(j + 1);
  }
  // j is the first count with P(B <= j) > 0.05: the largest k with P(B >= k) >= 0.95 is k = j
  // a hair inside rank j - 1, so that (n - 1) tail rounds below it and never toward the next draw in
  return j === 0 ? 0 : (j - 1 - 1e-9) / (n - 1);
}

/** Headings are angles: moved into the half-turn either side of the draws' circular mean, so an interval through 180 degrees stays whole. */
export function unwrapAround(h: Float64Array): Float64Array {
  let sx = 0;
  let sy = 0;
  for (const v of h) {
    if (v === v) {
      sx += Math.cos(v);
      sy += Math.sin(v);
    }
  }
  const ref = Math.atan2(sy, sx);
  for (let i = 0; i < h.length; i++) {
    const v = h[i]!;
    if (v !== v) continue;
    let d = v - ref;
    while (d > Math.PI) d -= 2 * Math.PI;
    while (d <= -Math.PI) d += 2 * Math.PI;
    h[i] = ref + d;
  }
  return h;
}

/** The share of finite values below x, or null when none is finite. */
export function shareBelow(a: Float64Array, x: number): number | null {
  let finite = 0;
  let below = 0;
  for (const v of a) {
    if (!Number.isFinite(v)) continue;
    finite++;
    if (v < x) below++;
  }
  return finite > 0 ? below / finite : null;
}

/** How often the motionless point lies between, beyond, behind, or nowhere, from each draw's fraction. */
export function regimeShares(fr: Float64Array): { between: number; beyond: number; behind: number; none: number } {
  let between = 0;
  let beyond = 0;
  let behind = 0;
  let none = 0;
  for (const f of fr) {
    if (!Number.isFinite(f)) none++;
    else if (f < 0) behind++;
    else if (f > 1) beyond++;
    else between++;
  }
  const total = fr.length || 1;
  return { between: between / total, beyond: beyond / total, behind: behind / total, none: none / total };
}

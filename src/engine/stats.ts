import { UndeterminedError } from './errors';

/** A figure with its 5-95 % interval. No figure leaves the engine without one. */
export interface Estimate {
  median: number;
  p05: number;
  p95: number;
}

/**
 * The median and 5 % / 95 % quantiles of the first n values, by selection rather than a full sort
 * (O(n), which matters at 20 000 draws). Reorders `values` in place; non-finite draws are dropped
 * first so that one degenerate draw cannot poison a result. After the median is selected, each tail
 * quantile is searched only on its own side of it, which roughly halves the work.
 */
export function summarize(values: Float64Array, n = values.length): Estimate {
  let m = 0;
  for (let i = 0; i < n; i++) {
    const v = values[i]!;
    if (v - v === 0) values[m++] = v; // finite: Infinity - Infinity and NaN - NaN are NaN
  }
  if (m === 0) throw new UndeterminedError('estimate', 'no draw gave a finite value');
  const median = quantileIn(values, 0, m, m, 0.5);
  const mid = Math.floor((m - 1) * 0.5);
  return {
    p05: quantileIn(values, 0, mid + 1, m, 0.05),
    median,
    p95: quantileIn(values, mid, m, m, 0.95),
  };
}

/** Share of finite draws among the first n (how often a quantity existed at all). */
export function finiteShare(values: Float64Array, n = values.length): number {
  let m = 0;
  for (let i = 0; i < n; i++) if (Number.isFinite(values[i]!)) m++;
  return n === 0 ? 0 : m / n;
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
  let vHi = to < n ? a[to]! : Infinity;
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

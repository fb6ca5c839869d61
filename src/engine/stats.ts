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
 * first so that one degenerate draw cannot poison a result.
 */
export function summarize(values: Float64Array, n = values.length): Estimate {
  let m = 0;
  for (let i = 0; i < n; i++) {
    const v = values[i]!;
    if (Number.isFinite(v)) values[m++] = v;
  }
  if (m === 0) throw new UndeterminedError('estimate', 'no draw gave a finite value');
  return {
    p05: quantileInPlace(values, m, 0.05),
    median: quantileInPlace(values, m, 0.5),
    p95: quantileInPlace(values, m, 0.95),
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
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const vLo = select(a, n, lo);
  if (lo + 1 >= n || h === lo) return vLo;
  // after select(lo), the smallest value of a[lo+1..n) is the next order statistic
  let vHi = Infinity;
  for (let i = lo + 1; i < n; i++) if (a[i]! < vHi) vHi = a[i]!;
  return vLo + (h - lo) * (vHi - vLo);
}

/** Hoare-style quickselect: places the k-th smallest at a[k], smaller before, larger after. */
function select(a: Float64Array, n: number, k: number): number {
  let left = 0;
  let right = n - 1;
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

/*
 * Peaks and medians over sampled profiles, for snapping (snap.ts): pure functions over typed arrays,
 * allocation-free, as snapping runs on every drag end.
 */

/** Whether sample j is a strict local maximum of |g - base| of the wanted sign (0: either). */
export function isPeak(g: Float64Array, base: number, j: number, sign: number): boolean {
  const v = g[j]! - base;
  const a = Math.abs(v);
  return a > 0 && (sign === 0 || sign * v > 0) && a >= Math.abs(g[j - 1]! - base) && a > Math.abs(g[j + 1]! - base);
}

/** Index of the largest strict local maximum of |g - base| in [jLo, jHi] (of the sign, if one), or -1. */
export function largestPeak(g: Float64Array, base: number, jLo: number, jHi: number, sign: number): number {
  let best = -1;
  let peak = 0;
  for (let j = jLo; j <= jHi; j++) {
    const a = Math.abs(g[j]! - base);
    if (a > peak && isPeak(g, base, j, sign)) {
      peak = a;
      best = j;
    }
  }
  return best;
}

/**
 * Index of the local maximum of |g - base| in [jLo, jHi] nearest jRef that reaches the threshold
 * and minShare of the largest there (of the sign, if one), or -1.
 */
export function nearestPeak(g: Float64Array, base: number, jLo: number, jHi: number, jRef: number, sign: number, threshold: number, minShare: number): number {
  const top = largestPeak(g, base, jLo, jHi, sign);
  if (top < 0) return -1;
  const need = Math.max(threshold, minShare * Math.abs(g[top]! - base));
  let best = -1;
  for (let j = jLo; j <= jHi; j++) {
    if (Math.abs(g[j]! - base) >= need && isPeak(g, base, j, sign) && (best < 0 || Math.abs(j - jRef) < Math.abs(best - jRef))) best = j;
  }
  return best;
}

export function clampIndex(j: number, n: number): number {
  return j < 0 ? 0 : j >= n ? n - 1 : j;
}

/** Median of a[0..m), sorting that part in place. */
export function medianInPlace(a: Float64Array, m: number): number {
  const v = a.subarray(0, m).sort();
  const h = m >> 1;
  return m % 2 === 1 ? v[h]! : 0.5 * (v[h - 1]! + v[h]!);
}

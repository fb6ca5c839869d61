/*
 * Cholesky solve and inverse of small symmetric positive-definite matrices (normal equations of a
 * least-squares step), row-major in a Float64Array. They return false / null when the matrix is not
 * positive definite, which a fit reports as "not determined" instead of dividing by zero.
 */

function cholesky(a: Float64Array, n: number, L: Float64Array): boolean {
  L.fill(0);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[i * n + j]!;
      for (let k = 0; k < j; k++) s -= L[i * n + k]! * L[j * n + k]!;
      if (i === j) {
        if (!(s > 0)) return false;
        L[i * n + i] = Math.sqrt(s);
      } else {
        L[i * n + j] = s / L[j * n + j]!;
      }
    }
  }
  return true;
}

function substitute(L: Float64Array, n: number, b: ArrayLike<number>, x: Float64Array): void {
  for (let i = 0; i < n; i++) {
    let s = b[i]!;
    for (let k = 0; k < i; k++) s -= L[i * n + k]! * x[k]!;
    x[i] = s / L[i * n + i]!;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = x[i]!;
    for (let k = i + 1; k < n; k++) s -= L[k * n + i]! * x[k]!;
    x[i] = s / L[i * n + i]!;
  }
}

/** x = A^-1 b for symmetric positive-definite A (n x n); false when A is not. */
export function solveSymmetric(a: Float64Array, b: ArrayLike<number>, n: number, x: Float64Array): boolean {
  const L = new Float64Array(n * n);
  if (!cholesky(a, n, L)) return false;
  substitute(L, n, b, x);
  return true;
}

/** A^-1 for symmetric positive-definite A; null when A is not. */
export function invertSymmetric(a: Float64Array, n: number): Float64Array | null {
  const L = new Float64Array(n * n);
  if (!cholesky(a, n, L)) return null;
  const out = new Float64Array(n * n);
  const e = new Float64Array(n);
  const col = new Float64Array(n);
  for (let c = 0; c < n; c++) {
    e.fill(0);
    e[c] = 1;
    substitute(L, n, e, col);
    for (let r = 0; r < n; r++) out[r * n + c] = col[r]!;
  }
  return out;
}

/**
 * The sandwich covariance H^-1 (sum over groups of score score^T) H^-1, n parameters, the scores of
 * nb groups row after row: pixels within a group are not independent, groups are.
 */
export function sandwich(H: Float64Array, score: Float64Array, nb: number, n: number): Float64Array | null {
  const inv = invertSymmetric(H, n);
  if (!inv) return null;
  const meat = new Float64Array(n * n);
  for (let b = 0; b < nb; b++) {
    const o = b * n;
    for (let r = 0; r < n; r++) {
      const sr = score[o + r]!;
      if (sr === 0) continue;
      for (let c = 0; c < n; c++) meat[r * n + c] = meat[r * n + c]! + sr * score[o + c]!;
    }
  }
  const tmp = new Float64Array(n * n);
  const out = new Float64Array(n * n);
  for (let r = 0; r < n; r++) for (let c = 0; c < n; c++) {
    let s = 0;
    for (let k = 0; k < n; k++) s += inv[r * n + k]! * meat[k * n + c]!;
    tmp[r * n + c] = s;
  }
  for (let r = 0; r < n; r++) for (let c = 0; c < n; c++) {
    let s = 0;
    for (let k = 0; k < n; k++) s += tmp[r * n + k]! * inv[k * n + c]!;
    out[r * n + c] = s;
  }
  return out;
}

/*
 * Moments of a profile's gradient over a window about an edge, and their first-order sensitivity to
 * the profile's samples (for the noise sigma): the centroid that places an edge and the second moment
 * that says how wide it is. Samples lie every h px from s0; a sample's cell is [s - h/2, s + h/2],
 * weighted by how much of it lies inside the window.
 */

/** Fractional weight of sample cell [s - h/2, s + h/2] inside [lo, hi]. */
function cellWeight(s: number, h: number, lo: number, hi: number): number {
  const a = Math.max(s - 0.5 * h, lo);
  const b = Math.min(s + 0.5 * h, hi);
  return b > a ? (b - a) / h : 0;
}

// reused: the centroid runs in the mean-shift loop of every snap
const centroidOut = { c: 0, mass: 0 };

/** Centroid of g over [c - half, c + half], end samples weighted by how much of their cell is inside. */
export function windowCentroid(g: Float64Array, s0: number, h: number, n: number, c: number, half: number): { c: number; mass: number } {
  const lo = c - half;
  const hi = c + half;
  const kl = Math.max(1, Math.floor((lo - s0) / h));
  const kr = Math.min(n - 2, Math.ceil((hi - s0) / h));
  let mass = 0;
  let moment = 0;
  for (let k = kl; k <= kr; k++) {
    const s = s0 + k * h;
    const w = cellWeight(s, h, lo, hi) * g[k]!;
    mass += w;
    moment += w * s;
  }
  centroidOut.mass = mass;
  centroidOut.c = mass > 0 ? moment / mass : c;
  return centroidOut;
}

/** Root of the second moment of g about c over [c - half, c + half] (weighted as windowCentroid), 0 without mass. */
export function windowSpread(g: Float64Array, s0: number, h: number, n: number, c: number, half: number): number {
  const lo = c - half;
  const hi = c + half;
  const kl = Math.max(1, Math.floor((lo - s0) / h));
  const kr = Math.min(n - 2, Math.ceil((hi - s0) / h));
  let mass = 0;
  let m2 = 0;
  for (let k = kl; k <= kr; k++) {
    const s = s0 + k * h;
    const w = cellWeight(s, h, lo, hi) * g[k]!;
    mass += w;
    m2 += w * (s - c) * (s - c);
  }
  return mass > 0 && m2 > 0 ? Math.sqrt(m2 / mass) : 0;
}

/**
 * Coefficients on the profile samples of the first-order change of windowSpread's square m2 about
 * c: dm2 = sum w_k ((s_k - c)^2 - m2) dg_k / M (c held: at the centroid its own change drops out of
 * the first order), with dg_k as in centroidCoefficients.
 */
export function spreadCoefficients(coef: Float64Array, g: Float64Array, s0: number, h: number, n: number, c: number, half: number, m2: number, sign: number): Float64Array {
  coef.fill(0, 0, n);
  const lo = c - half;
  const hi = c + half;
  const kl = Math.max(1, Math.floor((lo - s0) / h));
  const kr = Math.min(n - 2, Math.ceil((hi - s0) / h));
  let mass = 0;
  for (let k = kl; k <= kr; k++) mass += cellWeight(s0 + k * h, h, lo, hi) * g[k]!;
  if (!(mass > 0)) return coef;
  for (let k = kl; k <= kr; k++) {
    const s = s0 + k * h;
    const w = (cellWeight(s, h, lo, hi) * ((s - c) * (s - c) - m2) * sign) / (mass * 2 * h);
    coef[k + 1]! += w;
    coef[k - 1]! -= w;
  }
  return coef;
}

/**
 * Coefficients on the profile samples of the first-order change of the window centroid c at its
 * fixed point: dc = [sum w_k (s_k - c) dg_k / M] / (1 - half (g(lo) + g(hi)) / M), the denominator
 * because the window moves with c; dg_k = sign (dp_(k+1) - dp_(k-1)) / 2h.
 */
export function centroidCoefficients(coef: Float64Array, g: Float64Array, s0: number, h: number, n: number, c: number, half: number, mass: number, sign: number): Float64Array {
  coef.fill(0, 0, n);
  const lo = c - half;
  const hi = c + half;
  const kl = Math.max(1, Math.floor((lo - s0) / h));
  const kr = Math.min(n - 2, Math.ceil((hi - s0) / h));
  const gLo = g[clampIndex(Math.round((lo - s0) / h), n)]!;
  const gHi = g[clampIndex(Math.round((hi - s0) / h), n)]!;
  const shrink = 1 - (half * (gLo + gHi)) / mass;
  const scale = shrink > 0.1 ? 1 / (mass * shrink) : 10 / mass;
  for (let k = kl; k <= kr; k++) {
    const s = s0 + k * h;
    const w = (cellWeight(s, h, lo, hi) * (s - c) * scale * sign) / (2 * h);
    coef[k + 1]! += w;
    coef[k - 1]! -= w;
  }
  return coef;
}

function clampIndex(j: number, n: number): number {
  return j < 0 ? 0 : j >= n ? n - 1 : j;
}

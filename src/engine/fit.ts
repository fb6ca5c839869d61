import { MAX_RANGE_M, MAX_SPEED_MS, MAX_TIME_S } from './constants';
import { InputError, UndeterminedError } from './errors';
import { Rng } from './rng';
import { summarize, type Estimate } from './stats';
import { finite, inRange, integer, positive } from './validate';

/*
 * Range over time for a straight pass: R(t)^2 = D'^2 + V^2 (t - t0)^2 (DESIGN.md "Range over time").
 *
 * The fit works in scaled units (time centred on the weighted centroid of the timestamps, tau in
 * [-1, 1]; ranges divided by the first range) and, for the search, on the coefficients of
 * R^2 = p2 tau^2 + p1 tau + p0 rather than on (D', V, t0). Same model, but its Jacobian columns
 * (tau^2, tau, 1) / 2R stay well apart however far the closest approach lies outside the window,
 * whereas in (D', V, t0) they become nearly parallel there and the normal equations go singular for
 * passes that the data still describe well. (D', V, t0) and their standard errors follow at the end,
 * exactly, by the delta method. When the best coefficients imply D'^2 < 0 (a pass seen far from its
 * closest approach, with noise), the constrained optimum lies on D' = 0: R = |alpha tau + beta|, a
 * two-parameter refit.
 */

/** Status codes of {@link fitRangeOverTimeKernel}. */
export const FitStatus = {
  /** Converged; every output slot is filled. */
  OK: 0,
  /** Iteration limit reached; the outputs hold the best point found. */
  NOT_CONVERGED: 1,
  /** R^2 shows no upward curvature beyond its noise: V not resolved from 0, t0 free. */
  NO_CURVATURE: 2,
  /** R^2 curves downward beyond its noise: the ranges do not follow a straight pass. */
  WRONG_CURVATURE: 3,
  /** The parameters are not separately determined by these samples (singular normal matrix). */
  SINGULAR: 4,
} as const;
export type FitStatusCode = (typeof FitStatus)[keyof typeof FitStatus];

/**
 * Slots of the kernel's output array: closest approach D' (m), relative speed V (m/s), time of closest
 * approach t0 (s), RMS of the normalised residuals sqrt(chi^2 / n), Gauss-Newton iterations, the three
 * standard errors, and the significance V^2 / se(V^2) of the curvature of R^2.
 */
export const FIT_OUT = {
  closestApproach: 0,
  relativeSpeed: 1,
  tClosest: 2,
  rms: 3,
  iterations: 4,
  seClosestApproach: 5,
  seRelativeSpeed: 6,
  seTClosest: 7,
  curvatureZ: 8,
} as const;
export const FIT_OUT_LENGTH = 9;

const MAX_ITERATIONS = 60;
const MAX_HALVINGS = 30;
/*
 * Stop when the Gauss-Newton step promises to lower chi^2 by less than this: a shift of about 1e-5
 * standard errors in every parameter, far below anything the data can tell apart.
 */
const CHI2_TOLERANCE = 1e-10;
/**
 * A step promising less than this (a shift of about 0.1 standard errors) is taken as the last one,
 * unchecked. Against fully converged fits of 3000 random invented passes (3-60 samples, 0.2-5 %
 * range errors) the answers moved by at most 0.001 standard errors, and a third of fits save a pass.
 */
const FINAL_STEP = 1e-2;
/**
 * The same for a bootstrap draw: a step promising less than 1 (about one standard error) is the last.
 * Over the same 3000 passes the answers moved by at most 0.015 standard errors (tested), a third of
 * the Monte Carlo error of a 5 % quantile from 2000 draws; most draws then need one pass, not two.
 */
const FINAL_STEP_BOOTSTRAP = 1;

/** How far {@link fitRangeOverTimeKernel} refines: to convergence, or as far as a bootstrap draw needs. */
export const FitPrecision = {
  FULL: 0,
  BOOTSTRAP: 1,
} as const;
export type FitPrecisionCode = (typeof FitPrecision)[keyof typeof FitPrecision];

/** Below this, a correlation-matrix determinant means the parameters cannot be told apart. */
const SINGULAR_DET = 1e-14;
/** Curvature below -2 standard errors is read as a real downward curve, not noise (common practice). */
const WRONG_CURVATURE_Z = 2;
/**
 * The wrapper reports a fit only when the curvature V^2 of R^2 is at least this many standard errors
 * above 0 (a one-sided 2.5 % level, common practice); below it, ranges flat within noise pass
 * as a pass too often (one time in six at 1 standard error).
 */
export const MIN_CURVATURE_Z = 2;

/*
 * Scratch for the hot path. Module-level so that a fit allocates nothing; JavaScript runs one fit at a
 * time, and no callback runs while these are in use, so sharing them is safe.
 */
// [chi2, A00, A01, A02, A11, A12, A22, g0, g1, g2] of the last evaluation
const ev = new Float64Array(10);
// [x0, x1, x2, inv00, inv01, inv02, inv11, inv12, inv22] of the last 3x3 solve
const sol = new Float64Array(9);
// [tm, invTs, invRs, minRho] of the current data set (scaled units: see prepare())
const sc = new Float64Array(4);
// result of the last refinement: [p2, p1, p0, chi2, iterations, converged (1/0)]
const best = new Float64Array(6);
// a 3x3 system for solveSym3 that is not ev's: [m00, m01, m02, m11, m12, m22, g0, g1, g2]
const sys = new Float64Array(9);
// (p2, p1, p0) handed to evaluate() and refine(): doubles passed as arguments to a call that is not
// inlined are boxed, one allocation each, on every fit
const par = new Float64Array(3);
function setPar(p2: number, p1: number, p0: number): void {
  par[0] = p2;
  par[1] = p1;
  par[2] = p0;
}

// Hot paths write Number.POSITIVE_INFINITY, not the global Infinity: V8 loads globals as tagged
// values, and merging one with a raw double can box that double on every pass.
// Local copies: some module loaders turn each read of an imported binding into a getter call.
const MAX_T = MAX_TIME_S;
const MAX_R = MAX_RANGE_M;

/**
 * Solves the symmetric 3x3 system M x = g by cofactors into `sol`, with M^-1. Returns false when M is
 * singular or not positive definite, judged on the scale-free correlation determinant. The system is
 * read from a typed array, [m00, m01, m02, m11, m12, m22, g0, g1, g2] at `at`: passing nine doubles
 * as arguments to a call V8 does not inline boxes each one, which allocated on every fit.
 */
function solveSym3(sys: Float64Array, at: number): boolean {
  const m00 = sys[at]!;
  const m01 = sys[at + 1]!;
  const m02 = sys[at + 2]!;
  const m11 = sys[at + 3]!;
  const m12 = sys[at + 4]!;
  const m22 = sys[at + 5]!;
  const g0 = sys[at + 6]!;
  const g1 = sys[at + 7]!;
  const g2 = sys[at + 8]!;
  const c00 = m11 * m22 - m12 * m12;
  const c01 = m02 * m12 - m01 * m22;
  const c02 = m01 * m12 - m02 * m11;
  const c11 = m00 * m22 - m02 * m02;
  const c12 = m01 * m02 - m00 * m12;
  const c22 = m00 * m11 - m01 * m01;
  const det = m00 * c00 + m01 * c01 + m02 * c02;
  const diag = m00 * m11 * m22;
  if (!(diag > 0) || !(det > SINGULAR_DET * diag) || !Number.isFinite(det)) return false;
  const inv = 1 / det;
  sol[0] = (c00 * g0 + c01 * g1 + c02 * g2) * inv;
  sol[1] = (c01 * g0 + c11 * g1 + c12 * g2) * inv;
  sol[2] = (c02 * g0 + c12 * g1 + c22 * g2) * inv;
  sol[3] = c00 * inv;
  sol[4] = c01 * inv;
  sol[5] = c02 * inv;
  sol[6] = c11 * inv;
  sol[7] = c12 * inv;
  sol[8] = c22 * inv;
  return true;
}

/*
 * Per-sample values every evaluation needs, interleaved [tau, rho, 1/s^2] in scaled units. Computing
 * them once per fit takes a division per sample out of each Gauss-Newton pass. A caller may pass its
 * own; otherwise this module buffer is used, grown only when a longer data set first arrives.
 */
let sharedWork = new Float64Array(3 * 64);

function workspace(n: number, work: Float64Array | undefined): Float64Array {
  if (work !== undefined) {
    if (work.length < 3 * n) throw new InputError('workspace length', work.length, `at least ${3 * n} (3 per sample)`);
    return work;
  }
  if (sharedWork.length < 3 * n) sharedWork = new Float64Array(3 * n);
  return sharedWork;
}

/*
 * Validation runs as a branch-light check inside the first pass of prepare(), and only on failure this
 * slow path finds and names the culprit: building a message inside the hot loop costs V8 more than
 * the whole fit.
 */
function throwFirstInvalid(t: Float64Array, r: Float64Array, sigma: Float64Array, n: number): never {
  for (let i = 0; i < n; i++) {
    const ti = t[i]!;
    inRange(`timestamp[${i}]`, ti, 0, MAX_TIME_S, ' s');
    if (i > 0 && !(ti > t[i - 1]!)) {
      throw new InputError(`timestamp[${i}]`, ti, `more than timestamp[${i - 1}] = ${t[i - 1]} s (strictly increasing)`);
    }
    positive(`range[${i}]`, r[i]!, MAX_RANGE_M, ' m');
    positive(`sigma[${i}]`, sigma[i]!, MAX_RANGE_M, ' m');
  }
  throw new InputError('samples', n, 'valid samples');
}

/**
 * Validates the arrays (InputError, the message naming the index), fills the workspace, sets the
 * scales in `sc` and runs the linear step: the weighted least squares of rho^2 on (tau^2, tau, 1) with
 * weights 1 / (2 rho s)^2, the variance of R^2 to first order. It is exact for noiseless data, so it
 * is both the start of the refinement and an answer to check it against. Leaves (p2, p1, p0) and the
 * inverse normal matrix in `sol`; returns false if that system is singular. Scales: tau = 0 at the
 * weighted centroid of the timestamps, |tau| <= 1; ranges divided by the first range.
 */
function prepare(t: Float64Array, r: Float64Array, sigma: Float64Array, n: number, w: Float64Array): boolean {
  integer('sample count', n, 3, 0x7fffffff);
  const len = Math.min(t.length, r.length, sigma.length);
  if (n > len) throw new InputError('sample count', n, `at most ${len}, the length of the shortest input array`);
  // centre time on the weighted centroid, not the window's middle: with relative range errors the
  // weights can differ by orders of magnitude, and a basis centred where the weight is keeps the
  // coefficients' normal matrix well conditioned. Validation rides along in the same pass.
  const tMid = 0.5 * (t[0]! + t[n - 1]!);
  const invHalf = 2 / (t[n - 1]! - t[0]!);
  const invRs = 1 / r[0]!;
  let sw = 0;
  let swu = 0;
  let prev = Number.NEGATIVE_INFINITY;
  let ok = true;
  for (let i = 0; i < n; i++) {
    const ti = t[i]!;
    const ri = r[i]!;
    const si = sigma[i]!;
    ok = ok && ti > prev && ti <= MAX_T && ri > 0 && ri <= MAX_R && si > 0 && si <= MAX_R;
    prev = ti;
    const rho = ri * invRs;
    const s = si * invRs;
    const wl = 0.25 / (rho * rho * s * s);
    w[3 * i + 2] = wl;
    sw += wl;
    swu += wl * (ti - tMid) * invHalf;
  }
  if (!ok || !(t[0]! >= 0)) throwFirstInvalid(t, r, sigma, n);
  pre[0] = tMid;
  pre[1] = invHalf;
  pre[2] = invRs;
  pre[3] = swu / sw;
  return linearStep(t, r, 0, 1, n, w);
}

/*
 * [tMid, invHalf, invRs, c] from the first pass, for linearStep: four doubles passed as arguments to
 * a call that is not inlined would be boxed, one allocation each, on every draw.
 */
const pre = new Float64Array(4);

/**
 * The second pass and the linear solve, shared by both first passes: range i read from r[off + i stride],
 * time centred on the weighted centroid c (pre), the workspace filled for the refinement.
 */
function linearStep(t: Float64Array, r: Float64Array, off: number, stride: number, n: number, w: Float64Array): boolean {
  const tMid = pre[0]!;
  const invHalf = pre[1]!;
  const invRs = pre[2]!;
  const c = pre[3]!;
  if (!Number.isFinite(c)) return false;
  const tm = tMid + c / invHalf;
  const invTs = invHalf / Math.max(1 + c, 1 - c);
  let minRho = Number.POSITIVE_INFINITY;
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let s4 = 0;
  let y0 = 0;
  let y1 = 0;
  let y2 = 0;
  for (let i = 0; i < n; i++) {
    const tau = (t[i]! - tm) * invTs;
    const rho = r[off + i * stride]! * invRs;
    if (rho < minRho) minRho = rho;
    const y = rho * rho;
    const wl = w[3 * i + 2]!;
    w[3 * i] = tau;
    w[3 * i + 1] = rho;
    w[3 * i + 2] = 4 * y * wl;
    const tau2 = tau * tau;
    s0 += wl;
    s1 += wl * tau;
    s2 += wl * tau2;
    s3 += wl * tau2 * tau;
    s4 += wl * tau2 * tau2;
    y0 += wl * y;
    y1 += wl * y * tau;
    y2 += wl * y * tau2;
  }
  sc[0] = tm;
  sc[1] = invTs;
  sc[2] = invRs;
  sc[3] = minRho;
  sys[0] = s4;
  sys[1] = s3;
  sys[2] = s2;
  sys[3] = s2;
  sys[4] = s1;
  sys[5] = s0;
  sys[6] = y2;
  sys[7] = y1;
  sys[8] = y0;
  return solveSym3(sys, 0);
}


/**
 * The first pass for a bootstrap draw: range i from rows[off + i stride], each range's sigma that range
 * times rel[i], and no validation (the caller checked the timestamps once, and each range as it
 * made it). The same arithmetic as prepare() on those values, so a draw fits as it would there.
 */
function prepareDraw(t: Float64Array, rows: Float64Array, off: number, stride: number, rel: Float64Array, n: number, w: Float64Array): boolean {
  const tMid = 0.5 * (t[0]! + t[n - 1]!);
  const invHalf = 2 / (t[n - 1]! - t[0]!);
  const invRs = 1 / rows[off]!;
  let sw = 0;
  let swu = 0;
  for (let i = 0; i < n; i++) {
    const ri = rows[off + i * stride]!;
    const si = ri * rel[i]!;
    const rho = ri * invRs;
    const s = si * invRs;
    const wl = 0.25 / (rho * rho * s * s);
    w[3 * i + 2] = wl;
    sw += wl;
    swu += wl * (t[i]! - tMid) * invHalf;
  }
  pre[0] = tMid;
  pre[1] = invHalf;
  pre[2] = invRs;
  pre[3] = swu / sw;
  return linearStep(t, rows, off, stride, n, w);
}

/**
 * chi^2, the Gauss-Newton normal matrix A = J^T W J and g = -J^T W e for R = sqrt(p2 tau^2 + p1 tau +
 * p0), into `ev`. Returns chi^2, or Infinity when the model range would be imaginary or zero somewhere.
 */
function evaluate(w: Float64Array, n: number): boolean {
  const p2 = par[0]!;
  const p1 = par[1]!;
  const p0 = par[2]!;
  // J_i = (tau^2, tau, 1) / 2m, so A is the Hankel matrix of the moments of u = w / 4m^2: five sums
  // instead of six products, which is a quarter of the cost of a pass
  let chi2 = 0;
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let s4 = 0;
  let h0 = 0;
  let h1 = 0;
  let h2 = 0;
  let minM2 = Number.POSITIVE_INFINITY;
  for (let k = 0, end = 3 * n; k < end; k += 3) {
    const tau = w[k]!;
    const m2 = (p2 * tau + p1) * tau + p0;
    if (m2 < minM2) minM2 = m2;
    const m = Math.sqrt(m2);
    // one division a sample: 1/m serves both u = w/4m^2 and we = w e/2m
    const im = 1 / m;
    const wi = w[k + 2]!;
    const e = m - w[k + 1]!;
    const hw = 0.5 * wi * im;
    const u = 0.5 * hw * im;
    const we = hw * e;
    const tau2 = tau * tau;
    const ut2 = u * tau2;
    chi2 += wi * e * e;
    s0 += u;
    s1 += u * tau;
    s2 += ut2;
    s3 += ut2 * tau;
    s4 += ut2 * tau2;
    h0 -= we;
    h1 -= we * tau;
    h2 -= we * tau2;
  }
  if (!(minM2 > 0)) return false;
  ev[0] = chi2;
  ev[1] = s4;
  ev[2] = s3;
  ev[3] = s2;
  ev[4] = s2;
  ev[5] = s1;
  ev[6] = s0;
  ev[7] = h2;
  ev[8] = h1;
  ev[9] = h0;
  return true;
}

/**
 * Damped Gauss-Newton on (p2, p1, p0): full steps, halved until chi^2 does not rise. A step promising
 * less than FINAL_STEP is taken without evaluating after it: the quadratic model is exact to far below
 * the noise there, and skipping that pass saves up to half of a typical fit (FINAL_STEP_BOOTSTRAP
 * for a bootstrap draw). Leaves the result in `best`
 * and in `ev` the evaluation at (or a hair before) it. Returns false if the start is invalid or the
 * normal matrix singular.
 */
function refine(w: Float64Array, n: number, precision: FitPrecisionCode): boolean {
  const finalStep = precision === FitPrecision.BOOTSTRAP ? FINAL_STEP_BOOTSTRAP : FINAL_STEP;
  let p2 = par[0]!;
  let p1 = par[1]!;
  let p0 = par[2]!;
  if (!evaluate(w, n)) return false;
  let chi2 = ev[0]!;
  let iterations = 0;
  let converged = false;
  while (iterations < MAX_ITERATIONS) {
    iterations++;
    if (!solveSym3(ev, 1)) return false;
    const d2 = sol[0]!;
    const d1 = sol[1]!;
    const d0 = sol[2]!;
    // for the Gauss-Newton step, delta . g is the chi^2 decrease the quadratic model promises
    const promised = d2 * ev[7]! + d1 * ev[8]! + d0 * ev[9]!;
    if (!(promised > CHI2_TOLERANCE)) {
      converged = true;
      break;
    }
    if (promised < finalStep) {
      p2 += d2;
      p1 += d1;
      p0 += d0;
      chi2 = Math.max(chi2 - promised, 0);
      converged = true;
      break;
    }
    let step = 1;
    let accepted = false;
    for (let h = 0; h <= MAX_HALVINGS; h++) {
      const c2 = p2 + step * d2;
      const c1 = p1 + step * d1;
      const c0 = p0 + step * d0;
      setPar(c2, c1, c0);
      const chi2n = evaluate(w, n) ? ev[0]! : Number.POSITIVE_INFINITY;
      if (chi2n <= chi2) {
        p2 = c2;
        p1 = c1;
        p0 = c0;
        chi2 = chi2n;
        accepted = true;
        break;
      }
      step *= 0.5;
    }
    if (!accepted) {
      // no descent even for tiny steps: rounding has the last word, so this is the minimum
      setPar(p2, p1, p0);
      evaluate(w, n);
      converged = promised < 1e-6;
      break;
    }
  }
  best[0] = p2;
  best[1] = p1;
  best[2] = p0;
  best[3] = chi2;
  best[4] = iterations;
  best[5] = converged ? 1 : 0;
  return true;
}

/** chi^2, the 2x2 normal matrix and gradient for R = |alpha tau + beta| (D' = 0), into ev[0..5]. */
function evaluateBoundary(w: Float64Array, n: number, alpha: number, beta: number): number {
  let chi2 = 0;
  let a00 = 0;
  let a01 = 0;
  let a11 = 0;
  let g0 = 0;
  let g1 = 0;
  for (let k = 0, end = 3 * n; k < end; k += 3) {
    const tau = w[k]!;
    const lin = alpha * tau + beta;
    const sign = lin < 0 ? -1 : 1;
    const wi = w[k + 2]!;
    const e = sign * lin - w[k + 1]!;
    const j0 = sign * tau;
    const we = wi * e;
    chi2 += we * e;
    a00 += wi * j0 * j0;
    a01 += wi * j0 * sign;
    a11 += wi;
    g0 -= we * j0;
    g1 -= we * sign;
  }
  ev[0] = chi2;
  ev[1] = a00;
  ev[2] = a01;
  ev[3] = a11;
  ev[4] = g0;
  ev[5] = g1;
  return chi2;
}

/** Gauss-Newton for the boundary model; the result goes to best[0..1] (alpha, beta), chi2, iterations. */
function refineBoundary(w: Float64Array, n: number, alpha: number, beta: number, iterationsSoFar: number): boolean {
  let chi2 = evaluateBoundary(w, n, alpha, beta);
  let iterations = iterationsSoFar;
  let converged = false;
  while (iterations < MAX_ITERATIONS) {
    iterations++;
    const a00 = ev[1]!;
    const a01 = ev[2]!;
    const a11 = ev[3]!;
    const det = a00 * a11 - a01 * a01;
    if (!(a00 > 0) || !(det > SINGULAR_DET * a00 * a11)) return false;
    const da = (a11 * ev[4]! - a01 * ev[5]!) / det;
    const db = (a00 * ev[5]! - a01 * ev[4]!) / det;
    const promised = da * ev[4]! + db * ev[5]!;
    if (!(promised > CHI2_TOLERANCE)) {
      converged = true;
      break;
    }
    let step = 1;
    let accepted = false;
    for (let h = 0; h <= MAX_HALVINGS; h++) {
      const ca = alpha + step * da;
      const cb = beta + step * db;
      const chi2n = evaluateBoundary(w, n, ca, cb);
      if (chi2n <= chi2) {
        alpha = ca;
        beta = cb;
        chi2 = chi2n;
        accepted = true;
        break;
      }
      step *= 0.5;
    }
    if (!accepted) {
      converged = promised < 1e-6;
      break;
    }
  }
  best[0] = alpha;
  best[1] = beta;
  best[3] = chi2;
  best[4] = iterations;
  best[5] = converged ? 1 : 0;
  return true;
}

/**
 * Fits R(t)^2 = D'^2 + V^2 (t - t0)^2 to n >= 3 ranges by weighted least squares on R (residuals
 * (model - R_i) / sigma_i): an exact linear fit of R^2 as a quadratic in t, then damped Gauss-Newton.
 * Allocation-free, for use inside a bootstrap loop; `work` (3n slots) is optional scratch.
 *
 * Inputs must be valid (timestamps in [0, MAX_TIME_S] strictly increasing, ranges and sigmas in
 * (0, MAX_RANGE_M]); otherwise InputError, naming the index. Writes FIT_OUT_LENGTH slots of `out`
 * (see FIT_OUT) and returns a FitStatus code; on a status without an answer only curvatureZ is set.
 * Standard errors come from the inverse of J^T W J at the solution (the sigmas taken as known; after
 * an unchecked last step, at the point just before it, which moves them by parts in 10^4), carried
 * to (D', V, t0) by the delta method. se(D') is se(D'^2) / 2D' for a resolved D' and goes
 * smoothly to sqrt(se(D'^2)) as D' reaches 0 (it is sqrt(D'^2 + se(D'^2)) - D'), so it stays finite
 * on the boundary D' = 0, where the linearised value is meaningless.
 */
export function fitRangeOverTimeKernel(
  t: Float64Array,
  r: Float64Array,
  sigma: Float64Array,
  n: number,
  out: Float64Array,
  work?: Float64Array,
  precision: FitPrecisionCode = FitPrecision.FULL,
): FitStatusCode {
  if (out.length < FIT_OUT_LENGTH) {
    throw new InputError('output length', out.length, `at least ${FIT_OUT_LENGTH} slots (FIT_OUT_LENGTH)`);
  }
  const w = workspace(n, work);
  const linearOk = prepare(t, r, sigma, n, w);
  out.fill(0, 0, FIT_OUT_LENGTH);
  if (!linearOk) return FitStatus.SINGULAR;
  return fromLinearStep(w, n, out, precision);
}

/**
 * fitRangeOverTimeKernel for one bootstrap draw, reading its ranges straight from a matrix of draws:
 * range i at rows[offset + i stride], each range's sigma that range times rel[i]. Inputs
 * are trusted (the caller validated the timestamps once and made each range in bounds); `out` must
 * hold FIT_OUT_LENGTH slots and `work` 3n. Refines at FitPrecision.BOOTSTRAP. Gives the same fit as
 * the checked kernel on the same values (tested), without copying them out first.
 */
export function fitRangeOverTimeDrawKernel(
  t: Float64Array,
  rows: Float64Array,
  offset: number,
  stride: number,
  rel: Float64Array,
  n: number,
  out: Float64Array,
  work: Float64Array,
): FitStatusCode {
  const linearOk = prepareDraw(t, rows, offset, stride, rel, n, work);
  out.fill(0, 0, FIT_OUT_LENGTH);
  if (!linearOk) return FitStatus.SINGULAR;
  return fromLinearStep(work, n, out, FitPrecision.BOOTSTRAP);
}

/** The refinement and the answer, from the linear step that prepare() or prepareDraw() left in `sol`. */
function fromLinearStep(w: Float64Array, n: number, out: Float64Array, precision: FitPrecisionCode): FitStatusCode {
  let p2 = sol[0]!;
  let p1 = sol[1]!;
  let p0 = sol[2]!;
  const z0 = p2 / Math.sqrt(sol[3]!);
  if (!(p2 > 0)) {
    out[FIT_OUT.curvatureZ] = z0;
    return z0 < -WRONG_CURVATURE_Z ? FitStatus.WRONG_CURVATURE : FitStatus.NO_CURVATURE;
  }
  // the start must give a real, non-zero model range at every sample: lift it if noise says otherwise
  const floor = 1e-4 * sc[3]! * sc[3]!;
  let minM2 = Number.POSITIVE_INFINITY;
  for (let k = 0; k < 3 * n; k += 3) {
    const tau = w[k]!;
    const m2 = (p2 * tau + p1) * tau + p0;
    if (m2 < minM2) minM2 = m2;
  }
  if (!(minM2 > floor)) p0 += floor - minM2;
  setPar(p2, p1, p0);
  if (!refine(w, n, precision)) return FitStatus.SINGULAR;
  p2 = best[0]!;
  p1 = best[1]!;
  p0 = best[2]!;
  let iterations = best[4]!;
  let chi2 = best[3]!;
  let converged = best[5] === 1;
  if (p2 > 0 && p0 - (p1 * p1) / (4 * p2) < 0) {
    // the free optimum is unphysical (D'^2 < 0): the constrained one lies on D' = 0
    const alpha = Math.sqrt(p2);
    if (!refineBoundary(w, n, alpha, p1 / (2 * alpha), iterations)) return FitStatus.SINGULAR;
    const a = best[0]!;
    const b = best[1]!;
    p2 = a * a;
    p1 = 2 * a * b;
    p0 = b * b;
    iterations = best[4]!;
    chi2 = best[3]!;
    converged = best[5] === 1;
    // the full normal matrix at the boundary point, for the standard errors
    setPar(p2, p1, p0);
    if (!evaluate(w, n)) return FitStatus.SINGULAR;
  }
  // `ev` now holds the evaluation at (or within a final tiny step of) the solution
  for (let j = 0; j < 6; j++) sys[j] = ev[j + 1]!;
  sys[6] = sys[7] = sys[8] = 0;
  if (!solveSym3(sys, 0)) return FitStatus.SINGULAR;
  const c00 = sol[3]!;
  const c01 = sol[4]!;
  const c02 = sol[5]!;
  const c11 = sol[6]!;
  const c12 = sol[7]!;
  const c22 = sol[8]!;
  const z = p2 / Math.sqrt(c00);
  out[FIT_OUT.curvatureZ] = z;
  if (!(p2 > 0)) return z < -WRONG_CURVATURE_Z ? FitStatus.WRONG_CURVATURE : FitStatus.NO_CURVATURE;
  // T = -p1 / 2p2 and q = D'^2 = p0 - p1^2 / 4p2; their gradients in (p2, p1, p0)
  const T = -p1 / (2 * p2);
  const q = Math.max(p0 - (p1 * p1) / (4 * p2), 0);
  const tg0 = p1 / (2 * p2 * p2);
  const tg1 = -1 / (2 * p2);
  const qg0 = T * T;
  const qg1 = T;
  const varT = tg0 * tg0 * c00 + 2 * tg0 * tg1 * c01 + tg1 * tg1 * c11;
  const varQ =
    qg0 * qg0 * c00 + qg1 * qg1 * c11 + c22 + 2 * (qg0 * qg1 * c01 + qg0 * c02 + qg1 * c12);
  const rs = 1 / sc[2]!;
  const ts = 1 / sc[1]!;
  const d = Math.sqrt(q);
  const v = Math.sqrt(p2);
  out[FIT_OUT.closestApproach] = d * rs;
  out[FIT_OUT.relativeSpeed] = (v * rs) / ts;
  out[FIT_OUT.tClosest] = sc[0]! + T * ts;
  out[FIT_OUT.rms] = Math.sqrt(chi2 / n);
  out[FIT_OUT.iterations] = iterations;
  out[FIT_OUT.seClosestApproach] = (Math.sqrt(q + Math.sqrt(Math.max(varQ, 0))) - d) * rs;
  out[FIT_OUT.seRelativeSpeed] = ((Math.sqrt(c00) / (2 * v)) * rs) / ts;
  out[FIT_OUT.seTClosest] = Math.sqrt(Math.max(varT, 0)) * ts;
  // never hand out NaN or Infinity: extreme inputs (sigmas a billionth of the ranges) can overflow
  for (let i = 0; i < FIT_OUT_LENGTH; i++) {
    if (!Number.isFinite(out[i]!)) {
      out.fill(0, 0, FIT_OUT_LENGTH);
      return FitStatus.SINGULAR;
    }
  }
  return converged ? FitStatus.OK : FitStatus.NOT_CONVERGED;
}

/**
 * The linear step alone, in the caller's units: weighted least squares of R^2 = a t^2 + b t + c with
 * weights 1 / (2 R_i sigma_i)^2. Writes [a, b, c] to out and returns FitStatus.OK or SINGULAR.
 * Exposed so that the start of the fit can be checked against an independent solver.
 */
export function fitRangeSquaredQuadraticKernel(
  t: Float64Array,
  r: Float64Array,
  sigma: Float64Array,
  n: number,
  out: Float64Array,
  work?: Float64Array,
): FitStatusCode {
  if (out.length < 3) throw new InputError('output length', out.length, 'at least 3 slots');
  if (!prepare(t, r, sigma, n, workspace(n, work))) return FitStatus.SINGULAR;
  const tm = sc[0]!;
  const ts = 1 / sc[1]!;
  const rs2 = 1 / (sc[2]! * sc[2]!);
  const ap = sol[0]!;
  const bp = sol[1]!;
  const cp = sol[2]!;
  out[0] = (rs2 * ap) / (ts * ts);
  out[1] = rs2 * (bp / ts - (2 * ap * tm) / (ts * ts));
  out[2] = rs2 * ((ap * tm * tm) / (ts * ts) - (bp * tm) / ts + cp);
  return FitStatus.OK;
}

/** One measured range: timestamp (s, video time), range (m) and its standard deviation (m). */
export interface RangeSample {
  t: number;
  range: number;
  sigma: number;
}

export interface RangeFit {
  /** D' (m): closest distance of the straight relative track, altitude included. */
  closestApproach: number;
  /** V (m/s): speed of the object relative to the camera. */
  relativeSpeed: number;
  /** t0 (s): time of closest approach, on the video's clock; may lie outside the sampled window. */
  tClosest: number;
  /** sqrt(chi^2 / n) of the residuals in units of their sigmas: about 1 when the sigmas are honest. */
  rmsNormalized: number;
  /** From the inverse of J^T W J at the solution, taking the sigmas as known. */
  standardErrors: { closestApproach: number; relativeSpeed: number; tClosest: number };
  converged: boolean;
}

const REASONS: Record<number, string> = {
  [FitStatus.NO_CURVATURE]:
    'range squared shows no upward curvature beyond its noise (ranges constant within noise, or a pass seen too briefly or too far from its closest approach), so the relative speed is not resolved from 0 and the time of closest approach is free',
  [FitStatus.WRONG_CURVATURE]:
    'the ranges do not follow a straight pass: range squared curves the wrong way over time',
  [FitStatus.SINGULAR]:
    'closest approach, relative speed and time of closest approach are not separately determined by these samples',
};

/** Plain-language reason for a kernel status that gives no answer (empty for OK / NOT_CONVERGED). */
export function fitStatusReason(status: FitStatusCode): string {
  return REASONS[status] ?? '';
}

function toArrays(samples: readonly RangeSample[]): { t: Float64Array; r: Float64Array; s: Float64Array } {
  if (!Array.isArray(samples)) throw new InputError('samples', samples, 'a list of at least 3 range samples');
  if (samples.length < 3) throw new InputError('samples', samples, 'at least 3 range samples');
  const n = samples.length;
  const t = new Float64Array(n);
  const r = new Float64Array(n);
  const s = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = samples[i];
    if (typeof x !== 'object' || x === null) throw new InputError(`samples[${i}]`, x, 'an object with t, range, sigma');
    // validate here too, so that a value the typed array would coerce (a string, undefined) is named
    t[i] = finite(`timestamp[${i}]`, x.t);
    r[i] = finite(`range[${i}]`, x.range);
    s[i] = finite(`sigma[${i}]`, x.sigma);
  }
  return { t, r, s };
}

/**
 * Validated, object-returning fit of a straight pass to ranges over time. Throws InputError for fewer
 * than 3 samples, timestamps out of order or repeated, ranges or sigmas not positive; throws
 * UndeterminedError when the data do not determine the fit, including when the curvature of R^2 is
 * less than MIN_CURVATURE_Z standard errors above 0 (the relative speed is then not resolved).
 * A repeated timestamp is an input error, so "all times the same" never reaches the fit.
 */
export function fitRangeOverTime(samples: readonly RangeSample[]): RangeFit {
  const { t, r, s } = toArrays(samples);
  const out = new Float64Array(FIT_OUT_LENGTH);
  const status = fitRangeOverTimeKernel(t, r, s, t.length, out);
  if (status !== FitStatus.OK && status !== FitStatus.NOT_CONVERGED) {
    throw new UndeterminedError('range-over-time fit', fitStatusReason(status));
  }
  const z = out[FIT_OUT.curvatureZ]!;
  if (z < MIN_CURVATURE_Z) {
    throw new UndeterminedError(
      'range-over-time fit',
      `the relative speed is not resolved: the curvature of range squared is ${z.toFixed(2)} standard errors above 0, less than the ${MIN_CURVATURE_Z} needed`,
    );
  }
  return {
    closestApproach: out[FIT_OUT.closestApproach]!,
    relativeSpeed: out[FIT_OUT.relativeSpeed]!,
    tClosest: out[FIT_OUT.tClosest]!,
    rmsNormalized: out[FIT_OUT.rms]!,
    standardErrors: {
      closestApproach: out[FIT_OUT.seClosestApproach]!,
      relativeSpeed: out[FIT_OUT.seRelativeSpeed]!,
      tClosest: out[FIT_OUT.seTClosest]!,
    },
    converged: status === FitStatus.OK,
  };
}

export interface RangeFitBootstrap {
  closestApproach: Estimate;
  relativeSpeed: Estimate;
  tClosest: Estimate;
  /** Share of draws whose refit gave no answer (or whose simulated range was not positive). */
  failedShare: number;
}

/**
 * Parametric bootstrap of the fit: fit once, then per draw simulate R_i* = model(t_i) + sigma_i * N(0,1)
 * and refit with the same kernel. Draws that fail are left out and counted in failedShare; when that
 * share is material the intervals are conditional on a fit existing (failures cluster at low V, so
 * the lower end of V is then optimistic). Draws are not held to the MIN_CURVATURE_Z rule, which
 * would cut the low-V tail far more. Deterministic for a seed.
 */
export function bootstrapRangeFit(samples: readonly RangeSample[], draws: number, seed: number): RangeFitBootstrap {
  integer('draws', draws, 100, 100000);
  integer('seed', seed, 0, 0xffffffff);
  const base = fitRangeOverTime(samples);
  const { t, s } = toArrays(samples);
  const n = t.length;
  const model = new Float64Array(n);
  const d2 = base.closestApproach * base.closestApproach;
  const v2 = base.relativeSpeed * base.relativeSpeed;
  for (let i = 0; i < n; i++) {
    const dt = t[i]! - base.tClosest;
    model[i] = Math.sqrt(d2 + v2 * dt * dt);
  }
  const rStar = new Float64Array(n);
  const out = new Float64Array(FIT_OUT_LENGTH);
  const work = new Float64Array(3 * n);
  const dDraws = new Float64Array(draws);
  const vDraws = new Float64Array(draws);
  const tDraws = new Float64Array(draws);
  const rng = new Rng(seed);
  let ok = 0;
  for (let k = 0; k < draws; k++) {
    let valid = true;
    for (let i = 0; i < n; i++) {
      const ri = model[i]! + s[i]! * rng.normal();
      if (!(ri > 0 && ri <= MAX_R)) valid = false;
      rStar[i] = ri;
    }
    if (!valid) continue;
    if (fitRangeOverTimeKernel(t, rStar, s, n, out, work, FitPrecision.BOOTSTRAP) !== FitStatus.OK) continue;
    dDraws[ok] = out[FIT_OUT.closestApproach]!;
    vDraws[ok] = out[FIT_OUT.relativeSpeed]!;
    tDraws[ok] = out[FIT_OUT.tClosest]!;
    ok++;
  }
  if (ok === 0) throw new UndeterminedError('range-over-time bootstrap', 'no simulated data set could be fitted');
  return {
    closestApproach: summarize(dDraws, ok),
    relativeSpeed: summarize(vDraws, ok),
    tClosest: summarize(tDraws, ok),
    failedShare: (draws - ok) / draws,
  };
}

/** Ground speed of the object for each direction of travel that can produce the relative speed; null otherwise. */
export interface ParallelReadings {
  /** Travelling against the observer: V = |u| + s, so s = V - |u| (needs V >= |u|). */
  opposite: number | null;
  /** Same direction, slower than the observer (or standing still): V = |u| - s, s = |u| - V (needs V <= |u|). */
  sameSlower: number | null;
  /** Same direction, faster than the observer: V = s - |u|, s = |u| + V (always possible). */
  sameFaster: number | null;
}

/**
 * The object's ground speed from the fitted relative speed V and the observer's speed u, for each
 * direction of travel. Every reading assumes both tracks are straight, level and parallel (so the
 * relative velocity lies along the road); which reading applies is an assumption the picture must
 * settle: 'opposite' needs the object to move against the observer, 'sameSlower' with it but slower
 * (the sight-line fixed point then lies beyond the object), 'sameFaster' with it and faster (the fixed
 * point is behind the observer). At V = |u| both 'opposite' and 'sameSlower' give 0: a still object.
 * The sign of u is ignored; only its size matters here.
 */
export function objectSpeedFromRelative(observerSpeed: number, relativeSpeed: number): ParallelReadings {
  inRange('observer speed', observerSpeed, -MAX_SPEED_MS, MAX_SPEED_MS, ' m/s');
  inRange('relative speed', relativeSpeed, 0, 2 * MAX_SPEED_MS, ' m/s');
  const u = Math.abs(observerSpeed);
  const v = relativeSpeed;
  return {
    opposite: v >= u ? v - u : null,
    sameSlower: v <= u ? u - v : null,
    sameFaster: u + v,
  };
}

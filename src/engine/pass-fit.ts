import { Axis, type AxisCode, P, PASS_PARAMS, spanAngleTrig } from './pass-model';

/*
 * Fitting a straight pass (pass-model.ts) to what the marks saw: each object span's angle, and where
 * known each mark's elevation (a marked horizon, a landmark's base, a fixed camera's pitch) and azimuth
 * (a fixed camera's aim). Weighted least squares by Levenberg-Marquardt on a few parameters, with a
 * numeric Jacobian: the model is a handful of products per mark, so a difference costs less than the
 * algebra of an exact derivative would in code, and the fit is the same one whatever the span's axis.
 *
 * The fitted parameters are not the physical ones. Spans cannot tell whether the object drifts back
 * past the camera (it flies the other way, or the same way slower) or pulls ahead (the same way,
 * faster): both give the same ranges. So each fit holds that sign fixed (`sgn`, the sign of the
 * relative along-road speed) and fits its size on a log scale, which also keeps it positive:
 *   q0 = ln |w cos beta - u|, q1 = xr, q2 = ln rho, q3 = eps, q4 = beta.
 * The caller fits each sign its assumptions leave open, and reports each. eps is fitted only when some
 * mark has an elevation, beta only when some mark has an azimuth; otherwise they are held at the
 * draw's values.
 */

export const Q = { lnV: 0, xr: 1, lnRho: 2, eps: 3, beta: 4 } as const;
export const FIT_PARAMS = 5;

/** One pass's observations. Absent elevations and azimuths are NaN. */
export interface PassData {
  n: number;
  t: Float64Array;
  /** span angle, rad, and its standard deviation */
  theta: Float64Array;
  sTheta: Float64Array;
  elev: Float64Array;
  sElev: Float64Array;
  azim: Float64Array;
  sAzim: Float64Array;
  axis: AxisCode;
  /** the object's true size along the axis, m */
  L: number;
  /** the observer's speed, m/s */
  u: number;
  /** reference time, s (the middle of the marks keeps xr and beta apart) */
  tr: number;
}

export function passData(n: number): PassData {
  const f = () => new Float64Array(n).fill(Number.NaN);
  return { n, t: f(), theta: f(), sTheta: f(), elev: f(), sElev: f(), azim: f(), sAzim: f(), axis: Axis.LENGTH, L: 1, u: 0, tr: 0 };
}

export const FitOutcome = { OK: 0, NOT_CONVERGED: 1, FAILED: 2 } as const;
export type FitOutcomeCode = (typeof FitOutcome)[keyof typeof FitOutcome];

const MAX_ITERATIONS = 200;
const LN_V_MIN = Math.log(1e-3);
const LN_V_MAX = Math.log(4000);
const LN_RHO_MIN = Math.log(1);
const LN_RHO_MAX = Math.log(1e6);
const EPS_MAX = 1.5;
const BETA_MAX = 1.45;

/** The physical parameters (pass-model.ts P) of fit parameters q with relative-speed sign sgn. */
export function toPhysical(q: Float64Array, sgn: number, u: number, out: Float64Array): void {
  const beta = q[Q.beta]!;
  out[P.beta] = beta;
  out[P.w] = (u + sgn * Math.exp(q[Q.lnV]!)) / Math.cos(beta);
  out[P.xr] = q[Q.xr]!;
  out[P.rho] = Math.exp(q[Q.lnRho]!);
  out[P.eps] = q[Q.eps]!;
}

const phys = new Float64Array(PASS_PARAMS);

/** Normalised residuals (model - observed) / sigma into res; returns chi^2 (Infinity if the model breaks). */
export function residuals(d: PassData, q: Float64Array, sgn: number, res: Float64Array): number {
  toPhysical(q, sgn, d.u, phys);
  const beta = phys[P.beta]!;
  const cb = Math.cos(beta);
  const sb = Math.sin(beta);
  const w = phys[P.w]!;
  const rho = phys[P.rho]!;
  const eps = phys[P.eps]!;
  const x0 = phys[P.xr]!;
  const y0 = rho * Math.cos(eps);
  const rz = rho * Math.sin(eps);
  const vx = w * cb - d.u;
  const vy = w * sb;
  const axis = d.axis;
  const L = d.L;
  let chi2 = 0;
  let m = 0;
  for (let k = 0; k < d.n; k++) {
    // relativePosition, written out: the trigonometry above is shared by every mark
    const tau = d.t[k]! - d.tr;
    const rx = x0 + vx * tau;
    const ry = y0 + vy * tau;
    const e1 = (spanAngleTrig(axis, L, cb, sb, rx, ry, rz) - d.theta[k]!) / d.sTheta[k]!;
    res[m++] = e1;
    chi2 += e1 * e1;
    const el = d.elev[k]!;
    if (el === el) {
      const R = Math.sqrt(rx * rx + ry * ry + rz * rz);
      const e2 = (Math.asin(rz / R) - el) / d.sElev[k]!;
      res[m++] = e2;
      chi2 += e2 * e2;
    }
    const az = d.azim[k]!;
    if (az === az) {
      let da = Math.atan2(ry, rx) - az;
      if (da > Math.PI) da -= 2 * Math.PI;
      else if (da < -Math.PI) da += 2 * Math.PI;
      const e3 = da / d.sAzim[k]!;
      res[m++] = e3;
      chi2 += e3 * e3;
    }
  }
  return chi2 === chi2 ? chi2 : Number.POSITIVE_INFINITY;
}

/** How many residuals d gives. */
export function residualCount(d: PassData): number {
  let m = d.n;
  for (let k = 0; k < d.n; k++) {
    if (d.elev[k] === d.elev[k]) m++;
    if (d.azim[k] === d.azim[k]) m++;
  }
  return m;
}

/** Scratch, grown to the largest pass seen; one fit runs at a time. */
let res0 = new Float64Array(64);
let res1 = new Float64Array(64);
let jac = new Float64Array(64 * FIT_PARAMS);
const qTry = new Float64Array(FIT_PARAMS);
const A = new Float64Array(FIT_PARAMS * FIT_PARAMS);
const M = new Float64Array(FIT_PARAMS * FIT_PARAMS);
const g = new Float64Array(FIT_PARAMS);
const step = new Float64Array(FIT_PARAMS);
const freeIdx = new Int32Array(FIT_PARAMS);

function ensure(m: number): void {
  if (res0.length < m) {
    res0 = new Float64Array(m);
    res1 = new Float64Array(m);
    jac = new Float64Array(m * FIT_PARAMS);
  }
}

function clamp(q: Float64Array): void {
  q[Q.lnV] = Math.min(Math.max(q[Q.lnV]!, LN_V_MIN), LN_V_MAX);
  q[Q.lnRho] = Math.min(Math.max(q[Q.lnRho]!, LN_RHO_MIN), LN_RHO_MAX);
  q[Q.eps] = Math.min(Math.max(q[Q.eps]!, -EPS_MAX), EPS_MAX);
  q[Q.beta] = Math.min(Math.max(q[Q.beta]!, -BETA_MAX), BETA_MAX);
}

/** Finite-difference step of parameter j at q. */
function diffStep(q: Float64Array, j: number): number {
  if (j === Q.xr) return 1e-6 * (Math.abs(q[Q.xr]!) + Math.exp(q[Q.lnRho]!));
  return 1e-6;
}

/** Cholesky solve of the k x k system in M (row-major, stride FIT_PARAMS) for rhs g into step. */
function choleskySolve(k: number): boolean {
  for (let i = 0; i < k; i++) {
    for (let j = 0; j <= i; j++) {
      let s = M[i * FIT_PARAMS + j]!;
      for (let l = 0; l < j; l++) s -= M[i * FIT_PARAMS + l]! * M[j * FIT_PARAMS + l]!;
      if (i === j) {
        if (!(s > 0)) return false;
        M[i * FIT_PARAMS + i] = Math.sqrt(s);
      } else M[i * FIT_PARAMS + j] = s / M[j * FIT_PARAMS + j]!;
    }
  }
  for (let i = 0; i < k; i++) {
    let s = g[i]!;
    for (let l = 0; l < i; l++) s -= M[i * FIT_PARAMS + l]! * step[l]!;
    step[i] = s / M[i * FIT_PARAMS + i]!;
  }
  for (let i = k - 1; i >= 0; i--) {
    let s = step[i]!;
    for (let l = i + 1; l < k; l++) s -= M[l * FIT_PARAMS + i]! * step[l]!;
    step[i] = s / M[i * FIT_PARAMS + i]!;
  }
  return true;
}

/** Slots of a fit's report: chi^2, iterations, residual count. */
export const FIT_REPORT = { chi2: 0, iterations: 1, residuals: 2 } as const;

/**
 * How far a fit refines: a step whose predicted lowering of chi^2 is below this is the last. Full:
 * to rounding. A bootstrap draw stops at a tenth of a unit of chi^2, a shift of about a third of a
 * standard error along the worst-determined direction and far less along the others: small beside
 * the spread the draws measure, and it spares the crawl along the valley of an ill-settled pass.
 */
export const FIT_TOLERANCE = { FULL: 1e-9, BOOTSTRAP: 0.1 } as const;

/**
 * Levenberg-Marquardt from the start in q (refined in place), fitting the parameters whose bit is
 * set in `freeMask` (bit j for Q slot j). Writes FIT_REPORT into report.
 */
export function fitPass(d: PassData, q: Float64Array, sgn: number, freeMask: number, report: Float64Array, tolerance: number = FIT_TOLERANCE.FULL): FitOutcomeCode {
  const m = residualCount(d);
  ensure(m);
  let k = 0;
  for (let j = 0; j < FIT_PARAMS; j++) if (freeMask & (1 << j)) freeIdx[k++] = j;
  clamp(q);
  let chi2 = residuals(d, q, sgn, res0);
  if (!(chi2 < Number.POSITIVE_INFINITY)) return FitOutcome.FAILED;
  let lambda = 1e-3;
  let it = 0;
  let converged = false;
  while (it < MAX_ITERATIONS && !converged) {
    it++;
    // Jacobian columns of the free parameters, forward differences
    for (let a = 0; a < k; a++) {
      const j = freeIdx[a]!;
      const h = diffStep(q, j);
      const keep = q[j]!;
      q[j] = keep + h;
      residuals(d, q, sgn, res1);
      q[j] = keep;
      for (let i = 0; i < m; i++) jac[i * FIT_PARAMS + a] = (res1[i]! - res0[i]!) / h;
    }
    for (let a = 0; a < k; a++) {
      let ga = 0;
      for (let i = 0; i < m; i++) ga += jac[i * FIT_PARAMS + a]! * res0[i]!;
      g[a] = -ga;
      for (let b = 0; b <= a; b++) {
        let s = 0;
        for (let i = 0; i < m; i++) s += jac[i * FIT_PARAMS + a]! * jac[i * FIT_PARAMS + b]!;
        A[a * FIT_PARAMS + b] = s;
        A[b * FIT_PARAMS + a] = s;
      }
    }
    let accepted = false;
    while (!accepted) {
      for (let a = 0; a < k; a++) {
        for (let b = 0; b < k; b++) M[a * FIT_PARAMS + b] = A[a * FIT_PARAMS + b]!;
        M[a * FIT_PARAMS + a] = A[a * FIT_PARAMS + a]! * (1 + lambda) + 1e-12;
      }
      if (!choleskySolve(k)) {
        lambda *= 10;
        if (lambda > 1e12) return FitOutcome.FAILED;
        continue;
      }
      // the reduction of chi^2 the linear model promises: 2 step . g - step . A step
      let promised = 0;
      for (let a = 0; a < k; a++) {
        let As = 0;
        for (let b = 0; b < k; b++) As += A[a * FIT_PARAMS + b]! * step[b]!;
        promised += step[a]! * (2 * g[a]! - As);
      }
      for (let j = 0; j < FIT_PARAMS; j++) qTry[j] = q[j]!;
      for (let a = 0; a < k; a++) qTry[freeIdx[a]!]! += step[a]!;
      clamp(qTry);
      const chi2Try = residuals(d, qTry, sgn, res1);
      if (chi2Try <= chi2) {
        const gain = chi2 - chi2Try;
        for (let j = 0; j < FIT_PARAMS; j++) q[j] = qTry[j]!;
        const swap = res0;
        res0 = res1;
        res1 = swap;
        chi2 = chi2Try;
        lambda = Math.max(lambda / 3, 1e-9);
        accepted = true;
        if (gain <= 1e-10 * (1 + chi2) || promised < tolerance) converged = true;
      } else {
        lambda *= 5;
        if (lambda > 1e10) {
          // no step lowers chi^2 any more: at the minimum within rounding
          converged = true;
          break;
        }
      }
    }
  }
  report[FIT_REPORT.chi2] = chi2;
  report[FIT_REPORT.iterations] = it;
  report[FIT_REPORT.residuals] = m;
  return converged ? FitOutcome.OK : FitOutcome.NOT_CONVERGED;
}

/**
 * A start for the fit from the spans alone: the pseudo-range L / (2 tan(theta / 2)) is R^2 / rho' for
 * a length on a parallel pass and R for a square span, a quadratic in time either way (of R for the
 * first, of R^2 for the second); its vertex gives the closest approach and its curvature the relative
 * speed. Wingspans and heights take the square span's start. Writes q with the given eps and beta.
 */
export function startFromSpans(d: PassData, sgn: number, eps: number, beta: number, q: Float64Array): void {
  const n = d.n;
  // weighted least squares of y = a tau^2 + b tau + c, y the pseudo-range (or its square)
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let s4 = 0;
  let y0 = 0;
  let y1 = 0;
  let y2 = 0;
  let yMin = Number.POSITIVE_INFINITY;
  const squared = d.axis !== Axis.LENGTH;
  for (let i = 0; i < n; i++) {
    const r = d.L / (2 * Math.tan(d.theta[i]! / 2));
    const y = squared ? r * r : r;
    if (r < yMin) yMin = r;
    const rel = d.sTheta[i]! / d.theta[i]!;
    const wgt = 1 / (rel * rel * y * y);
    const tau = d.t[i]! - d.tr;
    const t2 = tau * tau;
    s0 += wgt;
    s1 += wgt * tau;
    s2 += wgt * t2;
    s3 += wgt * t2 * tau;
    s4 += wgt * t2 * t2;
    y0 += wgt * y;
    y1 += wgt * y * tau;
    y2 += wgt * y * t2;
  }
  // normal equations [s4 s3 s2; s3 s2 s1; s2 s1 s0] [a b c] = [y2 y1 y0], by Cramer's rule
  const det = s4 * (s2 * s0 - s1 * s1) - s3 * (s3 * s0 - s1 * s2) + s2 * (s3 * s1 - s2 * s2);
  let a = Number.NaN;
  let b = 0;
  let c = 0;
  if (Math.abs(det) > 0) {
    a = (y2 * (s2 * s0 - s1 * s1) - s3 * (y1 * s0 - s1 * y0) + s2 * (y1 * s1 - s2 * y0)) / det;
    b = (s4 * (y1 * s0 - s1 * y0) - y2 * (s3 * s0 - s1 * s2) + s2 * (s3 * y0 - y1 * s2)) / det;
    c = (s4 * (s2 * y0 - s1 * y1) - s3 * (s3 * y0 - y1 * s2) + y2 * (s3 * s1 - s2 * s2)) / det;
  }
  let V: number;
  let rho: number;
  let tau0: number;
  if (a > 0) {
    tau0 = -b / (2 * a);
    const vertex = c - (b * b) / (4 * a);
    if (squared) {
      rho = vertex > 0 ? Math.sqrt(vertex) : yMin;
      V = Math.sqrt(a);
    } else {
      rho = vertex > 0 ? vertex : yMin;
      V = Math.sqrt(a * rho);
    }
  } else {
    // no upward curvature: a distant or short pass; start slow and let the fit decide
    tau0 = 0;
    rho = yMin;
    V = Math.max(1, 0.1 * d.u);
  }
  q[Q.lnV] = Math.log(Math.max(V, 1e-3));
  q[Q.xr] = -sgn * V * tau0;
  q[Q.lnRho] = Math.log(Math.max(rho, 1));
  q[Q.eps] = eps;
  q[Q.beta] = beta;
}

import { InputError } from './errors';
import {
  N_PARAMS,
  P_FAR,
  P_FORWARD,
  P_LEFT,
  P_PITCH,
  P_ROLL,
  P_YAW,
  GROUND_MIN_DEPRESSION,
  cameraAxes,
  checkLandscapeCamera,
  flowBasis,
  rayOf,
  warpPixel,
  type LandscapeCamera,
} from './ground-motion';
import type { LandscapeFrame } from './landscape-frame';
import { selectPatches, trackPatches, type Patches, type Tracks } from './landscape-patches';
import { invertSymmetric, solveSymmetric } from './small-solve';

/*
 * The coarse stage of the landscape turn (turn-fit.ts runs it, then turn-dense.ts). Patches of the landscape are
 * followed from frame A to frame B (landscape-patches.ts); the motion model of ground-motion.ts
 * (turn, travel, one shared depth for everything above the horizon) is fitted to where they went,
 * robustly: each patch's miss in px weighs it down with a Cauchy function of the misses' robust
 * spread, so a car, the object, a mast at another depth or a lost patch bends only itself.
 *
 * The ground patches carry the separation of turn and travel: each one's depth follows from its row
 * (flat ground, the camera's height and pitch), so how their motion changes with the row below the
 * horizon is the travel and what is left at the horizon is the turn.
 *
 * Without a start, the first pass follows the patches from where they stood; the near ground, which
 * slides tens of pixels, is lost or misfits there, but the far ground and the skyline give the turn
 * and a first travel. Each later pass starts every patch where the last fit puts it, which catches
 * the near ground too. With a start (the previous pair's motion), two passes do.
 */

export interface ExcludeRect {
  left: number;
  top: number;
  right: number;
  bottom: number;
}

export interface StartOptions {
  /** starting motion (e.g. the previous pair's theta); default no motion */
  init?: ArrayLike<number>;
  /** video-px rectangles left out (the object, anything moving with it) */
  exclude?: ExcludeRect[];
  /** hold the far layer's inverse depth (camera height / distance) instead of fitting it */
  farInvDepth?: number;
  /** follow-and-fit passes (default 4 without a start, 2 with one) */
  passes?: number;
}

export type StartOutcome =
  | { ok: false; code: 'no-ground'; reason: string }
  | {
      ok: true;
      /** [dYaw, dPitch, dRoll, forward, left, farInvDepth], see ground-motion.ts */
      theta: Float64Array;
      groundPatches: number;
      inlierGroundPatches: number;
      farPatches: number;
      /** robust spread of the patches' misses, px of the working level */
      missPx: number;
    };

/** Fewer followed patches than this leave the start where it was. */
const MIN_PATCHES_TO_FIT = 6;
/** Cauchy scale over the misses' robust sigma (95 % efficiency under normal errors, common practice). */
const CAUCHY_C = 2.385;
/** px: the spread is never taken below this (noise-free pictures would give 0) */
const MIN_MISS_PX = 0.03;
/** A patch weighted above this is an inlier. */
const INLIER_WEIGHT = 0.5;
/** Patches whose window reaches this near the horizon see two depths at once: left out. */
const HORIZON_MARGIN_PX = 1.5;
const FIT_STEPS = 12;
/** the far layer's pull toward "infinitely far", in px of miss per unit of inverse depth */
const FAR_PRIOR = 20;

interface PatchSet {
  p: Patches;
  ground: Uint8Array;
}

export function startTurn(a: LandscapeFrame, b: LandscapeFrame, cam: LandscapeCamera, opts: StartOptions = {}): StartOutcome {
  checkLandscapeCamera(cam);
  if (a.levels.length !== b.levels.length || a.videoWidth !== b.videoWidth || a.videoHeight !== b.videoHeight) {
    throw new InputError('frame B', `${b.videoWidth}x${b.videoHeight}`, `the same size and pyramid as frame A (${a.videoWidth}x${a.videoHeight})`);
  }
  const theta = new Float64Array(N_PARAMS);
  if (opts.init) {
    if (opts.init.length !== N_PARAMS) throw new InputError('init', opts.init.length, `${N_PARAMS} motion parameters`);
    for (let k = 0; k < N_PARAMS; k++) theta[k] = Number.isFinite(opts.init[k]) ? opts.init[k]! : 0;
  }
  const frozenFar = opts.farInvDepth !== undefined;
  if (frozenFar) theta[P_FAR] = opts.farInvDepth!;
  const l0 = a.levels[0]!;
  const lc: LandscapeCamera = { ...cam, focalPx: cam.focalPx / l0.scale, cx: cam.cx / l0.scale, cy: cam.cy / l0.scale };
  const axesA = cameraAxes(0, cam.pitchRad, cam.rollRad, new Float64Array(9));
  if (!groundInView(lc, axesA, l0.width, l0.height)) {
    return { ok: false, code: 'no-ground', reason: 'no ground in view: the whole picture lies above the horizon (sky only), so nothing shows the turn' };
  }
  const set = choosePatches(a, lc, axesA, opts.exclude ?? []);
  let nGround = 0;
  for (let k = 0; k < set.p.n; k++) nGround += set.ground[k]!;
  const passes = opts.passes ?? (opts.init ? 2 : 4);
  const gx = new Float64Array(set.p.n);
  const gy = new Float64Array(set.p.n);
  let fit: FitOutcome = { cov: new Float64Array(N_PARAMS * N_PARAMS).fill(Infinity), inlierGround: 0, scale: Infinity };
  if (set.p.n >= MIN_PATCHES_TO_FIT) {
    for (let pass = 0; pass < passes; pass++) {
      const guided = pass > 0 || opts.init !== undefined;
      predict(lc, axesA, theta, set.p, gx, gy);
      const tracks = trackPatches(a, b, set.p, gx, gy, guided ? { topLevel: 1 } : {});
      voteTravel(lc, axesA, set, tracks, theta);
      fit = robustFit(lc, axesA, set, tracks, theta, frozenFar);
    }
  }
  return { ok: true, theta, groundPatches: nGround, inlierGroundPatches: fit.inlierGround, farPatches: set.p.n - nGround, missPx: fit.scale };
}

/** Whether any corner or edge midpoint of the picture looks below the horizon. */
function groundInView(cam: LandscapeCamera, axes: Float64Array, w: number, h: number): boolean {
  const ray = new Float64Array(3);
  for (const [x, y] of [
    [0, h],
    [w / 2, h],
    [w, h],
    [0, h / 2],
    [w, h / 2],
  ] as const) {
    rayOf(axes, cam.focalPx, cam.cx, cam.cy, x, y, ray);
    if (ray[2]! < -GROUND_MIN_DEPRESSION * Math.hypot(ray[0]!, ray[1]!, ray[2]!)) return true;
  }
  return false;
}

function choosePatches(a: LandscapeFrame, cam: LandscapeCamera, axesA: Float64Array, rects: ExcludeRect[]): PatchSet {
  const l0 = a.levels[0]!;
  const s = l0.scale;
  const all = selectPatches(l0, { exclude: rects.map((r) => ({ left: r.left / s, top: r.top / s, right: r.right / s, bottom: r.bottom / s })) });
  const keep: number[] = [];
  const ground: number[] = [];
  const ray = new Float64Array(3);
  // the horizon row at a column: where the ray's elevation is 0, found from the ray's vertical slope
  for (let k = 0; k < all.n; k++) {
    const x = all.x[k]!;
    const y = all.y[k]!;
    rayOf(axesA, cam.focalPx, cam.cx, cam.cy, x, y, ray);
    const z0 = ray[2]!;
    rayOf(axesA, cam.focalPx, cam.cx, cam.cy, x, y + 1, ray);
    const dz = ray[2]! - z0;
    const yh = dz !== 0 ? y - z0 / dz : -Infinity;
    if (Math.abs(y - yh) < 4 + HORIZON_MARGIN_PX) continue;
    keep.push(k);
    ground.push(y > yh ? 1 : 0);
  }
  const p: Patches = { n: keep.length, x: new Float64Array(keep.length), y: new Float64Array(keep.length), strength: new Float64Array(keep.length) };
  keep.forEach((k, i) => {
    p.x[i] = all.x[k]!;
    p.y[i] = all.y[k]!;
    p.strength[i] = all.strength[k]!;
  });
  return { p, ground: Uint8Array.from(ground) };
}

/** Where the model puts each patch centre in frame B; a patch the model puts behind B stays put. */
function predict(cam: LandscapeCamera, axesA: Float64Array, theta: Float64Array, p: Patches, gx: Float64Array, gy: Float64Array): void {
  predictInto(cam, axesA, theta, p, gx, gy);
  for (let k = 0; k < p.n; k++) {
    if (Number.isNaN(gx[k]!)) {
      gx[k] = p.x[k]!;
      gy[k] = p.y[k]!;
    }
  }
}

/** Travel votes within this share of the vote's length (or 0.02 camera heights) agree. */
const VOTE_RADIUS = 0.1;
const MIN_VOTES = 6;

/**
 * The travel by vote: every followed ground patch, its turn taken out as the current motion has it,
 * says on its own which travel moved it (two equations, two unknowns: its motion per unit of travel
 * forward and left is known from its depth). The travel most patches agree on wins, before the fit
 * weighs them: a car, whose corners agree among themselves, is then a minority rather than a start.
 */
function voteTravel(cam: LandscapeCamera, axesA: Float64Array, set: PatchSet, tr: Tracks, theta: Float64Array): void {
  const n = set.p.n;
  const du = new Float64Array(N_PARAMS);
  const dv = new Float64Array(N_PARAMS);
  const scratch = new Float64Array(3);
  const rot = Float64Array.from(theta);
  rot[P_FORWARD] = 0;
  rot[P_LEFT] = 0;
  const gx = new Float64Array(n);
  const gy = new Float64Array(n);
  predictInto(cam, axesA, rot, set.p, gx, gy);
  const vf: number[] = [];
  const vl: number[] = [];
  for (let k = 0; k < n; k++) {
    if (set.ground[k] !== 1 || !Number.isFinite(tr.xb[k]!) || !Number.isFinite(gx[k]!)) continue;
    flowBasis(cam, axesA, set.p.x[k]!, set.p.y[k]!, 0, 0, 0, du, dv, scratch);
    const a = du[P_FORWARD]!;
    const b = du[P_LEFT]!;
    const c = dv[P_FORWARD]!;
    const d = dv[P_LEFT]!;
    const det = a * d - b * c;
    // a patch whose two travel directions move it alike cannot tell them apart
    if (!(Math.abs(det) > 0.05 * (a * a + b * b + c * c + d * d))) continue;
    const mu = tr.xb[k]! - gx[k]!;
    const mv = tr.yb[k]! - gy[k]!;
    vf.push((d * mu - b * mv) / det);
    vl.push((a * mv - c * mu) / det);
  }
  if (vf.length < MIN_VOTES) return;
  let best = -1;
  let bestCount = 0;
  for (let i = 0; i < vf.length; i++) {
    const r = Math.max(0.02, VOTE_RADIUS * Math.hypot(vf[i]!, vl[i]!));
    let count = 0;
    for (let j = 0; j < vf.length; j++) if (Math.hypot(vf[j]! - vf[i]!, vl[j]! - vl[i]!) <= r) count++;
    if (count > bestCount) {
      bestCount = count;
      best = i;
    }
  }
  if (bestCount < MIN_VOTES) return;
  const r = Math.max(0.02, VOTE_RADIUS * Math.hypot(vf[best]!, vl[best]!));
  let sf = 0;
  let sl = 0;
  let m = 0;
  for (let j = 0; j < vf.length; j++) {
    if (Math.hypot(vf[j]! - vf[best]!, vl[j]! - vl[best]!) > r) continue;
    sf += vf[j]!;
    sl += vl[j]!;
    m++;
  }
  theta[P_FORWARD] = sf / m;
  theta[P_LEFT] = sl / m;
}

interface FitOutcome {
  cov: Float64Array;
  inlierGround: number;
  scale: number;
}

/** Misses (model minus track, px) of every followed patch under theta; NaN for lost patches. */
function misses(cam: LandscapeCamera, axesA: Float64Array, set: PatchSet, tr: Tracks, theta: Float64Array, ex: Float64Array, ey: Float64Array): void {
  predictInto(cam, axesA, theta, set.p, ex, ey);
  for (let k = 0; k < set.p.n; k++) {
    ex[k] = ex[k]! - tr.xb[k]!;
    ey[k] = ey[k]! - tr.yb[k]!;
  }
}

function predictInto(cam: LandscapeCamera, axesA: Float64Array, theta: Float64Array, p: Patches, gx: Float64Array, gy: Float64Array): void {
  const axesB = cameraAxes(theta[P_YAW]!, cam.pitchRad + theta[P_PITCH]!, cam.rollRad + theta[P_ROLL]!, new Float64Array(9));
  const out = new Float64Array(3);
  for (let k = 0; k < p.n; k++) {
    if (warpPixel(cam, axesA, axesB, theta, p.x[k]!, p.y[k]!, out)) {
      gx[k] = out[0]!;
      gy[k] = out[1]!;
    } else {
      gx[k] = NaN;
      gy[k] = NaN;
    }
  }
}

function robustScale(ex: Float64Array, ey: Float64Array): number {
  const m: number[] = [];
  for (let k = 0; k < ex.length; k++) {
    const e = Math.hypot(ex[k]!, ey[k]!);
    if (Number.isFinite(e)) m.push(e);
  }
  if (m.length === 0) return Infinity;
  m.sort((x, y) => x - y);
  // the median length of a 2-D normal miss is 1.1774 sigma
  return Math.max(MIN_MISS_PX, m[m.length >> 1]! / 1.1774);
}

function robustFit(cam: LandscapeCamera, axesA: Float64Array, set: PatchSet, tr: Tracks, theta: Float64Array, frozenFar: boolean): FitOutcome {
  const n = set.p.n;
  const ex = new Float64Array(n);
  const ey = new Float64Array(n);
  const jx = new Float64Array(n * N_PARAMS);
  const jy = new Float64Array(n * N_PARAMS);
  const wgt = new Float64Array(n);
  const H = new Float64Array(N_PARAMS * N_PARAMS);
  const g = new Float64Array(N_PARAMS);
  const delta = new Float64Array(N_PARAMS);
  const tx = new Float64Array(n);
  const ty = new Float64Array(n);
  const steps = [1e-5, 1e-5, 1e-5, 1e-3, 1e-3, 1e-5];
  let scale = Infinity;
  for (let it = 0; it < FIT_STEPS; it++) {
    misses(cam, axesA, set, tr, theta, ex, ey);
    scale = robustScale(ex, ey);
    const c = CAUCHY_C * scale;
    for (let k = 0; k < n; k++) {
      const e = Math.hypot(ex[k]!, ey[k]!);
      wgt[k] = Number.isFinite(e) ? 1 / (1 + (e / c) * (e / c)) : 0;
    }
    // numerical Jacobian of the exact model: the patches are few, and it keeps the far layer exact
    for (let q = 0; q < N_PARAMS; q++) {
      const keep = theta[q]!;
      theta[q] = keep + steps[q]!;
      predictInto(cam, axesA, theta, set.p, tx, ty);
      theta[q] = keep;
      for (let k = 0; k < n; k++) {
        jx[k * N_PARAMS + q] = (tx[k]! - (ex[k]! + tr.xb[k]!)) / steps[q]!;
        jy[k * N_PARAMS + q] = (ty[k]! - (ey[k]! + tr.yb[k]!)) / steps[q]!;
      }
    }
    H.fill(0);
    g.fill(0);
    for (let k = 0; k < n; k++) {
      const w = wgt[k]!;
      if (!(w > 0)) continue;
      const o = k * N_PARAMS;
      for (let r = 0; r < N_PARAMS; r++) {
        const ar = jx[o + r]!;
        const br = jy[o + r]!;
        if (!Number.isFinite(ar) || !Number.isFinite(br)) continue;
        g[r] = g[r]! - w * (ar * ex[k]! + br * ey[k]!);
        for (let q = r; q < N_PARAMS; q++) H[r * N_PARAMS + q] = H[r * N_PARAMS + q]! + w * (ar * jx[o + q]! + br * jy[o + q]!);
      }
    }
    for (let r = 0; r < N_PARAMS; r++) for (let q = 0; q < r; q++) H[r * N_PARAMS + q] = H[q * N_PARAMS + r]!;
    // a weak pull of the far layer toward infinitely far: it keeps the layer defined with a bare sky
    const fp = FAR_PRIOR * FAR_PRIOR;
    H[P_FAR * N_PARAMS + P_FAR] = H[P_FAR * N_PARAMS + P_FAR]! + fp;
    g[P_FAR] = g[P_FAR]! - fp * theta[P_FAR]!;
    if (frozenFar) freeze(H, g, P_FAR);
    for (let r = 0; r < N_PARAMS; r++) H[r * N_PARAMS + r] = H[r * N_PARAMS + r]! * (1 + 1e-9) + 1e-12;
    if (it === FIT_STEPS - 1) break;
    if (!solveSymmetric(H, g, N_PARAMS, delta)) break;
    let small = true;
    for (let r = 0; r < N_PARAMS; r++) {
      theta[r] = theta[r]! + delta[r]!;
      if (Math.abs(delta[r]!) > steps[r]! * 0.01) small = false;
    }
    theta[P_FAR] = Math.max(0, theta[P_FAR]!);
    if (small && it > 2) {
      it = FIT_STEPS - 2;
    }
  }
  // covariance: the misses' robust spread through the weighted normal equations
  const inv = invertSymmetric(H, N_PARAMS);
  const cov = new Float64Array(N_PARAMS * N_PARAMS);
  if (inv) for (let r = 0; r < N_PARAMS * N_PARAMS; r++) cov[r] = inv[r]! * scale * scale;
  else cov.fill(Infinity);
  let inlierGround = 0;
  for (let k = 0; k < n; k++) if (set.ground[k] === 1 && wgt[k]! > INLIER_WEIGHT) inlierGround++;
  return { cov, inlierGround, scale };
}

function freeze(H: Float64Array, g: Float64Array, q: number): void {
  for (let c = 0; c < N_PARAMS; c++) H[q * N_PARAMS + c] = H[c * N_PARAMS + q] = 0;
  H[q * N_PARAMS + q] = 1;
  g[q] = 0;
}

import { N_PARAMS, P_FAR, P_FORWARD, P_LEFT, P_PITCH, P_ROLL, P_YAW, cameraAxes, flowBasis, rayOf, type LandscapeCamera } from './ground-motion';
import { cubicAt, thinLineMask, type LandscapeFrame, type LumaLevel } from './landscape-frame';
import { sandwich, solveSymmetric } from './small-solve';

/*
 * The fine stage of the landscape turn: a direct fit of the motion model (ground-motion.ts) to the
 * pixels themselves, started from the patches' fit (turn-start.ts) and run over the finest pyramid
 * levels. Every textured pixel of frame A says how far frame B must be shifted under it along its
 * gradient, so a skyline or a field edge with texture in one direction only (which no patch could
 * follow) still tells its share, each pixel with its own ground depth.
 *
 * Robustness: a Cauchy weight per pixel (a sliver that the rasteriser or the codec renders
 * differently in each frame, an edge of something moving) and per block (a car, the object, a mast
 * at another depth) from its misfit in px over the blocks' median. The turn's uncertainty is the
 * sandwich of the blocks' score vectors (pixels within a block are not independent), so it does not
 * shrink with the pixel count.
 */

export interface DenseRect {
  left: number;
  top: number;
  right: number;
  bottom: number;
}

export interface DenseOptions {
  /** video-px rectangles left out */
  exclude?: DenseRect[];
  /** block side in video px for the robust weights (default 32) */
  blockPx?: number;
  /** pyramid levels used, from the finest (default 2) */
  levels?: number;
  /** finest level used (default 0, the working level; 1 is four times faster and half as sharp) */
  finestLevel?: number;
  /** Gauss-Newton steps per level (default 6) */
  iterations?: number;
  /**
   * give every block above the horizon its own depth (default false: the far layer's shared depth in
   * theta stands for all of it)
   */
  farPerBlock?: boolean;
  /** leave out pixels on lines at most three pixels wide (default true) */
  dropThinLines?: boolean;
}

/** Textured pixels used per level at most. */
const MAX_PIXELS = 40000;
/** Squared gradient (luma per px) below which a pixel carries no motion information. */
const MIN_GRAD2 = 0.25;
/** Cauchy scale over the robust sigma (95 % efficiency under normal errors, common practice). */
const CAUCHY_C = 2.385;
/** A block weighted above this is an inlier. */
const INLIER_WEIGHT = 0.5;

interface LevelPixels {
  n: number;
  x: Float32Array;
  y: Float32Array;
  ia: Float32Array;
  block: Int32Array;
  ground: Uint8Array;
  /** A-frame ray scaled to the ground (ground) or unit (far) */
  q: Float64Array;
  /** gradient times basis: yaw, pitch, roll, forward, left (far pixels: per unit far inverse depth) */
  jac: Float64Array;
  groundInfo: Float64Array;
  nBlocks: number;
}

export interface DenseOutcome {
  cov: Float64Array;
  solved: boolean;
  groundBlocks: number;
  inlierGroundBlocks: number;
  misfit: number;
}

/** Refines theta in place over the finest levels of the two frames' pyramids. */
export function refineDense(a: LandscapeFrame, b: LandscapeFrame, cam: LandscapeCamera, theta: Float64Array, opts: DenseOptions = {}): DenseOutcome {
  const axesA = cameraAxes(0, cam.pitchRad, cam.rollRad, new Float64Array(9));
  const blockPx = opts.blockPx ?? 32;
  // the shared far depth is the start's business: it stays as it came
  const frozen = [false, false, false, false, false, true];
  const perBlock = opts.farPerBlock === true;
  let last: LevelOutcome | null = null;
  const finest = Math.min(a.levels.length - 1, opts.finestLevel ?? 0);
  for (let l = Math.min(a.levels.length - 1, finest + (opts.levels ?? 2) - 1); l >= finest; l--) {
    const la = a.levels[l]!;
    const lc = levelCamera(cam, la.scale);
    const px = selectPixels(la, lc, axesA, Math.max(4, Math.round(blockPx / la.scale)), opts.exclude ?? [], opts.dropThinLines !== false);
    last = iterateLevel(px, b.levels[l]!, lc, theta, opts.iterations ?? 6, frozen, perBlock);
  }
  return last!;
}

function levelCamera(cam: LandscapeCamera, scale: number): LandscapeCamera {
  return { focalPx: cam.focalPx / scale, cx: cam.cx / scale, cy: cam.cy / scale, pitchRad: cam.pitchRad, rollRad: cam.rollRad };
}

function excluded(rects: DenseRect[], xv: number, yv: number): boolean {
  for (const r of rects) if (xv >= r.left && xv < r.right && yv >= r.top && yv < r.bottom) return true;
  return false;
}

function selectPixels(lv: LumaLevel, cam: LandscapeCamera, axesA: Float64Array, block: number, rects: DenseRect[], dropThin: boolean): LevelPixels {
  const { width: w, height: h, data: d } = lv;
  const nbx = Math.ceil(w / block);
  const nBlocks = nbx * Math.ceil(h / block);
  let n = 0;
  const grad2 = new Float32Array(w * h);
  const thin = dropThin ? thinLineMask(lv) : new Uint8Array(w * h);
  for (let j = 1; j < h - 1; j++) {
    for (let i = 1; i < w - 1; i++) {
      const m = j * w + i;
      if (thin[m] === 1) continue;
      const gx = 0.5 * (d[m + 1]! - d[m - 1]!);
      const gy = 0.5 * (d[m + w]! - d[m - w]!);
      const g2 = gx * gx + gy * gy;
      if (g2 >= MIN_GRAD2 && (rects.length === 0 || !excluded(rects, (i + 0.5) * lv.scale, (j + 0.5) * lv.scale))) {
        grad2[m] = g2;
        n++;
      }
    }
  }
  // beyond a budget of pixels, every stride-th: the blocks' sandwich keeps the uncertainty honest, and
  // the time per pair stays bounded on a busy landscape
  const stride = Math.max(1, Math.ceil(n / MAX_PIXELS));
  if (stride > 1) {
    let seen = 0;
    let kept = 0;
    for (let m = 0; m < w * h; m++) {
      if (grad2[m] === 0) continue;
      if (seen++ % stride === 0) kept++;
      else grad2[m] = 0;
    }
    n = kept;
  }
  const px: LevelPixels = {
    n,
    x: new Float32Array(n),
    y: new Float32Array(n),
    ia: new Float32Array(n),
    block: new Int32Array(n),
    ground: new Uint8Array(n),
    q: new Float64Array(3 * n),
    jac: new Float64Array(5 * n),
    groundInfo: new Float64Array(nBlocks),
    nBlocks,
  };
  const du = new Float64Array(N_PARAMS);
  const dv = new Float64Array(N_PARAMS);
  const ray = new Float64Array(3);
  let k = 0;
  for (let j = 1; j < h - 1; j++) {
    for (let i = 1; i < w - 1; i++) {
      const m = j * w + i;
      if (grad2[m] === 0) continue;
      const x = i + 0.5;
      const y = j + 0.5;
      const gx = 0.5 * (d[m + 1]! - d[m - 1]!);
      const gy = 0.5 * (d[m + w]! - d[m - w]!);
      // unit travel and unit far depth: the far pixels' travel columns are scaled per step
      const ground = flowBasis(cam, axesA, x, y, 0, 0, 1, du, dv, ray);
      rayOf(axesA, cam.focalPx, cam.cx, cam.cy, x, y, ray);
      const s = ground ? 1 / -ray[2]! : 1 / Math.hypot(ray[0]!, ray[1]!, ray[2]!);
      px.x[k] = x;
      px.y[k] = y;
      px.ia[k] = d[m]!;
      const bl = Math.floor(j / block) * nbx + Math.floor(i / block);
      px.block[k] = bl;
      px.ground[k] = ground ? 1 : 0;
      px.q[3 * k] = ray[0]! * s;
      px.q[3 * k + 1] = ray[1]! * s;
      px.q[3 * k + 2] = ray[2]! * s;
      for (let c = 0; c < 5; c++) px.jac[5 * k + c] = gx * du[c]! + gy * dv[c]!;
      // the turn is read from horizontal motion: a block's share of it is its yaw information
      if (ground) px.groundInfo[bl] = px.groundInfo[bl]! + px.jac[5 * k]! * px.jac[5 * k]!;
      k++;
    }
  }
  return px;
}

interface LevelOutcome {
  cov: Float64Array;
  solved: boolean;
  groundBlocks: number;
  inlierGroundBlocks: number;
  misfit: number;
}

function iterateLevel(px: LevelPixels, lb: LumaLevel, cam: LandscapeCamera, theta: Float64Array, iterations: number, frozen: readonly boolean[], perBlock: boolean): LevelOutcome {
  const nb = px.nBlocks;
  const err = new Float64Array(nb);
  const info = new Float64Array(nb);
  const weight = new Float64Array(nb).fill(1);
  const score = new Float64Array(nb * N_PARAMS);
  const H = new Float64Array(N_PARAMS * N_PARAMS);
  const g = new Float64Array(N_PARAMS);
  const J = new Float64Array(N_PARAMS);
  const axesB = new Float64Array(9);
  const delta = new Float64Array(N_PARAMS);
  const f = cam.focalPx;
  // the cubic reads two pixels either side
  const xmax = lb.width - 2.5;
  const ymax = lb.height - 2.5;
  let solved = false;
  // every block above the horizon has its own depth: a skyline, a tower and a mast stand at
  // different distances, and one shared far depth would let the strongest of them set the turn
  const kb = new Float64Array(nb).fill(theta[P_FAR]!);
  const hkk = new Float64Array(nb);
  const gk = new Float64Array(nb);
  const hkt = new Float64Array(nb * N_PARAMS);
  const hist = new Uint32Array(HIST_BINS);
  // no outliers are known before the first step: a wide scale
  let pixScale = CAUCHY_C * 20;
  for (let it = 0; it <= iterations; it++) {
    const final = it === iterations;
    cameraAxes(theta[P_YAW]!, cam.pitchRad + theta[P_PITCH]!, cam.rollRad + theta[P_ROLL]!, axesB);
    const tF = theta[P_FORWARD]!;
    const tL = theta[P_LEFT]!;
    H.fill(0);
    hkk.fill(0);
    gk.fill(0);
    hkt.fill(0);
    g.fill(0);
    hist.fill(0);
    err.fill(0);
    info.fill(0);
    if (final) score.fill(0);
    for (let p = 0; p < px.n; p++) {
      const ground = px.ground[p] === 1;
      const bl = px.block[p]!;
      const kt = ground ? 1 : kb[bl]!;
      const qx = px.q[3 * p]! - kt * tF;
      const qy = px.q[3 * p + 1]! - kt * tL;
      const qz = px.q[3 * p + 2]!;
      const Z = qx * axesB[6]! + qy * axesB[7]! + qz * axesB[8]!;
      if (!(Z > 1e-9)) continue;
      const xb = cam.cx + (f * (qx * axesB[0]! + qy * axesB[1]! + qz * axesB[2]!)) / Z;
      const yb = cam.cy - (f * (qx * axesB[3]! + qy * axesB[4]! + qz * axesB[5]!)) / Z;
      if (!(xb >= 1.5 && xb < xmax && yb >= 1.5 && yb < ymax)) continue;
      const r = cubicAt(lb, xb, yb) - px.ia[p]!;
      const o = 5 * p;
      J[P_YAW] = px.jac[o]!;
      J[P_PITCH] = px.jac[o + 1]!;
      J[P_ROLL] = px.jac[o + 2]!;
      J[P_FORWARD] = kt * px.jac[o + 3]!;
      J[P_LEFT] = kt * px.jac[o + 4]!;
      J[P_FAR] = 0;
      const jk = ground ? 0 : tF * px.jac[o + 3]! + tL * px.jac[o + 4]!;
      const ar = r < 0 ? -r : r;
      {
        const hb = ar >= HIST_TOP ? HIST_BINS - 1 : Math.floor(ar * (HIST_BINS / HIST_TOP));
        hist[hb] = hist[hb]! + 1;
      }
      const rs = ar / pixScale;
      const wgt = weight[bl]! / (1 + rs * rs);
      err[bl] = err[bl]! + r * r;
      // the gradient's squared length, through the yaw and pitch columns' flow (about f px per rad)
      info[bl] = info[bl]! + (J[P_YAW]! * J[P_YAW]! + J[P_PITCH]! * J[P_PITCH]!) / (f * f);
      if (wgt > 0) {
        for (let r1 = 0; r1 < N_PARAMS; r1++) {
          const wj = wgt * J[r1]!;
          g[r1] = g[r1]! - wj * r;
          for (let c = r1; c < N_PARAMS; c++) H[r1 * N_PARAMS + c] = H[r1 * N_PARAMS + c]! + wj * J[c]!;
        }
        if (!ground && perBlock) {
          const wk = wgt * jk;
          hkk[bl] = hkk[bl]! + wk * jk;
          gk[bl] = gk[bl]! - wk * r;
          for (let c = 0; c < N_PARAMS; c++) hkt[bl * N_PARAMS + c] = hkt[bl * N_PARAMS + c]! + wk * J[c]!;
        }
      }
      if (final) for (let c = 0; c < N_PARAMS; c++) score[bl * N_PARAMS + c] = score[bl * N_PARAMS + c]! + wgt * J[c]! * r;
    }
    for (let r1 = 0; r1 < N_PARAMS; r1++) for (let c = 0; c < r1; c++) H[r1 * N_PARAMS + c] = H[c * N_PARAMS + r1]!;
    // the blocks' own depths are eliminated (Schur complement): what is left of a far block is only
    // what its depth cannot explain; a weak pull toward "infinitely far" keeps a bare one defined
    for (let b = 0; b < nb; b++) {
      if (!(hkk[b]! > 0)) continue;
      const d = hkk[b]! * (1 + FAR_PULL) + 1e-12;
      gk[b] = gk[b]! - hkk[b]! * FAR_PULL * kb[b]!;
      const o = b * N_PARAMS;
      for (let r1 = 0; r1 < N_PARAMS; r1++) {
        g[r1] = g[r1]! - (hkt[o + r1]! * gk[b]!) / d;
        for (let c = 0; c < N_PARAMS; c++) H[r1 * N_PARAMS + c] = H[r1 * N_PARAMS + c]! - (hkt[o + r1]! * hkt[o + c]!) / d;
      }
      hkk[b] = d;
    }
    for (let k = 0; k < N_PARAMS; k++) {
      if (!frozen[k]) continue;
      for (let c = 0; c < N_PARAMS; c++) H[k * N_PARAMS + c] = H[c * N_PARAMS + k] = 0;
      H[k * N_PARAMS + k] = 1;
      g[k] = 0;
    }
    updateWeights(err, info, weight);
    pixScale = CAUCHY_C * Math.max(MIN_PIXEL_SIGMA, 1.4826 * histMedian(hist));
    if (final) {
      for (let b = 0; b < nb; b++) {
        if (!(hkk[b]! > 0)) continue;
        // the block's score after its depth has taken its share (gk is minus the depth's score)
        for (let c = 0; c < N_PARAMS; c++) score[b * N_PARAMS + c] = score[b * N_PARAMS + c]! + (hkt[b * N_PARAMS + c]! * gk[b]!) / hkk[b]!;
      }
      const cov = sandwich(H, score, nb, N_PARAMS);
      solved = cov !== null;
      return { cov: cov ?? new Float64Array(N_PARAMS * N_PARAMS).fill(Infinity), solved, ...blockCounts(px, weight, f), misfit: weightedMisfit(err, info, weight) };
    }
    for (let k = 0; k < N_PARAMS; k++) H[k * N_PARAMS + k] = H[k * N_PARAMS + k]! * 1.0001 + 1e-12;
    if (!solveSymmetric(H, g, N_PARAMS, delta)) break;
    for (let k = 0; k < N_PARAMS; k++) theta[k] = theta[k]! + delta[k]!;
    for (let b = 0; b < nb; b++) {
      if (!(hkk[b]! > 0)) continue;
      let s1 = gk[b]!;
      for (let c = 0; c < N_PARAMS; c++) s1 -= hkt[b * N_PARAMS + c]! * delta[c]!;
      kb[b] = Math.min(0.1, Math.max(0, kb[b]! + s1 / hkk[b]!));
    }
    // settled (the step moves no pixel by a thousandth): the next round is the last, for the figures
    const rotPx = (Math.abs(delta[P_YAW]!) + Math.abs(delta[P_PITCH]!) + Math.abs(delta[P_ROLL]!)) * f;
    const travPx = (Math.abs(delta[P_FORWARD]!) + Math.abs(delta[P_LEFT]!)) * f * 0.05;
    if (rotPx + travPx < SETTLED_PX && it < iterations - 1) it = iterations - 1;
  }
  return { cov: new Float64Array(N_PARAMS * N_PARAMS).fill(Infinity), solved: false, ...blockCounts(px, weight, f), misfit: NaN };
}

/** px: a step that moves nothing by more than this ends the level's rounds */
const SETTLED_PX = 1e-3;
/** relative pull of a far block's depth toward infinitely far */
const FAR_PULL = 1e-3;
const HIST_BINS = 512;
const HIST_TOP = 51.2;
/** luma: the 8-bit rounding of a frame alone gives 0.3 */
const MIN_PIXEL_SIGMA = 0.5;

function histMedian(hist: Uint32Array): number {
  let total = 0;
  for (let b = 0; b < hist.length; b++) total += hist[b]!;
  let acc = 0;
  for (let b = 0; b < hist.length; b++) {
    acc += hist[b]!;
    if (2 * acc >= total) return ((b + 0.5) * HIST_TOP) / HIST_BINS;
  }
  return HIST_TOP;
}

/** Cauchy weights of the blocks from their misfit in px (sqrt of residual over gradient energy). */
function updateWeights(err: Float64Array, info: Float64Array, weight: Float64Array): void {
  const mis: number[] = [];
  for (let b = 0; b < err.length; b++) if (info[b]! > 0) mis.push(Math.sqrt(err[b]! / info[b]!));
  if (mis.length === 0) return;
  mis.sort((x, y) => x - y);
  // a floor: in noise-free pictures the median misfit can fall to the interpolation error alone
  const s = Math.max(mis[mis.length >> 1]!, 0.02);
  for (let b = 0; b < err.length; b++) {
    if (!(info[b]! > 0)) continue;
    const m = Math.sqrt(err[b]! / info[b]!) / (CAUCHY_C * s);
    weight[b] = 1 / (1 + m * m);
  }
}

function weightedMisfit(err: Float64Array, info: Float64Array, weight: Float64Array): number {
  let e = 0;
  let i = 0;
  for (let b = 0; b < err.length; b++) {
    e += weight[b]! * err[b]!;
    i += weight[b]! * info[b]!;
  }
  return i > 0 ? Math.sqrt(e / i) : NaN;
}

/** (luma per px)^2 summed: four pixels of an edge of 2 luma per px across the turn's direction */
const MIN_BLOCK_INFO = 16;

function blockCounts(px: LevelPixels, weight: Float64Array, f: number): { groundBlocks: number; inlierGroundBlocks: number } {
  // a block counts as textured ground when its horizontal information is worth a few edge pixels
  // (the yaw column is the horizontal gradient times about f px per rad)
  let groundBlocks = 0;
  let inliers = 0;
  for (let b = 0; b < px.nBlocks; b++) {
    if (!(px.groundInfo[b]! > MIN_BLOCK_INFO * f * f)) continue;
    groundBlocks++;
    if (weight[b]! > INLIER_WEIGHT) inliers++;
  }
  return { groundBlocks, inlierGroundBlocks: inliers };
}

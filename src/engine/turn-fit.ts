import { N_PARAMS, P_PITCH, P_ROLL, P_YAW, P_FORWARD, P_LEFT } from './ground-motion';
import type { LandscapeCamera } from './ground-motion';
import type { LandscapeFrame } from './landscape-frame';
import { refineDense } from './turn-dense';
import { startTurn, type ExcludeRect } from './turn-start';

/*
 * The camera's turn between two frames, measured from the landscape (issue 15, point 2): patches
 * followed and fitted robustly for a start that catches even the fast near ground (turn-start.ts),
 * then every textured pixel of the finest levels for the fine figure (turn-dense.ts). The motion
 * model (ground-motion.ts) separates the turn from the observer's travel by each ground point's depth,
 * which its row below the horizon gives on flat ground.
 *
 * The answer is a number with its uncertainty, or a reason: no ground in view (sky only), too little
 * texture on the ground (uniform ground, motion blur), a landscape that does not move as one, or a
 * turn the landscape does not pin down.
 */

export type { ExcludeRect } from './turn-start';

export interface TurnFitOptions {
  /** starting motion (the previous pair's theta); without it the start is searched for */
  init?: ArrayLike<number>;
  /** video-px rectangles left out: the object and anything moving with it */
  exclude?: ExcludeRect[];
  /**
   * the far layer's inverse depth (camera height / distance of what stands above the horizon):
   * default 0, infinitely far; null fits one shared depth per pair
   */
  farInvDepth?: number | null;
  /** give every block above the horizon its own depth in the fine stage (default false) */
  farPerBlock?: boolean;
  /** textured ground blocks needed (default 6) */
  minGroundBlocks?: number;
  /** largest turn sigma accepted, rad per frame (default 2e-4) */
  maxYawSigma?: number;
  /** leave out pixels on lines at most three pixels wide (default true) */
  dropThinLines?: boolean;
  /** finest pyramid level of the fine stage (default 0; 1 is about four times faster, half as sharp) */
  finestLevel?: number;
}

export type TurnFailure = 'no-ground' | 'too-little-texture' | 'inconsistent' | 'not-determined';

export interface TurnFitOk {
  ok: true;
  /** motion parameters [dYaw, dPitch, dRoll, forward, left, farInvDepth], see ground-motion.ts */
  theta: Float64Array;
  /** covariance of theta (row-major 6 x 6) */
  cov: Float64Array;
  /** rad per frame, positive to the left */
  yawRad: number;
  yawSigmaRad: number;
  pitchRad: number;
  rollRad: number;
  /** camera travel per frame in camera heights, in frame A's heading (forward, left) */
  travelForward: number;
  travelLeft: number;
  groundBlocks: number;
  inlierGroundBlocks: number;
  /** weighted RMS misfit of the blocks at the finest level, px */
  misfitPx: number;
}

export interface TurnFitFail {
  ok: false;
  code: TurnFailure;
  reason: string;
}

export type TurnFit = TurnFitOk | TurnFitFail;

export function fitTurn(a: LandscapeFrame, b: LandscapeFrame, cam: LandscapeCamera, opts: TurnFitOptions = {}): TurnFit {
  const start = startTurn(a, b, cam, {
    ...(opts.init ? { init: opts.init } : {}),
    ...(opts.exclude ? { exclude: opts.exclude } : {}),
    ...(opts.farInvDepth === null ? {} : { farInvDepth: opts.farInvDepth ?? 0 }),
  });
  if (!start.ok) return start;
  const theta = start.theta;
  const dense = refineDense(a, b, cam, theta, {
    ...(opts.exclude ? { exclude: opts.exclude } : {}),
    farPerBlock: opts.farPerBlock === true,
    dropThinLines: opts.dropThinLines !== false,
    finestLevel: opts.finestLevel ?? 0,
  });
  const minBlocks = opts.minGroundBlocks ?? 6;
  if (dense.groundBlocks < minBlocks) {
    return {
      ok: false,
      code: 'too-little-texture',
      reason: `too little texture on the ground to measure the turn: ${dense.groundBlocks} textured ground blocks, need ${minBlocks} (uniform ground, motion blur or sky only)`,
    };
  }
  if (dense.inlierGroundBlocks < minBlocks) {
    return {
      ok: false,
      code: 'inconsistent',
      reason: `the landscape does not move as one: only ${dense.inlierGroundBlocks} of ${dense.groundBlocks} textured ground blocks agree with one turn and travel (need ${minBlocks})`,
    };
  }
  const yawSigma = Math.sqrt(Math.max(0, dense.cov[P_YAW * N_PARAMS + P_YAW]!));
  const maxSigma = opts.maxYawSigma ?? 2e-4;
  if (!dense.solved || !(yawSigma <= maxSigma)) {
    return {
      ok: false,
      code: 'not-determined',
      reason: `the landscape does not pin the turn down: its uncertainty is ${yawSigma.toExponential(2)} rad per frame, more than ${maxSigma.toExponential(2)}`,
    };
  }
  return {
    ok: true,
    theta: theta.slice(),
    cov: dense.cov,
    yawRad: theta[P_YAW]!,
    yawSigmaRad: yawSigma,
    pitchRad: theta[P_PITCH]!,
    rollRad: theta[P_ROLL]!,
    travelForward: theta[P_FORWARD]!,
    travelLeft: theta[P_LEFT]!,
    groundBlocks: dense.groundBlocks,
    inlierGroundBlocks: dense.inlierGroundBlocks,
    misfitPx: dense.misfit,
  };
}

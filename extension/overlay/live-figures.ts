import { cameraFrame, fieldOfView, frameFigures, workingAssumptions } from '../../src/case';
import type { EngineAssumptions, FrameBasis, FrameFigures, Mark, ObjectSpan } from '../../src/case';

/** The overlay's draws per solve: 4 000 take well under a millisecond, so the readout can follow a drag. */
export const LIVE_DRAWS = 4000;

/**
 * What the popup's analysis solves each frame under: the given assumptions with a speed measured
 * from lane dashes standing in (lane-speed.ts workingAssumptions), the camera frame from the case's
 * marks, and the field across it (a landscape class's field turned for a portrait picture).
 */
export function liveBasis(given: EngineAssumptions, c: { marks: readonly Mark[] }, videoWidth: number, videoHeight: number): FrameBasis {
  const { a } = workingAssumptions(given, c);
  const frame = cameraFrame(c.marks, videoWidth, videoHeight);
  return { a, frame, hfov: fieldOfView(a, frame).hfov };
}

let memoKey = '';
let memoBasis: FrameBasis | null = null;
let memoValue: FrameFigures | null = null;

/**
 * The figures for one object span on the frame whose marks are `here`, by the very function the
 * popup's analysis solves each frame with (src/case/frame-figures.ts), with fewer draws. Null while
 * the span is too short to be one, or when the engine refuses it (an end outside the camera frame):
 * the readout says so instead of a number.
 */
export function liveFigures(object: ObjectSpan, here: readonly Mark[], t: number, basis: FrameBasis): FrameFigures | null {
  // a redraw with the same marks, frame and assumptions reuses the last solve (a redraw runs on every pointer move)
  const others = here.filter((x) => x.kind === 'landmark-span' || x.kind === 'horizon').map((x) => [x.kind, x.points, x.edgeSigmaPx, x.landmarkId, x.landmarkDimension]);
  const key = JSON.stringify([object.points, object.edgeSigmaPx, object.dimension, others, basis.frame, basis.hfov]);
  if (key === memoKey && basis.a === memoBasis?.a) return memoValue;
  memoKey = key;
  memoBasis = basis;
  memoValue = solveLive(object, here, t, basis);
  return memoValue;
}

function solveLive(object: ObjectSpan, here: readonly Mark[], t: number, basis: FrameBasis): FrameFigures | null {
  const [p, q] = object.points;
  if (!p || !q || Math.hypot(q.x - p.x, q.y - p.y) < 0.5) return null;
  try {
    return frameFigures(object, here, t, basis, { draws: LIVE_DRAWS, seed: 1 });
  } catch {
    return null;
  }
}

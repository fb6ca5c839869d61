import type { FrameRect } from '../../src/case/frames';
import type { Point } from '../../src/case/schema';
import { landmarkDimensionOf } from '../../src/case/marks';
import { solveFrame, type FrameResult } from '../../src/engine/frame-solve';
import type { EngineAssumptions as LiveAssumptions } from '../../src/case/assumptions';

export interface LiveFigures {
  spanPx: number;
  result: FrameResult;
}

let memoKey = '';
let memoAssumptions: LiveAssumptions | null = null;
let memoValue: LiveFigures | null = null;

/**
 * The figures for one object span (and an optional landmark at the same frame) under the live
 * assumptions: a small Monte Carlo (4 000 draws, well under a millisecond) so the readout can
 * follow a drag.
 */
export function liveFigures(
  object: { points: readonly Point[]; edgeSigmaPx: number },
  landmark: { points: readonly Point[]; edgeSigmaPx: number } | null,
  frame: FrameRect,
  a: LiveAssumptions,
): LiveFigures | null {
  // a redraw with the same marks, frame and assumptions reuses the last solve
  const key = JSON.stringify([object.points, object.edgeSigmaPx, landmark?.points, landmark?.edgeSigmaPx, frame]);
  if (key === memoKey && a === memoAssumptions) return memoValue;
  memoKey = key;
  memoAssumptions = a;
  memoValue = solveLive(object, landmark, frame, a);
  return memoValue;
}

function solveLive(
  object: { points: readonly Point[]; edgeSigmaPx: number },
  landmark: { points: readonly Point[]; edgeSigmaPx: number } | null,
  frame: FrameRect,
  a: LiveAssumptions,
): LiveFigures | null {
  const [p, q] = object.points as [Point, Point];
  const spanPx = Math.hypot(q.x - p.x, q.y - p.y);
  if (spanPx < 0.5) return null;
  const W = frame.right - frame.left;
  const H = frame.bottom - frame.top;
  const toSpan = (pts: readonly Point[], sigma: number) => {
    const [u, v] = pts as [Point, Point];
    return { x1: u.x - frame.left, y1: u.y - frame.top, x2: v.x - frame.left, y2: v.y - frame.top, edgeSigmaPx: sigma };
  };
  try {
    const result = solveFrame(
      {
        frame: { widthPx: W, heightPx: H },
        hfov: a.hfov,
        object: { span: toSpan(object.points, object.edgeSigmaPx), size: a.objectSize, aspect: a.aspect },
        // a landmark has its own dimension (marked upright: a height, no aspect; marked level: a width) and never the object's aspect
        ...(landmark ? { landmark: { span: toSpan(landmark.points, landmark.edgeSigmaPx), size: a.landmarkSize, dimension: landmarkDimensionOf(landmark.points) } } : {}),
        cameraHeight: a.cameraHeight,
      },
      { draws: 4000, seed: 1 },
    );
    return { spanPx, result };
  } catch {
    // an end outside the camera frame, for instance: the readout says so instead of a number
    return null;
  }
}

import { solveFrame, type FrameResult, type HorizonLine, type LandmarkBody } from '../engine/frame-solve';
import type { Band, SolveOptions } from '../engine/uncertainty';
import type { EngineAssumptions } from './assumptions';
import { marksAt, spanInFrame, type FrameRect } from './frames';
import { landmarkDimensionOf } from './marks';
import type { Mark, Point } from './schema';

/*
 * One marked frame's figures: the one place a frame's scene is put together from its marks and the
 * case's assumptions. The popup's analysis (analysis.ts, 20 000 draws a frame) and the overlay's live
 * readout (4 000 draws, while the user drags) both call frameFigures, so the two cannot drift apart.
 * It imports only the frame solver: the overlay is injected into the page and carries this module.
 */

/** A fixed camera's pitch when none is given and no horizon is marked. */
export const LEVEL: Band = { lo: 0, hi: 0 };

/** What every frame of a case shares: its assumptions, camera frame and the field of view across that frame. */
export interface FrameBasis {
  a: EngineAssumptions;
  frame: FrameRect;
  /** Across the camera frame's width (pass-scene.ts fieldOfView turns a landscape class's field for a portrait picture). */
  hfov: Band;
}

/** The object's span as marked, or as it is being dragged (no id yet). */
export interface ObjectSpan {
  points: readonly Point[];
  edgeSigmaPx: number;
  dimension?: Mark['dimension'];
}

export interface FrameFigures {
  /** The span's length, intrinsic pixels. */
  spanPx: number;
  result: FrameResult;
  /** The landmark marked on the same frame, if any, which entered the solve. */
  landmark: Mark | null;
}

/** A landmark mark as the engine takes it: its own size (by id, else the shared one) and dimension. */
export function landmarkBody(m: Mark, a: EngineAssumptions, frame: FrameRect): LandmarkBody {
  // marks made before a landmark carried its dimension: read it from the span's direction
  const dimension = m.landmarkDimension ?? landmarkDimensionOf(m.points);
  return {
    span: spanInFrame(m, frame),
    size: (m.landmarkId !== undefined ? a.landmarkSizes.get(m.landmarkId) : undefined) ?? a.landmarkSize,
    dimension,
    ...(dimension === 'width' && a.landmarkAspect ? { aspect: a.landmarkAspect } : {}),
  };
}

/** The horizon marked on the frame at t, in camera-frame pixels. */
export function horizonAt(marks: readonly Mark[], t: number, frame: FrameRect): HorizonLine | null {
  const h = marksAt(marks, t).find((m) => m.kind === 'horizon');
  if (!h) return null;
  const [p, q] = h.points as [Point, Point];
  return { x1: p.x - frame.left, y1: p.y - frame.top, x2: q.x - frame.left, y2: q.y - frame.top, sigmaPx: h.edgeSigmaPx };
}

/**
 * The figures of `object` on the frame at `t`, whose marks are `here` (a landmark there enters the
 * solve; a horizon there gives the tilt unless the camera is fixed). Throws the engine's error for a
 * scene it refuses (an end outside the camera frame, say): callers say so in their own words.
 */
export function frameFigures(object: ObjectSpan, here: readonly Mark[], t: number, basis: FrameBasis, options: SolveOptions): FrameFigures {
  const { a, frame, hfov } = basis;
  const landmark = here.find((x) => x.kind === 'landmark-span') ?? null;
  const horizon = a.fixedCamera ? null : horizonAt(here, t, frame);
  const result = solveFrame(
    {
      frame: { widthPx: frame.right - frame.left, heightPx: frame.bottom - frame.top },
      hfov,
      // a span of no named dimension is taken square on, whatever aspect the wingspan or length has
      object: { span: spanInFrame(object, frame), size: a.objectSize, aspect: object.dimension === 'other' ? { lo: Math.PI / 2, hi: Math.PI / 2 } : a.aspect },
      ...(landmark ? { landmark: landmarkBody(landmark, a, frame) } : {}),
      ...(a.observerSpeed ? { observerSpeed: a.observerSpeed } : {}),
      ...(horizon ? { horizon } : {}),
      ...(a.fixedCamera ? { pitch: a.fixedCamera.pitch ?? LEVEL } : {}),
      ...(a.elevation ? { elevation: a.elevation } : {}),
      cameraHeight: a.cameraHeight,
    },
    options,
  );
  const [p, q] = object.points as [Point, Point];
  return { spanPx: Math.hypot(q.x - p.x, q.y - p.y), result, landmark };
}

import { DEG } from '../engine/constants';
import type { HorizonMark, LandmarkMark, PassScene } from '../engine/pass-inputs';
import { Axis, type AxisCode } from '../engine/pass-model';
import type { HorizonLine } from '../engine/frame-solve';
import type { Band } from '../engine/uncertainty';
import type { EngineAssumptions } from './assumptions';
import { horizonAt, landmarkBody, LEVEL } from './frame-figures';
import { marksIndex, spanInFrame, type FrameRect } from './frames';
import type { Mark } from './schema';

// one frame's scene is put together in frame-figures.ts (the overlay carries it); the pass reuses its pieces
export { horizonAt, landmarkBody, LEVEL };
// the field across the picture is worked out in camera-fields.ts (the overlay carries that too)
export { fieldOfView, type FieldOfView } from './camera-fields';

/*
 * From a case's marks and assumptions to what the engine takes: the field of view across the picture
 * actually recorded, each span's axis, landmarks with their own size and dimension, horizons, and a
 * fixed camera's aim. Pure.
 */

/** The elevation assumed when nothing in the frame gives it and the user did not: wide on purpose (common practice: objects filmed from a road sit 0-60 deg up). */
export const UNKNOWN_ELEVATION: Band = { lo: 0, hi: 60 * DEG };

export function axisOf(dimension: Mark['dimension']): AxisCode {
  switch (dimension) {
    case 'length':
      return Axis.LENGTH;
    case 'height':
      return Axis.HEIGHT;
    case 'other':
      return Axis.SQUARE;
    default:
      return Axis.WINGSPAN;
  }
}

/** The horizon a fixed camera keeps: the latest marked. */
export function anyHorizon(marks: readonly Mark[], frame: FrameRect): HorizonLine | null {
  const h = [...marks].reverse().find((m) => m.kind === 'horizon');
  return h ? horizonAt([h], h.t, frame) : null;
}

/** Landmark id for grouping marks of the same landmark ('' for the one unnamed landmark). */
export function landmarkKey(m: Mark): string {
  return m.landmarkId ?? '';
}

export interface PassInputs {
  scene: PassScene;
  /** the object marks that entered, one per timestamp */
  objectMarks: Mark[];
  /** the landmark marks that entered, aligned with scene.landmarks */
  landmarkMarks: Mark[];
}

/**
 * The pass scene for the fit. `objects` are the object spans, one per timestamp, of one axis. The
 * observer's speed may be null: the fit then gives the relative motion only (speed {0, 0}).
 */
export function passInputs(
  objects: readonly Mark[],
  all: readonly Mark[],
  a: EngineAssumptions,
  hfov: Band,
  frame: FrameRect,
  axis: AxisCode,
): PassInputs {
  const horizons: HorizonMark[] = [];
  const landmarks: LandmarkMark[] = [];
  const landmarkMarks: Mark[] = [];
  const near = marksIndex(all);
  for (const o of objects) {
    const here = near(o.t);
    const h = a.fixedCamera ? null : horizonAt(here, o.t, frame);
    if (h) horizons.push({ t: o.t, ...h });
    for (const m of here) {
      if (m.kind !== 'landmark-span') continue;
      const body = landmarkBody(m, a, frame);
      landmarks.push({ id: landmarkKey(m), t: o.t, span: body.span, size: body.size, dimension: body.dimension ?? 'height', ...(body.aspect ? { aspect: body.aspect } : {}) });
      landmarkMarks.push(m);
    }
  }
  let fixed: PassScene['fixed'] = null;
  if (a.fixedCamera) {
    const h = anyHorizon(all, frame);
    if (h) horizons.push({ t: objects[0]!.t, ...h });
    // the schema's aim is + to the right; the ground frame's azimuths are + to the left
    // no pitch given and no horizon: level, the default the assumptions show as one
    fixed = { aim: { lo: -a.fixedCamera.axisHeading.hi, hi: -a.fixedCamera.axisHeading.lo }, pitch: a.fixedCamera.pitch ?? LEVEL };
    const road = [...all].reverse().find((m) => m.kind === 'road-ahead');
    if (road) fixed.roadAhead = { x: road.points[0]!.x - frame.left, y: road.points[0]!.y - frame.top, sigmaPx: Math.max(road.edgeSigmaPx, 1) };
  }
  return {
    scene: {
      frame: { widthPx: frame.right - frame.left, heightPx: frame.bottom - frame.top },
      hfov,
      object: { size: a.objectSize, axis },
      marks: objects.map((m) => ({ t: m.t, span: spanInFrame(m, frame) })),
      observerSpeed: a.fixedCamera?.mount === 'tripod' ? { lo: 0, hi: 0 } : (a.observerSpeed ?? { lo: 0, hi: 0 }),
      trackAngle: a.trackAngle,
      cameraHeight: a.cameraHeight,
      horizons,
      landmarks,
      fixed,
      elevation: a.elevation ?? UNKNOWN_ELEVATION,
    },
    objectMarks: [...objects],
    landmarkMarks,
  };
}

/** The relative-motion signs the direction assumed leaves open: -1 the object drifts back past the camera, +1 it pulls ahead. */
export function signsFor(direction: EngineAssumptions['direction']): (-1 | 1)[] {
  switch (direction) {
    case 'opposite':
    case 'same-slower':
      return [-1];
    case 'same-faster':
      return [1];
    default:
      return [-1, 1];
  }
}

/** The reading directions the direction assumed allows. */
export function allowedReadings(direction: EngineAssumptions['direction']): ('opposite' | 'same-slower' | 'same-faster')[] {
  switch (direction) {
    case 'opposite':
      return ['opposite'];
    case 'same-slower':
      return ['same-slower'];
    case 'same-faster':
      return ['same-faster'];
    case 'same':
      return ['same-slower', 'same-faster'];
    default:
      return ['opposite', 'same-slower', 'same-faster'];
  }
}

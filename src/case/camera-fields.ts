import type { Band } from '../engine/uncertainty';
import type { EngineAssumptions } from './assumptions';
import type { FrameRect } from './frames';

/*
 * The field of view across the picture a case's video records. The overlay's live readout needs it
 * as much as the popup does (a portrait picture from a landscape camera class spans the class's
 * short side), but the camera classes' derivations (engine/profiles.ts) are more than the injected
 * overlay may carry; what the turn needs of them is each class's label, whether it records portrait,
 * and the shape it records, written out here and held equal to the derivations by a test
 * (test/case/camera-fields.test.ts).
 */
export const CLASS_PICTURES: readonly { label: string; portrait: boolean; recordedAspect: number }[] = Object.freeze([
  { label: 'Phone main camera, landscape video, stabilisation on', portrait: false, recordedAspect: 16 / 9 },
  { label: 'Phone main camera, landscape video, no stabilisation crop', portrait: false, recordedAspect: 16 / 9 },
  { label: 'Phone main camera, portrait video, stabilisation on', portrait: true, recordedAspect: 16 / 9 },
  { label: 'Phone main camera, portrait video, no stabilisation crop', portrait: true, recordedAspect: 16 / 9 },
  { label: 'Phone telephoto camera (about 2-3x), landscape video', portrait: false, recordedAspect: 16 / 9 },
  { label: 'Phone ultra-wide camera, landscape video', portrait: false, recordedAspect: 16 / 9 },
  { label: 'Dashboard camera, 16:9', portrait: false, recordedAspect: 16 / 9 },
  { label: 'Action camera, wide mode, 16:9', portrait: false, recordedAspect: 16 / 9 },
  { label: 'Compact camera at its wide end, 16:9 video', portrait: false, recordedAspect: 16 / 9 },
]);

/** The field of view used, and why it differs from the one assumed. */
export interface FieldOfView {
  hfov: Band;
  /** The picture is taller than wide and the field was a landscape camera class's: turned to the portrait width. */
  portrait: boolean;
  note: string | null;
}

/**
 * A camera class's field of view is across the long side of its landscape picture. A portrait
 * picture from it (taller than wide) spans the short side across its width: tan(HFOV/2) scales by
 * the class's short side over its long side (9/16), which is the landscape picture's vertical field (the portrait classes in
 * profiles.ts are that same field, derived on their own). A field the user typed is taken as given,
 * across the picture's width.
 */
export function fieldOfView(a: EngineAssumptions, frame: FrameRect): FieldOfView {
  const W = frame.right - frame.left;
  const H = frame.bottom - frame.top;
  const shape = CLASS_PICTURES.find((p) => p.label === a.cameraLabel);
  if (!(H > W)) return { hfov: a.hfov, portrait: false, note: null };
  if (!shape || shape.portrait) {
    return { hfov: a.hfov, portrait: false, note: `The picture is portrait (${W.toFixed(0)} x ${H.toFixed(0)} px): the field of view is taken across its width, as given.` };
  }
  // the class's own recorded shape (16:9 for phones), not the marked picture's rounded pixels
  const k = 1 / shape.recordedAspect;
  const turn = (x: number) => 2 * Math.atan(Math.tan(x / 2) * k);
  return {
    hfov: { lo: turn(a.hfov.lo), hi: turn(a.hfov.hi) },
    portrait: true,
    note: `The picture is portrait (${W.toFixed(0)} x ${H.toFixed(0)} px): the camera class's field of view is turned to its width.`,
  };
}

import { describe, expect, it } from 'vitest';
import { CLASS_PICTURES, fieldOfView } from '../../src/case/camera-fields';
import { defaultAssumptions, engineAssumptions } from '../../src/case/assumptions';
import { CAMERA_PROFILES, PROFILE_DERIVATIONS } from '../../src/engine/profiles';

/*
 * The field across the picture, from the few facts of each camera class the overlay carries
 * (camera-fields.ts). The table must say what the derivations say (engine/profiles.ts), and the
 * turn for a portrait picture is the pinhole relation tan(h'/2) = tan(h/2) * (short side / long
 * side) (a rectilinear lens: the image half-width is f tan of the half-angle; common practice).
 */
describe('the camera classes the overlay carries', () => {
  it('match the derivations: every class, its label, whether it records portrait, the shape it records', () => {
    expect(CLASS_PICTURES.map((c) => c.label)).toEqual(CAMERA_PROFILES.map((p) => p.label));
    for (const d of PROFILE_DERIVATIONS) {
      const c = CLASS_PICTURES.find((x) => x.label === d.label)!;
      expect(c.recordedAspect, d.label).toBe(d.recordedAspect);
      expect(c.portrait, d.label).toBe(d.orientation === 'portrait');
    }
  });
});

describe('fieldOfView', () => {
  const a = engineAssumptions(defaultAssumptions(), []);
  it('turns a landscape class for a portrait picture by the pinhole relation', () => {
    const f = fieldOfView(a, { left: 0, top: 0, right: 720, bottom: 1280 });
    expect(f.portrait).toBe(true);
    for (const k of ['lo', 'hi'] as const) expect(Math.tan(f.hfov[k] / 2)).toBeCloseTo(Math.tan(a.hfov[k] / 2) * (9 / 16), 12);
  });
  it('keeps a landscape picture, a portrait class and a typed field as given', () => {
    expect(fieldOfView(a, { left: 0, top: 0, right: 1280, bottom: 720 }).hfov).toEqual(a.hfov);
    const typed = { ...a, cameraLabel: 'Field of view given' };
    expect(fieldOfView(typed, { left: 0, top: 0, right: 720, bottom: 1280 }).hfov).toEqual(a.hfov);
    const portraitClass = { ...a, cameraLabel: CLASS_PICTURES.find((c) => c.portrait)!.label };
    expect(fieldOfView(portraitClass, { left: 0, top: 0, right: 720, bottom: 1280 }).portrait).toBe(false);
  });
});

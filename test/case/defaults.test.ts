import { describe, expect, it } from 'vitest';
import { defaultAssumptions } from '../../src/case/assumptions';
import { CAMERA_PROFILE_IDS, CODE_LETTER_C, DEFAULT_CAMERA } from '../../src/case/defaults';
import { CAMERA_PROFILES, profileById } from '../../src/engine/profiles';
import { sizeBandForLetter } from '../../src/engine/size';

/*
 * The defaults the overlay carries written out (src/case/defaults.ts) are exactly what their
 * derivations give: the camera class from its focal lengths and crops (profiles.ts), the code
 * letter's bands (size.ts, ICAO Annex 14 Vol I Table 1-1 for the wingspan; the length from memory).
 */
describe('defaults written out for the overlay', () => {
  it('the default camera is the profile its id names, field of view to the last digit', () => {
    const p = profileById(DEFAULT_CAMERA.id);
    expect(DEFAULT_CAMERA.label).toBe(p.label);
    expect(DEFAULT_CAMERA.hfovDeg).toEqual({ lo: p.hfovDeg.lo, hi: p.hfovDeg.hi });
    expect(defaultAssumptions().hfovDeg).toEqual({ lo: p.hfovDeg.lo, hi: p.hfovDeg.hi });
  });
  it('the camera ids are every profile’s, in order', () => {
    expect(CAMERA_PROFILE_IDS).toEqual(CAMERA_PROFILES.map((p) => p.id));
  });
  it('code letter C’s bands are size.ts’s', () => {
    for (const d of ['wingspan', 'length'] as const) {
      const b = sizeBandForLetter('C', d);
      expect(CODE_LETTER_C[d]).toEqual({ lo: b.lo, hi: b.hi });
    }
  });
});

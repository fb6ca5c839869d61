import { profileById, profileHfovRad } from '../../src/engine/profiles';
import { sizeBandForLetter } from '../../src/engine/size';
import type { CaseAssumptions } from '../../src/case/schema';
import type { Band } from '../../src/engine/uncertainty';

/**
 * What the live readout assumes until the user sets assumptions in the popup: a phone main camera
 * filming landscape video with stabilisation, and a transport jet of aerodrome code letter C
 * (wingspan 24 to < 36 m, ICAO Annex 14 Table 1-1), seen broadside. The readout names these, so
 * nobody takes its figure for more than it is.
 */
export interface LiveAssumptions {
  cameraLabel: string;
  hfov: Band;
  sizeLabel: string;
  objectSize: Band;
  aspect: Band;
  /** Landmark size when the user has not said (a mast or tree, common practice). */
  landmarkSize: Band;
}

export const DEFAULT_EDGE_SIGMA_PX = 0.7;

export function defaultAssumptions(): LiveAssumptions {
  const profile = profileById('phone-main-landscape-stabilised');
  const hf = profileHfovRad(profile);
  const span = sizeBandForLetter('C', 'wingspan');
  return {
    cameraLabel: profile.label,
    hfov: { lo: hf.lo, hi: hf.hi },
    sizeLabel: 'code letter C wingspan, 24-36 m',
    objectSize: { lo: span.lo, hi: span.hi },
    aspect: { lo: Math.PI / 2, hi: Math.PI / 2 },
    landmarkSize: { lo: 8, hi: 30 },
  };
}

const DEG = Math.PI / 180;

/** The case's own assumptions when it has them, converted to the engine's units; else the defaults. */
export function liveAssumptionsFor(a: CaseAssumptions | undefined): LiveAssumptions {
  if (!a) return defaultAssumptions();
  return {
    cameraLabel: a.cameraLabel,
    hfov: { lo: a.hfovDeg.lo * DEG, hi: a.hfovDeg.hi * DEG },
    sizeLabel: a.sizeLabel,
    objectSize: { ...a.objectSizeM },
    aspect: { lo: a.aspectDeg.lo * DEG, hi: a.aspectDeg.hi * DEG },
    landmarkSize: { ...a.landmarkSizeM },
  };
}

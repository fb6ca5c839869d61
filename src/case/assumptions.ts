import { profileById, profileHfovRad } from '../engine/profiles';
import { sizeBandForLetter } from '../engine/size';
import type { Band } from '../engine/uncertainty';
import type { CaseAssumptions } from './schema';

const DEG = Math.PI / 180;

/**
 * What a case assumes until the user says otherwise: a phone main camera filming landscape video
 * with stabilisation (a profile of generic classes, common practice), and a transport jet of
 * aerodrome code letter C (wingspan 24 to < 36 m, ICAO Annex 14 Vol I Table 1-1), seen broadside.
 * Every figure shown names these, so nobody takes a default for a measurement.
 */
export function defaultAssumptions(settings?: { cameraProfile: string; observerSpeedMs?: { lo: number; hi: number } }): CaseAssumptions {
  const profile = profileById(settings?.cameraProfile ?? 'phone-main-landscape-stabilised');
  const hf = profileHfovRad(profile);
  const span = sizeBandForLetter('C', 'wingspan');
  return {
    cameraLabel: profile.label,
    hfovDeg: { lo: hf.lo / DEG, hi: hf.hi / DEG },
    sizeLabel: 'code letter C wingspan, 24-36 m',
    objectSizeM: { lo: span.lo, hi: span.hi },
    sizeDimension: 'wingspan',
    aspectDeg: { lo: 90, hi: 90 },
    // a mast, tree or house the object seems pinned over (common practice)
    landmarkSizeM: { lo: 8, hi: 30 },
    objectKind: 'fixed-wing-transport',
    ...(settings?.observerSpeedMs ? { observerSpeedMs: { ...settings.observerSpeedMs } } : {}),
  };
}

/** The assumptions in the engine's units (radians, metres, m/s). */
export interface EngineAssumptions {
  cameraLabel: string;
  sizeLabel: string;
  hfov: Band;
  objectSize: Band;
  aspect: Band;
  landmarkSize: Band;
  observerSpeed: Band | null;
  laneCycleId: string | null;
  objectKind: NonNullable<CaseAssumptions['objectKind']>;
  direction: NonNullable<CaseAssumptions['direction']>;
  /** Wind against the object's motion, m/s; null: none assumed. */
  headwind: Band | null;
  /** A camera that kept its aim, with the aim in radians; null: hand-held (no ground track). */
  fixedCamera: { mount: 'tripod' | 'vehicle'; axisHeading: Band } | null;
  /** True when these are the tool's defaults, not the user's. */
  defaults: boolean;
}

export function engineAssumptions(a: CaseAssumptions | undefined): EngineAssumptions {
  const u = a ?? defaultAssumptions();
  return {
    cameraLabel: u.cameraLabel,
    sizeLabel: u.sizeLabel,
    hfov: { lo: u.hfovDeg.lo * DEG, hi: u.hfovDeg.hi * DEG },
    objectSize: { ...u.objectSizeM },
    aspect: { lo: u.aspectDeg.lo * DEG, hi: u.aspectDeg.hi * DEG },
    landmarkSize: { ...u.landmarkSizeM },
    observerSpeed: u.observerSpeedMs ? { ...u.observerSpeedMs } : null,
    laneCycleId: u.laneCycleId ?? null,
    objectKind: u.objectKind ?? 'unknown',
    direction: u.direction ?? 'unknown',
    headwind: u.headwindMs ? { ...u.headwindMs } : null,
    fixedCamera: u.fixedCamera
      ? { mount: u.fixedCamera.mount, axisHeading: { lo: u.fixedCamera.axisHeadingDeg.lo * DEG, hi: u.fixedCamera.axisHeadingDeg.hi * DEG } }
      : null,
    defaults: a === undefined,
  };
}

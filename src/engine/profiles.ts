import { hfovFromEquivalentFocal } from './camera';
import { DEG } from './constants';
import { InputError } from './errors';

/*
 * Generic camera classes with a central horizontal field of view and a spread. Each is derived from a
 * band of 35 mm-equivalent focal lengths and stabilisation crops through hfovFromEquivalentFocal, so
 * the numbers follow from the stated basis and can be re-derived by anyone reading it.
 */

export interface CameraProfile {
  id: string;
  label: string;
  /** Horizontal field of view of the recorded frame, degrees: central value and plausible low/high. */
  hfovDeg: { central: number; lo: number; hi: number };
  basis: string;
}

/** The inputs a profile is derived from; exported so tests and docs can show the derivation. */
export interface ProfileDerivation {
  id: string;
  label: string;
  focalEqMm: readonly [number, number];
  /** Shapes (long/short) the equivalent focal length may be quoted for; central uses their mean. */
  quotedAspects: readonly number[];
  recordedAspect: number;
  orientation: 'landscape' | 'portrait';
  stabilisationCrop: readonly [number, number];
  basis: string;
}

const PINHOLE_CAVEAT =
  'the real lens is not rectilinear (strong barrel distortion), so the pinhole model is an approximation that is best near the frame centre';

export const PROFILE_DERIVATIONS: readonly ProfileDerivation[] = Object.freeze([
  {
    id: 'phone-main-landscape-stabilised',
    label: 'Phone main camera, landscape video, stabilisation on',
    focalEqMm: [24, 28],
    quotedAspects: [4 / 3],
    recordedAspect: 16 / 9,
    orientation: 'landscape',
    stabilisationCrop: [0.1, 0.25],
    basis: '24-28 mm equivalent quoted for 4:3 stills, 16:9 video keeps the full width, stabilisation crop 10-25 %: common practice',
  },
  {
    id: 'phone-main-landscape',
    label: 'Phone main camera, landscape video, no stabilisation crop',
    focalEqMm: [24, 28],
    quotedAspects: [4 / 3],
    recordedAspect: 16 / 9,
    orientation: 'landscape',
    stabilisationCrop: [0, 0],
    basis: '24-28 mm equivalent quoted for 4:3 stills, 16:9 video keeps the full width, no crop: common practice',
  },
  {
    id: 'phone-main-portrait-stabilised',
    label: 'Phone main camera, portrait video, stabilisation on',
    focalEqMm: [24, 28],
    quotedAspects: [4 / 3],
    recordedAspect: 16 / 9,
    orientation: 'portrait',
    stabilisationCrop: [0.1, 0.25],
    basis: '24-28 mm equivalent quoted for 4:3 stills, 9:16 portrait video (horizontal = short side of the 16:9 crop), stabilisation crop 10-25 %: common practice',
  },
  {
    id: 'phone-main-portrait',
    label: 'Phone main camera, portrait video, no stabilisation crop',
    focalEqMm: [24, 28],
    quotedAspects: [4 / 3],
    recordedAspect: 16 / 9,
    orientation: 'portrait',
    stabilisationCrop: [0, 0],
    basis: '24-28 mm equivalent quoted for 4:3 stills, 9:16 portrait video (horizontal = short side of the 16:9 crop), no crop: common practice',
  },
  {
    id: 'phone-telephoto',
    label: 'Phone telephoto camera (about 2-3x), landscape video',
    focalEqMm: [48, 77],
    quotedAspects: [4 / 3],
    recordedAspect: 16 / 9,
    orientation: 'landscape',
    stabilisationCrop: [0, 0.25],
    basis: 'about 2-3x the 24-26 mm main camera, i.e. 48-77 mm equivalent, 4:3 quoted, 16:9 video, stabilisation crop 0-25 %: common practice',
  },
  {
    id: 'phone-ultrawide',
    label: 'Phone ultra-wide camera, landscape video',
    focalEqMm: [13, 16],
    quotedAspects: [4 / 3],
    recordedAspect: 16 / 9,
    orientation: 'landscape',
    stabilisationCrop: [0, 0.25],
    basis: `13-16 mm equivalent, 4:3 quoted, 16:9 video, stabilisation crop 0-25 %: common practice; ${PINHOLE_CAVEAT}`,
  },
  {
    id: 'dashboard-camera',
    label: 'Dashboard camera, 16:9',
    focalEqMm: [12, 20],
    quotedAspects: [16 / 9],
    recordedAspect: 16 / 9,
    orientation: 'landscape',
    stabilisationCrop: [0, 0],
    basis: `rectilinear equivalent of about 12-20 mm on a 16:9 frame, no crop: common practice (not in REFERENCES.md); ${PINHOLE_CAVEAT}`,
  },
  {
    id: 'action-camera-wide',
    label: 'Action camera, wide mode, 16:9',
    focalEqMm: [10, 16],
    quotedAspects: [16 / 9],
    recordedAspect: 16 / 9,
    orientation: 'landscape',
    stabilisationCrop: [0, 0.25],
    basis: `rectilinear equivalent of about 10-16 mm on a 16:9 frame, stabilisation crop 0-25 %: common practice (not in REFERENCES.md); ${PINHOLE_CAVEAT}`,
  },
  {
    id: 'compact-camera-wide',
    label: 'Compact camera at its wide end, 16:9 video',
    focalEqMm: [24, 28],
    quotedAspects: [4 / 3, 3 / 2],
    recordedAspect: 16 / 9,
    orientation: 'landscape',
    stabilisationCrop: [0, 0.1],
    basis: '24-28 mm equivalent at the wide end, quoted for a 4:3 or 3:2 sensor, 16:9 video keeps the full width, stabilisation crop 0-10 %: common practice',
  },
] satisfies ProfileDerivation[]);

function hfovDeg(d: ProfileDerivation, focalEq: number, quotedAspect: number, crop: number): number {
  return (
    hfovFromEquivalentFocal({
      focalEq,
      quotedAspect,
      recordedAspect: d.recordedAspect,
      orientation: d.orientation,
      stabilisationCrop: crop,
    }) / DEG
  );
}

/**
 * Central from the middle of each band; low and high from the band corners (the field narrows with
 * longer focal length and larger crop, and the quoted shape can move it either way, so all corners
 * are tried).
 */
export function deriveProfile(d: ProfileDerivation): CameraProfile {
  const [f0, f1] = d.focalEqMm;
  const [c0, c1] = d.stabilisationCrop;
  const meanAspect = d.quotedAspects.reduce((a, b) => a + b, 0) / d.quotedAspects.length;
  const central = hfovDeg(d, (f0 + f1) / 2, meanAspect, (c0 + c1) / 2);
  let lo = Infinity;
  let hi = -Infinity;
  for (const q of d.quotedAspects) {
    for (const f of [f0, f1]) {
      for (const c of [c0, c1]) {
        const v = hfovDeg(d, f, q, c);
        if (v < lo) lo = v;
        if (v > hi) hi = v;
      }
    }
  }
  return Object.freeze({
    id: d.id,
    label: d.label,
    hfovDeg: Object.freeze({ central, lo, hi }),
    basis: d.basis,
  });
}

export const CAMERA_PROFILES: readonly CameraProfile[] = Object.freeze(PROFILE_DERIVATIONS.map(deriveProfile));

/** The profile with this id; the error lists the ids that exist. */
export function profileById(id: string): CameraProfile {
  const found = typeof id === 'string' ? CAMERA_PROFILES.find((p) => p.id === id) : undefined;
  if (!found) {
    throw new InputError('camera profile', id, `one of ${CAMERA_PROFILES.map((p) => p.id).join(', ')}`);
  }
  return found;
}

/** A profile's field of view in radians, validated so a hand-made profile cannot smuggle in nonsense. */
export function profileHfovRad(p: CameraProfile): { central: number; lo: number; hi: number } {
  if (typeof p !== 'object' || p === null || typeof p.hfovDeg !== 'object' || p.hfovDeg === null) {
    throw new InputError('camera profile', p, 'a camera profile with hfovDeg');
  }
  const { central, lo, hi } = p.hfovDeg;
  for (const [name, v] of [
    ['low', lo],
    ['central', central],
    ['high', hi],
  ] as const) {
    if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0 || v >= 180) {
      throw new InputError(`horizontal field of view (${name})`, v, 'more than 0 and less than 180 deg');
    }
  }
  if (!(lo <= central && central <= hi)) {
    throw new InputError('horizontal field of view', `${lo} / ${central} / ${hi}`, 'low <= central <= high');
  }
  return { central: central * DEG, lo: lo * DEG, hi: hi * DEG };
}

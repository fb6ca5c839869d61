import { CODE_LETTER_C, DEFAULT_CAMERA } from './defaults';
import type { Band } from '../engine/uncertainty';
import type { CaseAssumptions, Mark } from './schema';

const DEG = Math.PI / 180;

/**
 * What a case assumes until the user says otherwise: a phone main camera filming landscape video
 * with stabilisation (a profile of generic classes, common practice), and a transport jet of
 * aerodrome code letter C (wingspan 24 to < 36 m, ICAO Annex 14 Vol I Table 1-1), seen broadside.
 * Every figure shown names these, so nobody takes a default for a measurement. A new case made
 * with the user's settings takes their camera class (case-settings.ts assumptionsFromSettings).
 */
export function defaultAssumptions(): CaseAssumptions {
  return {
    cameraLabel: DEFAULT_CAMERA.label,
    hfovDeg: { ...DEFAULT_CAMERA.hfovDeg },
    sizeLabel: DEFAULT_SIZE_LABEL.wingspan,
    objectSizeM: { ...CODE_LETTER_C.wingspan },
    sizeDimension: 'wingspan',
    aspectDeg: { lo: 90, hi: 90 },
    // a mast, tree or house the object seems pinned over (common practice)
    landmarkSizeM: { lo: 8, hi: 30 },
    objectKind: 'fixed-wing-transport',
  };
}

const DEFAULT_SIZE_LABEL = {
  wingspan: 'code letter C wingspan, 24-36 m',
  length: 'code letter C length, 26-45 m',
} as const;

/**
 * The size a case assumes for spans marked as `marked`. The default size follows the marks: a
 * side view is marked by its length, and a default that disagrees with the first mark would warn
 * on every new case (the code letter's length band, REFERENCES.md, from memory). A size the user
 * chose stays as chosen.
 */
export function sizeForMarks(a: CaseAssumptions, marked: 'wingspan' | 'length' | null): Pick<CaseAssumptions, 'sizeLabel' | 'objectSizeM' | 'sizeDimension'> {
  if (!marked || !isDefaultSize(a) || a.sizeDimension === marked) return { sizeLabel: a.sizeLabel, objectSizeM: a.objectSizeM, ...(a.sizeDimension ? { sizeDimension: a.sizeDimension } : {}) };
  return { sizeLabel: DEFAULT_SIZE_LABEL[marked], objectSizeM: { ...CODE_LETTER_C[marked] }, sizeDimension: marked };
}

/** True when the size is the tool's default (by wingspan or by length), not one the user chose. */
export function isDefaultSize(a: CaseAssumptions): boolean {
  return (['wingspan', 'length'] as const).some((dim) => {
    const band = CODE_LETTER_C[dim];
    return a.sizeDimension === dim && a.sizeLabel === DEFAULT_SIZE_LABEL[dim] && a.objectSizeM.lo === band.lo && a.objectSizeM.hi === band.hi;
  });
}

/** The dimension most of the object's spans were marked as, when it is a wingspan or a length. */
export function markedDimension(marks: readonly Mark[]): 'wingspan' | 'length' | null {
  let w = 0;
  let l = 0;
  for (const m of marks) {
    if (m.kind !== 'object-span') continue;
    if (m.dimension === 'wingspan') w++;
    else if (m.dimension === 'length') l++;
  }
  return l > w ? 'length' : w > 0 ? 'wingspan' : null;
}

/** The assumptions in the engine's units (radians, metres, m/s). */
export interface EngineAssumptions {
  cameraLabel: string;
  sizeLabel: string;
  hfov: Band;
  objectSize: Band;
  aspect: Band;
  landmarkSize: Band;
  /** Sizes of particular landmarks by id. */
  landmarkSizes: ReadonlyMap<string, Band>;
  /** A width landmark's aspect, rad; null: square on. */
  landmarkAspect: Band | null;
  observerSpeed: Band | null;
  laneCycleId: string | null;
  objectKind: NonNullable<CaseAssumptions['objectKind']>;
  direction: NonNullable<CaseAssumptions['direction']>;
  /** Wind against the object's motion, m/s; null: none assumed. */
  headwind: Band | null;
  /** The track's angle to the road, rad; {0, 0}: parallel (the default). */
  trackAngle: Band;
  trackAngleGiven: boolean;
  /** The camera's height, m. */
  cameraHeight: Band;
  cameraHeightGiven: boolean;
  /** The object's elevation square to the road, rad, when given. */
  elevation: Band | null;
  /** A camera that kept its aim, with the aim (rad, + right as the schema has it) and pitch (rad, null: not given). */
  fixedCamera: { mount: 'tripod' | 'vehicle'; axisHeading: Band; pitch: Band | null } | null;
  /** True when these are the tool's defaults, not the user's. */
  defaults: boolean;
  /** True when the object's size is the default one (which follows the marked dimension). */
  defaultSize: boolean;
}

/** A camera in a car or a train: 1 to 3 m above the ground (common practice). */
export const DEFAULT_CAMERA_HEIGHT_M = { lo: 1, hi: 3 } as const;

export function engineAssumptions(a: CaseAssumptions | undefined, marks: readonly Mark[] = []): EngineAssumptions {
  const given = a ?? defaultAssumptions();
  const size = sizeForMarks(given, markedDimension(marks));
  const u = { ...given, ...size };
  const rad = (r: { lo: number; hi: number }) => ({ lo: r.lo * DEG, hi: r.hi * DEG });
  return {
    cameraLabel: u.cameraLabel,
    sizeLabel: u.sizeLabel,
    hfov: rad(u.hfovDeg),
    objectSize: { ...u.objectSizeM },
    aspect: rad(u.aspectDeg),
    landmarkSize: { ...u.landmarkSizeM },
    landmarkSizes: new Map((u.landmarkSizes ?? []).map((l) => [l.id, { ...l.sizeM }])),
    landmarkAspect: u.landmarkAspectDeg ? rad(u.landmarkAspectDeg) : null,
    observerSpeed: u.observerSpeedMs ? { ...u.observerSpeedMs } : null,
    laneCycleId: u.laneCycleId ?? null,
    objectKind: u.objectKind ?? 'unknown',
    direction: u.direction ?? 'unknown',
    headwind: u.headwindMs ? { ...u.headwindMs } : null,
    trackAngle: u.trackAngleDeg ? rad(u.trackAngleDeg) : { lo: 0, hi: 0 },
    trackAngleGiven: !!u.trackAngleDeg,
    cameraHeight: u.cameraHeightM ? { ...u.cameraHeightM } : { ...DEFAULT_CAMERA_HEIGHT_M },
    cameraHeightGiven: !!u.cameraHeightM,
    elevation: u.elevationDeg ? rad(u.elevationDeg) : null,
    fixedCamera: u.fixedCamera
      ? { mount: u.fixedCamera.mount, axisHeading: rad(u.fixedCamera.axisHeadingDeg), pitch: u.fixedCamera.pitchDeg ? rad(u.fixedCamera.pitchDeg) : null }
      : null,
    defaults: a === undefined,
    defaultSize: isDefaultSize(u),
  };
}

/**
 * The case model: one measured video, its marks and the assumptions behind its figures. Stored one
 * key per case (`case:<id>`), versioned so that later schema changes migrate in order
 * (migrate.ts holds the steps; every read and every import runs them before validating).
 *
 * Version 1: video, marks, notes, assumptions. Version 2 (the case log): status, tags, history.
 * Version 3 (honest figures in every regime): marks of the horizon, the picture's top and bottom
 * edges and the road ahead; a landmark's own dimension and size; the track's angle to the road, the
 * camera's height and pitch, the object's elevation, and who passes whom.
 */
export const SCHEMA_VERSION = 3;

/** What a mark measures. */
export type MarkKind =
  /** the object's apparent span: two ends */
  | 'object-span'
  /** a landmark's span, for an object that seems pinned over it: two ends */
  | 'landmark-span'
  /** the camera frame's left and right edges inside the video (pillarbox, crop): two points */
  | 'frame-edges'
  /** a lane dash's leading edge passing the reference line: one point */
  | 'lane-dash'
  /** the object's centre, for fixed-camera clips: one point */
  | 'object-centre'
  /** the camera frame's top and bottom edges inside the video (letterbox, crop): two points (since version 3) */
  | 'frame-top-bottom'
  /** two points on the true horizon (flat ground or sea, not a skyline of hills): the camera's pitch and roll (since version 3) */
  | 'horizon'
  /** where the road ahead vanishes, for a camera that kept its aim: the aim as a bearing (since version 3) */
  | 'road-ahead';

export const MARK_KINDS: readonly MarkKind[] = [
  'object-span',
  'landmark-span',
  'frame-edges',
  'lane-dash',
  'object-centre',
  'frame-top-bottom',
  'horizon',
  'road-ahead',
];

/** Points a kind takes. */
export const POINTS_PER_KIND: Readonly<Record<MarkKind, number>> = {
  'object-span': 2,
  'landmark-span': 2,
  'frame-edges': 2,
  'lane-dash': 1,
  'object-centre': 1,
  'frame-top-bottom': 2,
  horizon: 2,
  'road-ahead': 1,
};

export interface Point {
  /** Intrinsic video pixels (videoWidth x videoHeight space), x right, y down. */
  x: number;
  y: number;
}

/**
 * How CSS pixels were mapped to intrinsic pixels when the mark was made (for audit, not for maths).
 * The overlay writes every field; a file may leave any out (the schema never required them).
 */
export interface DisplayMappingRecord {
  objectFit?: string;
  objectPosition?: string;
  /** Rendered picture rectangle in CSS px relative to the element's content box. */
  picture?: { x?: number; y?: number; width?: number; height?: number };
  /** CSS transform scale of the element (1 when none). */
  scale?: number;
  devicePixelRatio?: number;
}

export interface Mark {
  id: string;
  kind: MarkKind;
  /** video.currentTime when the mark was taken (the frame was paused). */
  t: number;
  points: Point[];
  /** Standard deviation of each point along the span, pixels. */
  edgeSigmaPx: number;
  /** Which dimension of the object the span is (object spans only). */
  dimension?: 'wingspan' | 'length' | 'height' | 'other';
  /** Landmark identity, so several landmark marks can be told apart (absent: the one landmark). */
  landmarkId?: string;
  /**
   * Which of the landmark's dimensions its span is (landmark spans only, since version 3): a height
   * stands on the ground, its lower end the foot; a width is level. Absent: a height.
   */
  landmarkDimension?: 'height' | 'width';
  mapping: DisplayMappingRecord;
  /** Who marked it, if the user gave a name. */
  by?: string;
  createdAt: number;
}

export interface VideoInfo {
  /** Page address (without its fragment) and title. */
  pageUrl: string;
  pageTitle: string;
  /** The media's own address (currentSrc), or '' for a stream object. */
  src: string;
  width: number;
  height: number;
  /** Seconds; null for a live stream with no duration. */
  duration: number | null;
}

/** A range a value is known to lie in, in the units its field names. */
export interface Range {
  lo: number;
  hi: number;
}

/**
 * The assumptions behind a case's figures, in the units a user gives them. Absent: the tool's
 * defaults (a phone main camera, an aircraft of aerodrome code letter C, broadside).
 */
export interface CaseAssumptions {
  cameraLabel: string;
  hfovDeg: Range;
  sizeLabel: string;
  objectSizeM: Range;
  /**
   * Which of the object's dimensions objectSizeM is: what its spans must be marked as. Absent: not
   * said (a size typed in, a class measured another way such as a rotor's diameter).
   */
  sizeDimension?: 'wingspan' | 'length';
  aspectDeg: Range;
  /** A landmark's size along its marked dimension, for landmarks without a size of their own. */
  landmarkSizeM: Range;
  /** Sizes of particular landmarks by their landmarkId (since version 3). */
  landmarkSizes?: { id: string; sizeM: Range }[];
  /** A width landmark's angle to the line of sight (since version 3); absent: square on. Heights have none. */
  landmarkAspectDeg?: Range;
  /** The observer's ground speed, m/s; absent until the user gives or measures it. */
  observerSpeedMs?: Range;
  /**
   * The broken lane-line cycle on the road (lanes.ts id): when set and two or more lane-dash
   * passes are marked, the observer's speed is measured from them instead of taken as given.
   */
  laneCycleId?: string;
  /** What the object is taken to be, for the plausibility verdict (plausibility.ts ObjectKind). */
  objectKind?: 'fixed-wing-transport' | 'fixed-wing-light' | 'light-sport' | 'rotorcraft' | 'unknown';
  /**
   * Which way the object moves against the observer's travel; absent or 'unknown': every reading is
   * shown. 'same-slower': the observer passes it; 'same-faster': it passes the observer (both since
   * version 3); 'same': one of the two, not said which.
   */
  direction?: 'opposite' | 'same' | 'same-slower' | 'same-faster' | 'unknown';
  /**
   * The object's track against the road, degrees (0 parallel, positive turning away from the road
   * ahead; since version 3). Absent: parallel.
   */
  trackAngleDeg?: Range;
  /** The camera's height above the ground, m (since version 3). Absent: 1 to 3 m, a car or a train. */
  cameraHeightM?: Range;
  /**
   * The object's elevation above the horizontal, degrees, seen square to the road (since version 3):
   * used only when no horizon, landmark foot or camera pitch gives it from the frame.
   */
  elevationDeg?: Range;
  /** Wind component against the object's motion, m/s (negative: a tailwind); absent: no wind assumed. */
  headwindMs?: Range;
  /**
   * The camera kept its aim (a tripod, or a mount fixed to the vehicle): marks then give bearings,
   * and bearings with ranges give the object's ground track. axisHeadingDeg is the optical axis
   * against the observer's direction of travel (0 ahead, 90 to the right, -90 to the left); a
   * marked road-ahead point measures it instead. pitchDeg is the optical axis above the horizontal
   * (since version 3); a marked horizon measures it instead. Absent pitch and no horizon: level.
   */
  fixedCamera?: { mount: 'tripod' | 'vehicle'; axisHeadingDeg: Range; pitchDeg?: Range };
}

/** Where a moderator stands on a case: our own three words. */
export type CaseStatus = 'open' | 'explained' | 'second-look';
export const CASE_STATUSES: readonly CaseStatus[] = ['open', 'explained', 'second-look'];

/** Limits on what a moderator writes (validate.ts enforces them; the log view can show them). */
export const MAX_NOTES_CHARS = 20_000;
export const MAX_TAGS = 20;
export const MAX_TAG_CHARS = 40;
/** Earlier versions one case keeps; an import that would need more is refused, never trimmed. */
export const MAX_HISTORY = 50;

export interface CaseRecord {
  schema: number;
  id: string;
  video: VideoInfo;
  marks: Mark[];
  notes: string;
  /** Since version 2; 'open' for a case migrated from version 1. */
  status: CaseStatus;
  /** Since version 2: trimmed, distinct, 1 to MAX_TAG_CHARS characters each, at most MAX_TAGS. */
  tags: string[];
  /**
   * Since version 2: earlier versions of this same case that an import met (the other side of a
   * merge), newest first. Never edited, only added to, so a merge cannot lose either side.
   */
  history: CaseVersion[];
  assumptions?: CaseAssumptions;
  createdAt: number;
  updatedAt: number;
  toolVersion: string;
}

/** One earlier version of a case: the record without its own history, and when it was set aside. */
export type CaseVersion = Omit<CaseRecord, 'history'> & { keptAt: number };

export const caseKey = (id: string) => `case:${id}`;

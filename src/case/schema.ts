/**
 * The case model: one measured video, its marks and the assumptions behind its figures. Stored one
 * key per case (`case:<id>`), versioned so that later schema changes migrate in order
 * (migrate.ts holds the steps; every read and every import runs them before validating).
 *
 * Version 1: video, marks, notes, assumptions. Version 2 (the case log): status, tags, history.
 */
export const SCHEMA_VERSION = 2;

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
  | 'object-centre';

export const MARK_KINDS: readonly MarkKind[] = ['object-span', 'landmark-span', 'frame-edges', 'lane-dash', 'object-centre'];

/** Points a kind takes. */
export const POINTS_PER_KIND: Readonly<Record<MarkKind, number>> = {
  'object-span': 2,
  'landmark-span': 2,
  'frame-edges': 2,
  'lane-dash': 1,
  'object-centre': 1,
};

export interface Point {
  /** Intrinsic video pixels (videoWidth x videoHeight space), x right, y down. */
  x: number;
  y: number;
}

/** How CSS pixels were mapped to intrinsic pixels when the mark was made (for audit, not for maths). */
export interface DisplayMappingRecord {
  objectFit: string;
  objectPosition: string;
  /** Rendered picture rectangle in CSS px relative to the element's content box. */
  picture: { x: number; y: number; width: number; height: number };
  /** CSS transform scale of the element (1 when none). */
  scale: number;
  devicePixelRatio: number;
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
  /** Landmark identity, so several landmark marks can be told apart. */
  landmarkId?: string;
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
  landmarkSizeM: Range;
  /** The observer's ground speed, m/s; absent until the user gives or measures it. */
  observerSpeedMs?: Range;
  /**
   * The broken lane-line cycle on the road (lanes.ts id): when set and two or more lane-dash
   * passes are marked, the observer's speed is measured from them instead of taken as given.
   */
  laneCycleId?: string;
  /** What the object is taken to be, for the plausibility verdict (plausibility.ts ObjectKind). */
  objectKind?: 'fixed-wing-transport' | 'fixed-wing-light' | 'light-sport' | 'rotorcraft' | 'unknown';
  /** Which way the object moves against the observer's travel; absent or 'unknown': every reading is shown. */
  direction?: 'opposite' | 'same' | 'unknown';
  /** Wind component against the object's motion, m/s (negative: a tailwind); absent: no wind assumed. */
  headwindMs?: Range;
  /**
   * The camera kept its aim (a tripod, or a mount fixed to the vehicle): marks then give bearings,
   * and bearings with ranges give the object's ground track. axisHeadingDeg is the optical axis
   * against the observer's direction of travel (0 ahead, 90 to the right, -90 to the left).
   */
  fixedCamera?: { mount: 'tripod' | 'vehicle'; axisHeadingDeg: Range };
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

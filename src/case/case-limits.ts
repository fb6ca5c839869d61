/**
 * The case model: one measured video, its marks and the assumptions behind its figures. Stored one
 * key per case (`case:<id>`), versioned so that later schema changes migrate in order
 * (migrate.ts holds the steps; every read and every import runs them before validating). The
 * record's shape is defined once, in shape.ts; this module holds its constants and types only.
 *
 * Version 1: video, marks, notes, assumptions. Version 2 (the case log): status, tags, history.
 * Version 3 (honest figures in every regime): marks of the horizon, the picture's top and bottom
 * edges and the road ahead; a landmark's own dimension and size; the track's angle to the road, the
 * camera's height and pitch, the object's elevation, and who passes whom.
 */
export const SCHEMA_VERSION = 3;

/**
 * What a mark measures, and how many points each kind takes:
 * object-span: the object's apparent span, two ends;
 * landmark-span: a landmark's span, for an object that seems pinned over it, two ends;
 * frame-edges: the camera frame's left and right edges inside the video (pillarbox, crop), two points;
 * lane-dash: a lane dash's leading edge passing the reference line, one point;
 * object-centre: the object's centre, for fixed-camera clips, one point;
 * frame-top-bottom: the camera frame's top and bottom edges (letterbox, crop), two points (since version 3);
 * horizon: two points on the true horizon (flat ground or sea, not a skyline of hills), the camera's pitch and roll (since version 3);
 * road-ahead: where the road ahead vanishes, for a camera that kept its aim, one point (since version 3).
 */
export const MARK_KINDS = ['object-span', 'landmark-span', 'frame-edges', 'lane-dash', 'object-centre', 'frame-top-bottom', 'horizon', 'road-ahead'] as const;
export type MarkKind = (typeof MARK_KINDS)[number];

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

/** Where a moderator stands on a case: our own three words. */
export const CASE_STATUSES = ['open', 'explained', 'second-look'] as const;
export type CaseStatus = (typeof CASE_STATUSES)[number];

/** Limits on what a moderator writes (shape.ts holds them; the log view can show them). */
export const MAX_NOTES_CHARS = 20_000;
export const MAX_TAGS = 20;
export const MAX_TAG_CHARS = 40;
/** Earlier versions one case keeps; an import that would need more is refused, never trimmed. */
export const MAX_HISTORY = 50;

/**
 * Marks one case may hold. A real case has tens; ten thousand is far past any clip and still
 * keeps one record well inside the storage quota (a mark is about 300 bytes of JSON).
 */
export const MAX_MARKS_PER_CASE = 10_000;

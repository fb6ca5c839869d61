import { SCHEMA_VERSION, type CaseAssumptions, type CaseRecord, type CaseStatus, type Mark, type Point, type VideoInfo } from './schema';

/** A new, empty case for a video: open, untagged, with no earlier versions. */
export function newCase(id: string, video: VideoInfo, toolVersion: string, now: number): CaseRecord {
  return { schema: SCHEMA_VERSION, id, video, marks: [], notes: '', status: 'open', tags: [], history: [], createdAt: now, updatedAt: now, toolVersion };
}

/** The case with a mark added, or replaced when one with the same id exists (a nudged end). Non-mutating. */
export function upsertMark(c: CaseRecord, mark: Mark, now: number): CaseRecord {
  const i = c.marks.findIndex((m) => m.id === mark.id);
  const marks = i < 0 ? [...c.marks, mark] : c.marks.map((m, j) => (j === i ? mark : m));
  return { ...c, marks, updatedAt: now };
}

/** The case without the mark of that id. Non-mutating. */
export function removeMark(c: CaseRecord, markId: string, now: number): CaseRecord {
  return { ...c, marks: c.marks.filter((m) => m.id !== markId), updatedAt: now };
}

/** The case's video details refreshed (title, duration learned later), keeping everything else. */
export function withVideo(c: CaseRecord, video: VideoInfo, now: number): CaseRecord {
  return { ...c, video, updatedAt: now };
}

/** The case with its assumptions set. Non-mutating. */
export function withAssumptions(c: CaseRecord, assumptions: CaseAssumptions, now: number): CaseRecord {
  return { ...c, assumptions, updatedAt: now };
}

/**
 * The case with the moderator's notes, status and tags set, each only when given (a field left
 * out keeps its value, so two views editing different fields do not undo each other). Validate
 * the values first (validate.ts validateNotes, validateStatus, normaliseTags). Non-mutating.
 */
export function withAnnotation(c: CaseRecord, a: { notes?: string; status?: CaseStatus; tags?: string[] }, now: number): CaseRecord {
  return {
    ...c,
    ...(a.notes !== undefined ? { notes: a.notes } : {}),
    ...(a.status !== undefined ? { status: a.status } : {}),
    ...(a.tags !== undefined ? { tags: [...a.tags] } : {}),
    updatedAt: now,
  };
}

/**
 * The dimension a landmark span was marked along, from its direction: an upright landmark (a mast,
 * a tower) is marked from its foot up to its top, so a span nearer the vertical is its height and one
 * nearer the level is a width. Stored with the mark; nothing else has to be chosen to mark a landmark.
 */
export function landmarkDimensionOf(points: readonly Point[]): 'height' | 'width' {
  const [a, b] = points as [Point, Point];
  return Math.abs(b.y - a.y) >= Math.abs(b.x - a.x) ? 'height' : 'width';
}

import { LANE_CYCLES } from '../engine/lanes';
import {
  CASE_STATUSES,
  MARK_KINDS,
  MAX_HISTORY,
  MAX_NOTES_CHARS,
  MAX_TAG_CHARS,
  MAX_TAGS,
  POINTS_PER_KIND,
  SCHEMA_VERSION,
  type CaseAssumptions,
  type CaseRecord,
  type CaseStatus,
  type CaseVersion,
  type Mark,
} from './schema';

/** A record that does not match the schema: the message names the path of the first bad field. */
export class CaseFormatError extends Error {
  readonly path: string;
  constructor(path: string, problem: string) {
    super(`${path}: ${problem}`);
    this.name = 'CaseFormatError';
    this.path = path;
  }
}

/**
 * Marks one case may hold. A real case has tens; ten thousand is far past any clip and still
 * keeps one record well inside the storage quota (a mark is about 300 bytes of JSON).
 */
export const MAX_MARKS_PER_CASE = 10_000;
const MAX_PX = 20_000;
const OBJECT_KINDS = ['fixed-wing-transport', 'fixed-wing-light', 'light-sport', 'rotorcraft', 'unknown'];
const DIMENSIONS = ['wingspan', 'length', 'height', 'other'];

/**
 * Validates an unknown value as a CaseRecord of the current schema; throws CaseFormatError. Run
 * migrate.ts first for anything read from storage or a file (readCaseRecord does both).
 */
export function validateCase(x: unknown, path = 'case'): CaseRecord {
  const o = validateBody(x, path);
  if (!Array.isArray(o.history)) throw new CaseFormatError(`${path}.history`, 'expected a list');
  if (o.history.length > MAX_HISTORY) throw new CaseFormatError(`${path}.history`, `expected at most ${MAX_HISTORY} earlier versions, got ${o.history.length}`);
  o.history.forEach((h, i) => {
    const hp = `${path}.history[${i}]`;
    const v = validateVersion(h, hp);
    // a version of another case would be a different case hidden inside this one
    if (v.id !== o.id) throw new CaseFormatError(`${hp}.id`, `expected the case's own id ${String(o.id)}, got ${String(v.id)}`);
  });
  return x as CaseRecord;
}

/** Validates one earlier version (the record's fields without history, plus keptAt). */
export function validateVersion(x: unknown, path: string): CaseVersion {
  const v = validateBody(x, path);
  if ('history' in v) throw new CaseFormatError(`${path}.history`, 'an earlier version holds no history of its own');
  num(v.keptAt, `${path}.keptAt`, 0, 1e14);
  return x as CaseVersion;
}

/** Everything a record and an earlier version share; returns the object for the caller's extra checks. */
function validateBody(x: unknown, path: string): Record<string, unknown> {
  const o = obj(x, path);
  if (o.schema !== SCHEMA_VERSION) throw new CaseFormatError(`${path}.schema`, `expected ${SCHEMA_VERSION}, got ${String(o.schema)}`);
  str(o.id, `${path}.id`, 1, 200);
  const v = obj(o.video, `${path}.video`);
  str(v.pageUrl, `${path}.video.pageUrl`, 0, 8192);
  str(v.pageTitle, `${path}.video.pageTitle`, 0, 2000);
  str(v.src, `${path}.video.src`, 0, 8192);
  num(v.width, `${path}.video.width`, 1, MAX_PX);
  num(v.height, `${path}.video.height`, 1, MAX_PX);
  if (v.duration !== null) num(v.duration, `${path}.video.duration`, 0, 1e7);
  if (!Array.isArray(o.marks)) throw new CaseFormatError(`${path}.marks`, 'expected a list');
  if (o.marks.length > MAX_MARKS_PER_CASE) {
    throw new CaseFormatError(`${path}.marks`, `expected at most ${MAX_MARKS_PER_CASE} marks, got ${o.marks.length}`);
  }
  o.marks.forEach((m, i) => validateMark(m, `${path}.marks[${i}]`, v.width as number, v.height as number));
  validateNotes(o.notes, `${path}.notes`);
  validateStatus(o.status, `${path}.status`);
  validateTags(o.tags, `${path}.tags`);
  if (o.assumptions !== undefined) validateAssumptions(o.assumptions, `${path}.assumptions`);
  num(o.createdAt, `${path}.createdAt`, 0, 1e14);
  num(o.updatedAt, `${path}.updatedAt`, 0, 1e14);
  str(o.toolVersion, `${path}.toolVersion`, 1, 50);
  return o;
}

export function validateNotes(x: unknown, path: string): string {
  str(x, path, 0, MAX_NOTES_CHARS);
  return x as string;
}

export function validateStatus(x: unknown, path: string): CaseStatus {
  if (!CASE_STATUSES.includes(x as CaseStatus)) throw new CaseFormatError(path, `expected one of ${CASE_STATUSES.join(', ')}, got ${describe(x)}`);
  return x as CaseStatus;
}

/** Stored tags: already trimmed and distinct (normaliseTags makes them so from what a user typed). */
export function validateTags(x: unknown, path: string): string[] {
  if (!Array.isArray(x)) throw new CaseFormatError(path, 'expected a list');
  if (x.length > MAX_TAGS) throw new CaseFormatError(path, `expected at most ${MAX_TAGS} tags, got ${x.length}`);
  const seen = new Set<string>();
  x.forEach((t, i) => {
    str(t, `${path}[${i}]`, 1, MAX_TAG_CHARS);
    if ((t as string).trim() !== t) throw new CaseFormatError(`${path}[${i}]`, 'expected no spaces at either end');
    if (seen.has(t as string)) throw new CaseFormatError(`${path}[${i}]`, `"${t as string}" is already a tag of this case`);
    seen.add(t as string);
  });
  return x as string[];
}

/**
 * Tags as a user gave them: each trimmed, blanks and repeats dropped (the first spelling kept),
 * then held to the stored limits, so the message names the tag that is too long or one too many.
 */
export function normaliseTags(x: unknown, path = 'tags'): string[] {
  if (!Array.isArray(x)) throw new CaseFormatError(path, 'expected a list');
  const out: string[] = [];
  x.forEach((t, i) => {
    if (typeof t !== 'string') throw new CaseFormatError(`${path}[${i}]`, 'expected text');
    const s = t.trim();
    if (s !== '' && !out.includes(s)) out.push(s);
  });
  return validateTags(out, path);
}

export function validateAssumptions(x: unknown, path: string): CaseAssumptions {
  const a = obj(x, path);
  str(a.cameraLabel, `${path}.cameraLabel`, 0, 200);
  str(a.sizeLabel, `${path}.sizeLabel`, 0, 200);
  range(a.hfovDeg, `${path}.hfovDeg`, 0.01, 179.9);
  range(a.objectSizeM, `${path}.objectSizeM`, 0.001, 1000);
  if (a.sizeDimension !== undefined && a.sizeDimension !== 'wingspan' && a.sizeDimension !== 'length') {
    throw new CaseFormatError(`${path}.sizeDimension`, 'expected one of wingspan, length');
  }
  range(a.aspectDeg, `${path}.aspectDeg`, 0.01, 179.99);
  range(a.landmarkSizeM, `${path}.landmarkSizeM`, 0.001, 1000);
  if (a.landmarkSizes !== undefined) {
    if (!Array.isArray(a.landmarkSizes) || a.landmarkSizes.length > 100) throw new CaseFormatError(`${path}.landmarkSizes`, 'expected a list of at most 100 landmarks');
    const ids = new Set<string>();
    a.landmarkSizes.forEach((l, i) => {
      const e = obj(l, `${path}.landmarkSizes[${i}]`);
      str(e.id, `${path}.landmarkSizes[${i}].id`, 1, 100);
      if (ids.has(e.id as string)) throw new CaseFormatError(`${path}.landmarkSizes[${i}].id`, `"${e.id as string}" has a size already`);
      ids.add(e.id as string);
      range(e.sizeM, `${path}.landmarkSizes[${i}].sizeM`, 0.001, 1000);
    });
  }
  if (a.landmarkAspectDeg !== undefined) range(a.landmarkAspectDeg, `${path}.landmarkAspectDeg`, 0.01, 179.99);
  if (a.trackAngleDeg !== undefined) range(a.trackAngleDeg, `${path}.trackAngleDeg`, -80, 80);
  if (a.cameraHeightM !== undefined) range(a.cameraHeightM, `${path}.cameraHeightM`, 0, 1000);
  if (a.elevationDeg !== undefined) range(a.elevationDeg, `${path}.elevationDeg`, -30, 85);
  if (a.observerSpeedMs !== undefined) range(a.observerSpeedMs, `${path}.observerSpeedMs`, 0, 1000);
  if (a.laneCycleId !== undefined && !LANE_CYCLES.some((l) => l.id === a.laneCycleId)) {
    throw new CaseFormatError(`${path}.laneCycleId`, `expected one of ${LANE_CYCLES.map((l) => l.id).join(', ')}`);
  }
  if (a.objectKind !== undefined && !OBJECT_KINDS.includes(a.objectKind as string)) {
    throw new CaseFormatError(`${path}.objectKind`, `expected one of ${OBJECT_KINDS.join(', ')}`);
  }
  const directions = ['opposite', 'same', 'same-slower', 'same-faster', 'unknown'];
  if (a.direction !== undefined && !directions.includes(a.direction as string)) {
    throw new CaseFormatError(`${path}.direction`, `expected one of ${directions.join(', ')}`);
  }
  // a headwind beyond hurricane force (Beaufort 12 starts at 32.7 m/s, WMO) is a typing slip
  if (a.headwindMs !== undefined) range(a.headwindMs, `${path}.headwindMs`, -60, 60);
  if (a.fixedCamera !== undefined) {
    const f = obj(a.fixedCamera, `${path}.fixedCamera`);
    if (f.mount !== 'tripod' && f.mount !== 'vehicle') throw new CaseFormatError(`${path}.fixedCamera.mount`, 'expected one of tripod, vehicle');
    range(f.axisHeadingDeg, `${path}.fixedCamera.axisHeadingDeg`, -180, 180);
    if (f.pitchDeg !== undefined) range(f.pitchDeg, `${path}.fixedCamera.pitchDeg`, -89, 89);
  }
  return x as CaseAssumptions;
}

function range(x: unknown, path: string, min: number, max: number): void {
  const r = obj(x, path);
  num(r.lo, `${path}.lo`, min, max);
  num(r.hi, `${path}.hi`, min, max);
  if ((r.hi as number) < (r.lo as number)) throw new CaseFormatError(path, `low end ${String(r.lo)} is above the high end ${String(r.hi)}`);
}

export function validateMark(x: unknown, path: string, videoWidth: number, videoHeight: number): Mark {
  const m = obj(x, path);
  str(m.id, `${path}.id`, 1, 100);
  if (!MARK_KINDS.includes(m.kind as Mark['kind'])) {
    throw new CaseFormatError(`${path}.kind`, `expected one of ${MARK_KINDS.join(', ')}`);
  }
  num(m.t, `${path}.t`, 0, 1e7);
  if (!Array.isArray(m.points) || m.points.length !== POINTS_PER_KIND[m.kind as Mark['kind']]) {
    throw new CaseFormatError(`${path}.points`, `expected ${POINTS_PER_KIND[m.kind as Mark['kind']]} points for ${String(m.kind)}`);
  }
  m.points.forEach((p, j) => {
    const q = obj(p, `${path}.points[${j}]`);
    // a point may sit a little past the picture (an end snapped at the edge); far outside is an error
    num(q.x, `${path}.points[${j}].x`, -videoWidth, 2 * videoWidth);
    num(q.y, `${path}.points[${j}].y`, -videoHeight, 2 * videoHeight);
  });
  num(m.edgeSigmaPx, `${path}.edgeSigmaPx`, 0, 50);
  if (m.dimension !== undefined && !DIMENSIONS.includes(m.dimension as string)) {
    throw new CaseFormatError(`${path}.dimension`, `expected one of ${DIMENSIONS.join(', ')}`);
  }
  if (m.landmarkId !== undefined) str(m.landmarkId, `${path}.landmarkId`, 1, 100);
  if (m.landmarkDimension !== undefined && m.landmarkDimension !== 'height' && m.landmarkDimension !== 'width') {
    throw new CaseFormatError(`${path}.landmarkDimension`, 'expected one of height, width');
  }
  if (m.by !== undefined) str(m.by, `${path}.by`, 1, 100);
  obj(m.mapping, `${path}.mapping`);
  num(m.createdAt, `${path}.createdAt`, 0, 1e14);
  return x as Mark;
}

function obj(x: unknown, path: string): Record<string, unknown> {
  if (typeof x !== 'object' || x === null || Array.isArray(x)) throw new CaseFormatError(path, 'expected an object');
  return x as Record<string, unknown>;
}
function str(x: unknown, path: string, min: number, max: number): void {
  if (typeof x !== 'string') throw new CaseFormatError(path, 'expected text');
  // characters as a reader counts them (code points, as JSON Schema's maxLength does), not UTF-16 units
  const n = codePoints(x);
  if (n < min || n > max) throw new CaseFormatError(path, `expected ${min} to ${max} characters, got ${n}`);
}
function surrogatePairs(s: string): number {
  let pairs = 0;
  for (let i = 0; i < s.length - 1; i++) {
    const c = s.charCodeAt(i);
    if (c >= 0xd800 && c <= 0xdbff) {
      const d = s.charCodeAt(i + 1);
      if (d >= 0xdc00 && d <= 0xdfff) {
        pairs++;
        i++;
      }
    }
  }
  return pairs;
}
function codePoints(s: string): number {
  return s.length - surrogatePairs(s);
}
function describe(x: unknown): string {
  return typeof x === 'string' ? `"${x.length > 40 ? `${x.slice(0, 40)}…` : x}"` : x === undefined ? 'nothing' : JSON.stringify(x) ?? String(x);
}
function num(x: unknown, path: string, min: number, max: number): void {
  if (typeof x !== 'number' || !Number.isFinite(x)) throw new CaseFormatError(path, 'expected a finite number');
  if (x < min || x > max) throw new CaseFormatError(path, `expected ${min} to ${max}, got ${x}`);
}

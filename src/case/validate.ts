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
  type DisplayMappingRecord,
  type Mark,
  type Range,
  type VideoInfo,
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
const OBJECT_KINDS = ['fixed-wing-transport', 'fixed-wing-light', 'light-sport', 'rotorcraft', 'unknown'] as const;
const DIMENSIONS = ['wingspan', 'length', 'height', 'other'] as const;

/*
 * Every validator below builds what it returns from the fields it knows, in the schema's order:
 * a field the schema does not list is dropped, never stored (it is used by no figure, and a value
 * kept unread could be anything: a deep junk tree, a second copy of the case). A known field that
 * is wrong is refused, naming its path. A field given as undefined counts as absent.
 */

/**
 * Validates an unknown value as a CaseRecord of the current schema; throws CaseFormatError. Run
 * migrate.ts first for anything read from storage or a file (readCaseRecord does both). Returns a
 * new record of the known fields only.
 */
export function validateCase(x: unknown, path = 'case'): CaseRecord {
  const o = obj(x, path);
  const body = validateBody(o, path);
  if (!Array.isArray(o.history)) throw new CaseFormatError(`${path}.history`, 'expected a list');
  if (o.history.length > MAX_HISTORY) throw new CaseFormatError(`${path}.history`, `expected at most ${MAX_HISTORY} earlier versions, got ${o.history.length}`);
  const history = o.history.map((h, i) => {
    const hp = `${path}.history[${i}]`;
    const v = validateVersion(h, hp);
    // a version of another case would be a different case hidden inside this one
    if (v.id !== body.id) throw new CaseFormatError(`${hp}.id`, `expected the case's own id ${body.id}, got ${v.id}`);
    return v;
  });
  const { assumptions, createdAt, updatedAt, toolVersion, ...front } = body;
  return { ...front, history, ...(assumptions ? { assumptions } : {}), createdAt, updatedAt, toolVersion };
}

/** Validates one earlier version (the record's fields without history, plus keptAt). */
export function validateVersion(x: unknown, path: string): CaseVersion {
  const o = obj(x, path);
  const body = validateBody(o, path);
  if ('history' in o) throw new CaseFormatError(`${path}.history`, 'an earlier version holds no history of its own');
  return { ...body, keptAt: num(o.keptAt, `${path}.keptAt`, 0, 1e14) };
}

/** Everything a record and an earlier version share, built from the known fields. */
function validateBody(o: Record<string, unknown>, path: string): Omit<CaseVersion, 'keptAt'> {
  if (o.schema !== SCHEMA_VERSION) throw new CaseFormatError(`${path}.schema`, `expected ${SCHEMA_VERSION}, got ${String(o.schema)}`);
  const id = str(o.id, `${path}.id`, 1, 200);
  const video = validateVideo(o.video, `${path}.video`);
  if (!Array.isArray(o.marks)) throw new CaseFormatError(`${path}.marks`, 'expected a list');
  if (o.marks.length > MAX_MARKS_PER_CASE) {
    throw new CaseFormatError(`${path}.marks`, `expected at most ${MAX_MARKS_PER_CASE} marks, got ${o.marks.length}`);
  }
  const marks = o.marks.map((m, i) => validateMark(m, `${path}.marks[${i}]`, video.width, video.height));
  const notes = validateNotes(o.notes, `${path}.notes`);
  const status = validateStatus(o.status, `${path}.status`);
  const tags = validateTags(o.tags, `${path}.tags`);
  const assumptions = o.assumptions !== undefined ? validateAssumptions(o.assumptions, `${path}.assumptions`) : undefined;
  const createdAt = num(o.createdAt, `${path}.createdAt`, 0, 1e14);
  const updatedAt = num(o.updatedAt, `${path}.updatedAt`, 0, 1e14);
  const toolVersion = str(o.toolVersion, `${path}.toolVersion`, 1, 50);
  return { schema: SCHEMA_VERSION, id, video, marks, notes, status, tags, ...(assumptions ? { assumptions } : {}), createdAt, updatedAt, toolVersion };
}

/**
 * The video's addresses. The page address is what the log opens and what a case is about: one
 * on another scheme (javascript:, data:) is refused, naming the field. The media address only
 * informs (the case id was made from it); one on another scheme (data:, blob:) is what an empty
 * address already means, a media with no address of its own, so it is read as empty.
 */
function validateVideo(x: unknown, path: string): VideoInfo {
  const v = obj(x, path);
  const pageUrl = str(v.pageUrl, `${path}.pageUrl`, 0, 8192);
  if (!isKeptAddress(pageUrl)) {
    throw new CaseFormatError(`${path}.pageUrl`, `expected an ${KEPT_SCHEMES_TEXT} address (or nothing), got ${describe(pageUrl)}`);
  }
  const pageTitle = str(v.pageTitle, `${path}.pageTitle`, 0, 2000);
  const src = str(v.src, `${path}.src`, 0, 8192);
  const width = num(v.width, `${path}.width`, 1, MAX_PX);
  const height = num(v.height, `${path}.height`, 1, MAX_PX);
  const duration = v.duration === null ? null : num(v.duration, `${path}.duration`, 0, 1e7);
  return { pageUrl, pageTitle, src: isKeptAddress(src) ? src : '', width, height, duration };
}

/** Schemes a stored address may have (as case-file.schema.json's pattern says), or none when empty. */
export const KEPT_SCHEMES = ['http', 'https', 'file'] as const;
const KEPT_SCHEMES_TEXT = 'http, https or file';
/**
 * True for '' and for an address that starts with one of KEPT_SCHEMES and a colon (a scheme is
 * case-insensitive, RFC 3986 section 3.1). Read from the first character: a URL parser strips
 * leading spaces and drops tabs inside a scheme ("java\tscript:"), a prefix test does not.
 */
export function isKeptAddress(s: string): boolean {
  return s === '' || /^(?:https?|file):/i.test(s);
}

export function validateNotes(x: unknown, path: string): string {
  return str(x, path, 0, MAX_NOTES_CHARS);
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
  return [...(x as string[])];
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

const SIZE_DIMENSIONS = ['wingspan', 'length'] as const;
const DIRECTIONS = ['opposite', 'same', 'same-slower', 'same-faster', 'unknown'] as const;

export function validateAssumptions(x: unknown, path: string): CaseAssumptions {
  const a = obj(x, path);
  const cameraLabel = str(a.cameraLabel, `${path}.cameraLabel`, 0, 200);
  const sizeLabel = str(a.sizeLabel, `${path}.sizeLabel`, 0, 200);
  const hfovDeg = range(a.hfovDeg, `${path}.hfovDeg`, 0.01, 179.9);
  const objectSizeM = range(a.objectSizeM, `${path}.objectSizeM`, 0.001, 1000);
  const sizeDimension = a.sizeDimension === undefined ? undefined : oneOf(a.sizeDimension, `${path}.sizeDimension`, SIZE_DIMENSIONS);
  const aspectDeg = range(a.aspectDeg, `${path}.aspectDeg`, 0.01, 179.99);
  const landmarkSizeM = range(a.landmarkSizeM, `${path}.landmarkSizeM`, 0.001, 1000);
  let landmarkSizes: CaseAssumptions['landmarkSizes'];
  if (a.landmarkSizes !== undefined) {
    if (!Array.isArray(a.landmarkSizes) || a.landmarkSizes.length > 100) throw new CaseFormatError(`${path}.landmarkSizes`, 'expected a list of at most 100 landmarks');
    const ids = new Set<string>();
    landmarkSizes = a.landmarkSizes.map((l, i) => {
      const e = obj(l, `${path}.landmarkSizes[${i}]`);
      const id = str(e.id, `${path}.landmarkSizes[${i}].id`, 1, 100);
      if (ids.has(id)) throw new CaseFormatError(`${path}.landmarkSizes[${i}].id`, `"${id}" has a size already`);
      ids.add(id);
      return { id, sizeM: range(e.sizeM, `${path}.landmarkSizes[${i}].sizeM`, 0.001, 1000) };
    });
  }
  const opt = (k: string, min: number, max: number) => (a[k] === undefined ? undefined : range(a[k], `${path}.${k}`, min, max));
  const landmarkAspectDeg = opt('landmarkAspectDeg', 0.01, 179.99);
  const trackAngleDeg = opt('trackAngleDeg', -80, 80);
  const cameraHeightM = opt('cameraHeightM', 0, 1000);
  const elevationDeg = opt('elevationDeg', -30, 85);
  const observerSpeedMs = opt('observerSpeedMs', 0, 1000);
  const laneCycleId = a.laneCycleId === undefined ? undefined : oneOf(a.laneCycleId, `${path}.laneCycleId`, LANE_CYCLES.map((l) => l.id));
  const objectKind = a.objectKind === undefined ? undefined : oneOf(a.objectKind, `${path}.objectKind`, OBJECT_KINDS);
  const direction = a.direction === undefined ? undefined : oneOf(a.direction, `${path}.direction`, DIRECTIONS);
  // a headwind beyond hurricane force (Beaufort 12 starts at 32.7 m/s, WMO) is a typing slip
  const headwindMs = opt('headwindMs', -60, 60);
  let fixedCamera: CaseAssumptions['fixedCamera'];
  if (a.fixedCamera !== undefined) {
    const f = obj(a.fixedCamera, `${path}.fixedCamera`);
    if (f.mount !== 'tripod' && f.mount !== 'vehicle') throw new CaseFormatError(`${path}.fixedCamera.mount`, 'expected one of tripod, vehicle');
    const axisHeadingDeg = range(f.axisHeadingDeg, `${path}.fixedCamera.axisHeadingDeg`, -180, 180);
    const pitchDeg = f.pitchDeg === undefined ? undefined : range(f.pitchDeg, `${path}.fixedCamera.pitchDeg`, -89, 89);
    fixedCamera = { mount: f.mount, axisHeadingDeg, ...(pitchDeg ? { pitchDeg } : {}) };
  }
  return defined<CaseAssumptions>({
    cameraLabel,
    hfovDeg,
    sizeLabel,
    objectSizeM,
    sizeDimension,
    aspectDeg,
    landmarkSizeM,
    landmarkSizes,
    landmarkAspectDeg,
    observerSpeedMs,
    laneCycleId,
    objectKind,
    direction,
    trackAngleDeg,
    cameraHeightM,
    elevationDeg,
    headwindMs,
    fixedCamera,
  });
}

function range(x: unknown, path: string, min: number, max: number): Range {
  const r = obj(x, path);
  const lo = num(r.lo, `${path}.lo`, min, max);
  const hi = num(r.hi, `${path}.hi`, min, max);
  if (hi < lo) throw new CaseFormatError(path, `low end ${lo} is above the high end ${hi}`);
  return { lo, hi };
}

export function validateMark(x: unknown, path: string, videoWidth: number, videoHeight: number): Mark {
  const m = obj(x, path);
  const id = str(m.id, `${path}.id`, 1, 100);
  if (!MARK_KINDS.includes(m.kind as Mark['kind'])) {
    throw new CaseFormatError(`${path}.kind`, `expected one of ${MARK_KINDS.join(', ')}`);
  }
  const kind = m.kind as Mark['kind'];
  const t = num(m.t, `${path}.t`, 0, 1e7);
  if (!Array.isArray(m.points) || m.points.length !== POINTS_PER_KIND[kind]) {
    throw new CaseFormatError(`${path}.points`, `expected ${POINTS_PER_KIND[kind]} points for ${kind}`);
  }
  const points = m.points.map((p, j) => {
    const q = obj(p, `${path}.points[${j}]`);
    // a point may sit a little past the picture (an end snapped at the edge); far outside is an error
    return { x: num(q.x, `${path}.points[${j}].x`, -videoWidth, 2 * videoWidth), y: num(q.y, `${path}.points[${j}].y`, -videoHeight, 2 * videoHeight) };
  });
  const edgeSigmaPx = num(m.edgeSigmaPx, `${path}.edgeSigmaPx`, 0, 50);
  const dimension = m.dimension === undefined ? undefined : oneOf(m.dimension, `${path}.dimension`, DIMENSIONS);
  const landmarkId = m.landmarkId === undefined ? undefined : str(m.landmarkId, `${path}.landmarkId`, 1, 100);
  const landmarkDimension = m.landmarkDimension === undefined ? undefined : oneOf(m.landmarkDimension, `${path}.landmarkDimension`, LANDMARK_DIMENSIONS);
  const by = m.by === undefined ? undefined : str(m.by, `${path}.by`, 1, 100);
  const mapping = validateMapping(m.mapping, `${path}.mapping`);
  const createdAt = num(m.createdAt, `${path}.createdAt`, 0, 1e14);
  return defined<Mark>({ id, kind, t, points, edgeSigmaPx, dimension, landmarkId, landmarkDimension, mapping, by, createdAt });
}

/**
 * How the mark's pixels were mapped: kept for audit and used by no figure, so each field is
 * optional (the schema never required them); a field given must have its type, and anything else
 * in the object is dropped.
 */
function validateMapping(x: unknown, path: string): DisplayMappingRecord {
  const o = obj(x, path);
  const text = (k: string) => (o[k] === undefined ? undefined : str(o[k], `${path}.${k}`, 0, 200));
  const n = (r: Record<string, unknown>, k: string, p: string) => (r[k] === undefined ? undefined : num(r[k], `${p}.${k}`, -1e7, 1e7));
  let picture: DisplayMappingRecord['picture'];
  if (o.picture !== undefined) {
    const r = obj(o.picture, `${path}.picture`);
    const pp = `${path}.picture`;
    picture = defined({ x: n(r, 'x', pp), y: n(r, 'y', pp), width: n(r, 'width', pp), height: n(r, 'height', pp) });
  }
  return defined<DisplayMappingRecord>({
    objectFit: text('objectFit'),
    objectPosition: text('objectPosition'),
    picture,
    scale: n(o, 'scale', path),
    devicePixelRatio: n(o, 'devicePixelRatio', path),
  });
}

const LANDMARK_DIMENSIONS = ['height', 'width'] as const;

/** The object without its undefined fields: an absent option stays absent, as JSON would have it. */
function defined<T extends object>(o: T): T {
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(o)) if (v !== undefined) out[k] = v;
  return out as T;
}

function oneOf<T extends string>(x: unknown, path: string, allowed: readonly T[]): T {
  if (!allowed.includes(x as T)) throw new CaseFormatError(path, `expected one of ${allowed.join(', ')}`);
  return x as T;
}

function obj(x: unknown, path: string): Record<string, unknown> {
  if (typeof x !== 'object' || x === null || Array.isArray(x)) throw new CaseFormatError(path, 'expected an object');
  return x as Record<string, unknown>;
}
function str(x: unknown, path: string, min: number, max: number): string {
  if (typeof x !== 'string') throw new CaseFormatError(path, 'expected text');
  // characters as a reader counts them (code points, as JSON Schema's maxLength does), not UTF-16 units
  const n = codePoints(x);
  if (n < min || n > max) throw new CaseFormatError(path, `expected ${min} to ${max} characters, got ${n}`);
  return x;
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
function num(x: unknown, path: string, min: number, max: number): number {
  if (typeof x !== 'number' || !Number.isFinite(x)) throw new CaseFormatError(path, 'expected a finite number');
  if (x < min || x > max) throw new CaseFormatError(path, `expected ${min} to ${max}, got ${x}`);
  return x;
}

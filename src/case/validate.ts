import { LANE_CYCLES } from '../engine/lanes';
import { MARK_KINDS, POINTS_PER_KIND, SCHEMA_VERSION, type CaseAssumptions, type CaseRecord, type Mark } from './schema';

/** A record that does not match the schema: the message names the path of the first bad field. */
export class CaseFormatError extends Error {
  readonly path: string;
  constructor(path: string, problem: string) {
    super(`${path}: ${problem}`);
    this.name = 'CaseFormatError';
    this.path = path;
  }
}

const MAX_MARKS = 100_000;
const MAX_PX = 20_000;

/** Validates an unknown value as a CaseRecord of the current schema; throws CaseFormatError. */
export function validateCase(x: unknown, path = 'case'): CaseRecord {
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
  if (o.marks.length > MAX_MARKS) throw new CaseFormatError(`${path}.marks`, `more than ${MAX_MARKS} marks`);
  o.marks.forEach((m, i) => validateMark(m, `${path}.marks[${i}]`, v.width as number, v.height as number));
  str(o.notes, `${path}.notes`, 0, 100_000);
  if (o.assumptions !== undefined) validateAssumptions(o.assumptions, `${path}.assumptions`);
  num(o.createdAt, `${path}.createdAt`, 0, 1e14);
  num(o.updatedAt, `${path}.updatedAt`, 0, 1e14);
  str(o.toolVersion, `${path}.toolVersion`, 1, 50);
  return x as CaseRecord;
}

export function validateAssumptions(x: unknown, path: string): CaseAssumptions {
  const a = obj(x, path);
  str(a.cameraLabel, `${path}.cameraLabel`, 0, 200);
  str(a.sizeLabel, `${path}.sizeLabel`, 0, 200);
  range(a.hfovDeg, `${path}.hfovDeg`, 0.01, 179.9);
  range(a.objectSizeM, `${path}.objectSizeM`, 0.001, 1000);
  range(a.aspectDeg, `${path}.aspectDeg`, 0.01, 179.99);
  range(a.landmarkSizeM, `${path}.landmarkSizeM`, 0.001, 1000);
  if (a.observerSpeedMs !== undefined) range(a.observerSpeedMs, `${path}.observerSpeedMs`, 0, 1000);
  if (a.laneCycleId !== undefined && !LANE_CYCLES.some((l) => l.id === a.laneCycleId)) {
    throw new CaseFormatError(`${path}.laneCycleId`, `expected one of ${LANE_CYCLES.map((l) => l.id).join(', ')}`);
  }
  const kinds = ['fixed-wing-transport', 'fixed-wing-light', 'light-sport', 'rotorcraft', 'unknown'];
  if (a.objectKind !== undefined && !kinds.includes(a.objectKind as string)) {
    throw new CaseFormatError(`${path}.objectKind`, `expected one of ${kinds.join(', ')}`);
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
  if (x.length < min || x.length > max) throw new CaseFormatError(path, `expected ${min} to ${max} characters, got ${x.length}`);
}
function num(x: unknown, path: string, min: number, max: number): void {
  if (typeof x !== 'number' || !Number.isFinite(x)) throw new CaseFormatError(path, 'expected a finite number');
  if (x < min || x > max) throw new CaseFormatError(path, `expected ${min} to ${max}, got ${x}`);
}

import * as v from 'valibot';
import { CaseFormatError } from './format-error';
import { MAX_MARKS_PER_CASE, type CaseAssumptions, type CaseRecord, type CaseStatus, type CaseVersion, type Mark } from './schema';
import { assumptionsSchema, issuePath, markSchema, notesSchema, pointsWithinVideo, recordSchema, statusSchema, tagsSchema, versionSchema } from './shape';

/*
 * The reader: each function checks a value against its definition in shape.ts and returns a new
 * value of the known fields only (anything else is dropped), or throws CaseFormatError naming the
 * path of the first bad field and what it allows. valibot stops at the first issue (abortEarly),
 * fields in the order the definition lists them.
 */
export { CaseFormatError } from './format-error';
export { KEPT_SCHEMES, isKeptAddress } from './shape';
export { MAX_MARKS_PER_CASE };

const FIRST_ONLY = { abortEarly: true } as const;

/** Checks x against one of shape.ts's definitions, naming the first bad field's path from `path`. */
export function readAgainst<S extends v.GenericSchema>(schema: S, x: unknown, path: string): v.InferOutput<S> {
  const r = v.safeParse(schema, x, FIRST_ONLY);
  if (r.success) return r.output;
  const issue = r.issues[0];
  throw new CaseFormatError(issuePath(issue, path), issue.message);
}

/**
 * Validates an unknown value as a CaseRecord of the current schema; throws CaseFormatError. Run
 * migrate.ts first for anything read from storage or a file (readCaseRecord does both). Returns a
 * new record of the known fields only.
 */
export function validateCase(x: unknown, path = 'case'): CaseRecord {
  return readAgainst(recordSchema, x, path);
}

/** Validates one earlier version (the record's fields without history, plus keptAt). */
export function validateVersion(x: unknown, path: string): CaseVersion {
  return readAgainst(versionSchema, x, path);
}

export function validateNotes(x: unknown, path: string): string {
  return readAgainst(notesSchema, x, path);
}

export function validateStatus(x: unknown, path: string): CaseStatus {
  return readAgainst(statusSchema, x, path);
}

/** Stored tags: already trimmed and distinct (normaliseTags makes them so from what a user typed). */
export function validateTags(x: unknown, path: string): string[] {
  return readAgainst(tagsSchema, x, path);
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
  return readAgainst(assumptionsSchema, x, path);
}

/** One mark on its own (the background checks a mark before adding it): its points held to its video. */
export function validateMark(x: unknown, path: string, videoWidth: number, videoHeight: number): Mark {
  const m = readAgainst(markSchema, x, path);
  const bad = pointsWithinVideo([m], videoWidth, videoHeight);
  if (bad) throw new CaseFormatError(`${path}${bad.steps.slice(1).map((k) => (typeof k === 'number' ? `[${k}]` : `.${k}`)).join('')}`, bad.message);
  return m;
}

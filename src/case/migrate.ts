import { MAX_RECORD_NESTING, checkNesting } from './nesting';
import { SCHEMA_VERSION, type CaseRecord } from './schema';
import { CaseFormatError, validateCase } from './validate';

/**
 * Ordered schema migrations. Each step lifts a record from one version to the next and nothing
 * else; `migrate` runs every step from the record's own version up to SCHEMA_VERSION, so a record
 * written by any earlier release is read the same way whether it comes from storage or a file.
 *
 * Rules for a step: it never drops or rewrites what the user entered (marks, notes, times), it
 * only adds fields with their defaults or moves data into a new shape; it does not validate (the
 * caller validates the result, so the message names the field of the current schema); and it
 * must not throw on a malformed record (leave the fault for validation to name).
 *
 * From version 2 on, a record carries earlier versions of itself in `history`: `migrate` applies
 * a step to each of them too, so a step is written for one version's body.
 */
export interface MigrationStep {
  from: number;
  to: number;
  /** What the step changes, for the reader of this list. */
  what: string;
  up(body: Readonly<Record<string, unknown>>): Record<string, unknown>;
}

export const MIGRATIONS: readonly MigrationStep[] = [
  {
    from: 1,
    to: 2,
    what: 'the case log: status (open), tags (none) and history (none) added',
    // version 1 had no history, so this step never meets one
    up: (b) => ({ ...b, schema: 2, status: 'open', tags: [], history: [] }),
  },
  {
    from: 2,
    to: 3,
    what: 'honest figures: new mark kinds and assumptions, all optional, so a version 2 body needs only its number',
    up: (b) => ({ ...b, schema: 3 }),
  },
];

// the list must climb one version at a time up to SCHEMA_VERSION: checked once, on load
MIGRATIONS.forEach((m, i) => {
  if (m.from !== i + 1 || m.to !== m.from + 1) throw new Error(`migration ${i}: expected ${i + 1} -> ${i + 2}, got ${m.from} -> ${m.to}`);
});
if ((MIGRATIONS.at(-1)?.to ?? 1) !== SCHEMA_VERSION) throw new Error(`migrations end at ${MIGRATIONS.at(-1)?.to}, schema is ${SCHEMA_VERSION}`);

/**
 * Lifts a stored or imported record to SCHEMA_VERSION without validating it (validate after).
 * Refuses a record of a version this release does not know, naming the field. Non-mutating; a
 * record already at SCHEMA_VERSION comes back as it is (the same object), so migrating twice is
 * migrating once.
 */
export function migrate(raw: unknown, path = 'case'): unknown {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) throw new CaseFormatError(path, 'expected an object');
  let rec = raw as Record<string, unknown>;
  const from = rec.schema;
  if (typeof from !== 'number' || !Number.isInteger(from) || from < 1) {
    throw new CaseFormatError(`${path}.schema`, `expected a whole number from 1 to ${SCHEMA_VERSION}, got ${JSON.stringify(from) ?? 'nothing'}`);
  }
  if (from > SCHEMA_VERSION) {
    throw new CaseFormatError(
      `${path}.schema`,
      `version ${from} was written by a newer Clip Caliper; this one reads versions 1 to ${SCHEMA_VERSION} (update the extension to read it)`,
    );
  }
  for (const step of MIGRATIONS) {
    if (step.from < from) continue;
    const history = rec.history;
    rec = step.up(rec);
    // earlier versions kept inside the record climb with it (they exist from version 2 on)
    if (step.from >= 2 && Array.isArray(history)) {
      rec.history = history.map((h) => (typeof h === 'object' && h !== null && !Array.isArray(h) ? step.up(h as Record<string, unknown>) : h));
    }
  }
  return rec;
}

/**
 * What every read and every import does: bound the nesting (before anything recurses into the
 * value), migrate, then validate the whole record. Returns the record's known fields only.
 */
export function readCaseRecord(raw: unknown, path = 'case'): CaseRecord {
  checkNesting(raw, path, MAX_RECORD_NESTING);
  return validateCase(migrate(raw, path), path);
}

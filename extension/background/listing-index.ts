import { listingOf } from '../../src/case/catalog';
import type { CaseListing, QuarantineEntry } from '../../src/case/listing';
import { CASE_PREFIX, QUARANTINE_PREFIX, quarantineEntry } from '../../src/case/store-policy';
import { readStoredCase } from '../../src/case/stored';

/*
 * The case log's listings, held in memory once a full read has validated every record, and kept
 * current from then on: every value written to local storage (by this worker, a page or another
 * view) is migrated and validated as it arrives, and its listing replaces the old one. Listing
 * 1 000 cases then needs no read of all storage, which cost more than the rest of the log's first
 * draw. A value that fails validation as it arrives drops the index: the next listing takes the
 * long way, which quarantines it and reports it. A worker the browser stopped starts empty.
 */
let cases: Map<string, CaseListing> | null = null;
let quarantined: Map<string, QuarantineEntry> | null = null;
/** Counts every change seen, indexed or not: a full read that saw changes land meanwhile is not kept. */
let generation = 0;

export function currentGeneration(): number {
  return generation;
}

/** The listings and quarantine entries, or null when the next listing must read everything. */
export function indexed(): { cases: CaseListing[]; quarantined: QuarantineEntry[] } | null {
  if (!cases || !quarantined) return null;
  return { cases: [...cases.values()], quarantined: [...quarantined.values()] };
}

/**
 * Takes the outcome of a full read (every case validated, every quarantine entry read) that began
 * at generation `since`; if anything changed after it began, the read may be stale and is not kept.
 */
export function rebuild(listings: readonly CaseListing[], entries: readonly QuarantineEntry[], since: number): void {
  if (since !== generation) return;
  cases = new Map(listings.map((l) => [`${CASE_PREFIX}${l.id}`, l]));
  quarantined = new Map(entries.map((q) => [q.quarantineKey, q]));
}

export function drop(): void {
  cases = null;
  quarantined = null;
}

/** One key's new value (undefined: removed), from storage.onChanged or from this worker's own write. */
export function applyChange(key: string, value: unknown): void {
  generation++;
  if (!cases || !quarantined) return;
  if (key.startsWith(CASE_PREFIX)) {
    if (value === undefined) {
      cases.delete(key);
      return;
    }
    try {
      cases.set(key, listingOf(readStoredCase(key, value)));
    } catch {
      drop();
    }
  } else if (key.startsWith(QUARANTINE_PREFIX)) {
    if (value === undefined) quarantined.delete(key);
    else quarantined.set(key, quarantineEntry(key, value));
  }
}

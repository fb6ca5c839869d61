import { listingOf } from '../catalog';
import type { CaseListing, QuarantineEntry } from '../listing';
import { CASE_PREFIX, QUARANTINE_PREFIX, quarantineEntry } from '../store-policy';
import { readStoredCase } from '../stored';

/*
 * The case log's listings, held in memory once a full read has validated every record, and kept
 * current from then on: every value written to local storage (by this store, a page or another
 * view) is migrated and validated as it arrives, and its listing replaces the old one. Listing
 * 1 000 cases then needs no read of all storage, which cost more than the rest of the log's first
 * draw. A value that fails validation as it arrives drops the index: the next listing takes the
 * long way, which quarantines it and reports it. A store made afresh (a worker the browser
 * stopped) starts empty.
 */
export class ListingIndex {
  private cases: Map<string, CaseListing> | null = null;
  private quarantined: Map<string, QuarantineEntry> | null = null;
  /** Counts every change seen, indexed or not: a full read that saw changes land meanwhile is not kept. */
  private generation = 0;

  currentGeneration(): number {
    return this.generation;
  }

  /** The listings and quarantine entries, or null when the next listing must read everything. */
  indexed(): { cases: CaseListing[]; quarantined: QuarantineEntry[] } | null {
    if (!this.cases || !this.quarantined) return null;
    return { cases: [...this.cases.values()], quarantined: [...this.quarantined.values()] };
  }

  /**
   * Takes the outcome of a full read (every case validated, every quarantine entry read) that began
   * at generation `since`; if anything changed after it began, the read may be stale and is not kept.
   */
  rebuild(listings: readonly CaseListing[], entries: readonly QuarantineEntry[], since: number): void {
    if (since !== this.generation) return;
    this.cases = new Map(listings.map((l) => [`${CASE_PREFIX}${l.id}`, l]));
    this.quarantined = new Map(entries.map((q) => [q.quarantineKey, q]));
  }

  drop(): void {
    this.cases = null;
    this.quarantined = null;
  }

  /** One key's new value (undefined: removed), from storage.onChanged or from the store's own write. */
  applyChange(key: string, value: unknown): void {
    this.generation++;
    if (!this.cases || !this.quarantined) return;
    if (key.startsWith(CASE_PREFIX)) {
      if (value === undefined) {
        this.cases.delete(key);
        return;
      }
      try {
        this.cases.set(key, listingOf(readStoredCase(key, value)));
      } catch {
        this.drop();
      }
    } else if (key.startsWith(QUARANTINE_PREFIX)) {
      if (value === undefined) this.quarantined.delete(key);
      else this.quarantined.set(key, quarantineEntry(key, value));
    }
  }
}

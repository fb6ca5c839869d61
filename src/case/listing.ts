import type { CaseStatus } from './schema';

/**
 * One line of the case log: what the list shows, searches and filters on, without the marks. The
 * background builds these from the stored records (validated on read); the log view never needs
 * the whole records to draw the list.
 */
export interface CaseListing {
  id: string;
  pageUrl: string;
  pageTitle: string;
  /** The page address's host, for the site filter ('' for an address without one). */
  site: string;
  createdAt: number;
  updatedAt: number;
  status: CaseStatus;
  tags: string[];
  /** The notes, whole: search looks inside them. */
  notes: string;
  markCount: number;
  /** Distinct marked timestamps, seconds, ascending. */
  timestamps: number[];
  /** Names given by whoever marked (no accounts: just the name field), distinct. */
  markedBy: string[];
  /** Earlier versions kept by an import of the same case (0 when none). */
  historyCount: number;
}

/** A stored record that failed validation: kept aside under its own key, never dropped. */
export interface QuarantineEntry {
  /** The storage key it was found under, and the one it is kept under now. */
  key: string;
  quarantineKey: string;
  /** What was wrong, naming the first bad field and its path. */
  reason: string;
  quarantinedAt: number;
}

/** Local storage in use against the browser's quota. */
export interface StorageUsage {
  bytesInUse: number;
  quotaBytes: number;
  /** True once use passes the warning share of the quota (the log and popup say so). */
  nearLimit: boolean;
}

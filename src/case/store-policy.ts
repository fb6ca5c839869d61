import { utf8Length } from './casefile';
import type { QuarantineEntry, StorageUsage } from './listing';
import { CaseFormatError } from './format-error';

/*
 * The case store's rules, kept pure so they are tested without a browser: which keys hold what,
 * what a quarantined record keeps, how much a write weighs against the quota, when to warn.
 * src/case/store/ applies them to a key-value area (browser storage, wired in extension/background/cases.ts).
 */

export const CASE_PREFIX = 'case:';
export const QUARANTINE_PREFIX = 'quarantine:';
/** In storage.session: a deleted case, kept until the browser closes so the delete can be undone. */
export const DELETED_PREFIX = 'deleted:';
/** In storage.session: the timestamp the log asked a page's overlay to seek to. */
export const SEEK_PREFIX = 'seek:';
/**
 * How long a seek waits for the overlay to be called up on its page. Long enough to open the page
 * and find the video; short enough that a page opened hours later does not jump to a timestamp
 * nobody remembers asking for.
 */
export const SEEK_WAIT_MS = 30 * 60 * 1000;

/** The timestamp of a stored seek, or null when there is none, it is malformed or it waited too long. */
export function dueSeek(stored: unknown, now: number): number | null {
  if (typeof stored !== 'object' || stored === null) return null;
  const { t, requestedAt } = stored as { t?: unknown; requestedAt?: unknown };
  if (typeof t !== 'number' || !Number.isFinite(t) || typeof requestedAt !== 'number') return null;
  return now - requestedAt <= SEEK_WAIT_MS && now >= requestedAt ? t : null;
}

export const quarantineKeyFor = (key: string) => `${QUARANTINE_PREFIX}${key}`;

/** What a quarantined record is kept as: the stored value whole, untouched, and why it was set aside. */
export interface QuarantinedRecord {
  key: string;
  reason: string;
  quarantinedAt: number;
  raw: unknown;
}

/** The reason a record failed, naming the first bad field and its path when validation found one. */
export function failureReason(e: unknown): string {
  if (e instanceof CaseFormatError) return e.message;
  return `unreadable (${e instanceof Error ? e.message : String(e)})`;
}

export function quarantineRecord(key: string, raw: unknown, e: unknown, now: number): QuarantinedRecord {
  return { key, reason: failureReason(e), quarantinedAt: now, raw };
}

/** The log's line for a quarantined record; a value under a quarantine key that is not ours still shows. */
export function quarantineEntry(quarantineKey: string, value: unknown): QuarantineEntry {
  const v = (typeof value === 'object' && value !== null ? value : {}) as Partial<QuarantinedRecord>;
  return {
    key: typeof v.key === 'string' ? v.key : quarantineKey.slice(QUARANTINE_PREFIX.length),
    quarantineKey,
    reason: typeof v.reason === 'string' ? v.reason : 'no reason recorded',
    quarantinedAt: typeof v.quarantinedAt === 'number' ? v.quarantinedAt : 0,
  };
}

/**
 * What one stored item weighs against the quota: Chrome counts "the JSON stringification of
 * every value plus every key's length" (chrome.storage API reference, getBytesInUse, from
 * memory); we count the key and the JSON in UTF-8 bytes, which is never less.
 */
export function itemBytes(key: string, value: unknown): number {
  return utf8Length(key) + (value === undefined ? 0 : utf8Length(JSON.stringify(value)));
}

/** Bytes a write adds: each new item's weight less the weight of what it replaces (a shrink counts as 0). */
export function addedBytes(items: Readonly<Record<string, unknown>>, current: Readonly<Record<string, unknown>>): number {
  let total = 0;
  for (const [k, v] of Object.entries(items)) total += itemBytes(k, v) - (k in current ? itemBytes(k, current[k]) : 0);
  return Math.max(0, total);
}

/** The storage quota a write would exceed, as a message naming what was being saved and the sizes. */
export class StorageFullError extends Error {
  constructor(
    readonly what: string,
    readonly needBytes: number,
    readonly freeBytes: number,
    readonly quotaBytes: number,
  ) {
    super(
      `${what}: not saved, storage is full: it needs ${needBytes} more bytes but only ${Math.max(0, freeBytes)} of ${quotaBytes} are free. ` +
        'Everything saved before is kept; export and delete cases you no longer need to make room.',
    );
    this.name = 'StorageFullError';
  }
}

/** Throws StorageFullError when `added` bytes do not fit; `what` names the case for the message. */
export function checkFits(what: string, added: number, bytesInUse: number, quotaBytes: number): void {
  if (added > 0 && bytesInUse + added > quotaBytes) throw new StorageFullError(what, added, quotaBytes - bytesInUse, quotaBytes);
}

/**
 * The share of the quota past which the user is warned. A case with its marks weighs a few
 * kilobytes, so the last tenth of the 10 MiB quota still holds hundreds of cases: room to keep
 * working for days after the warning, and time to export and clear old cases before a write fails.
 */
export const NEAR_LIMIT_SHARE = 0.9;

export function usageOf(bytesInUse: number, quotaBytes: number): StorageUsage {
  return { bytesInUse, quotaBytes, nearLimit: bytesInUse > NEAR_LIMIT_SHARE * quotaBytes };
}

/**
 * chrome.storage.local.QUOTA_BYTES since Chrome 114: 10 485 760 (chrome.storage API reference,
 * from memory). The extension does not ask for unlimitedStorage, so this quota applies; the
 * background reads the browser's own constant and falls back to this.
 */
export const DEFAULT_QUOTA_BYTES = 10_485_760;

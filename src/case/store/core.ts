import type { QuarantineEntry, StorageUsage } from '../listing';
import { caseKey, type CaseRecord } from '../schema';
import { addedBytes, CASE_PREFIX, checkFits, DEFAULT_QUOTA_BYTES, itemBytes, quarantineEntry, quarantineKeyFor, quarantineRecord, usageOf } from '../store-policy';
import { readStoredCase } from '../stored';
import { validateCase } from '../validate';
import { ListingIndex } from './listing-index';
import type { KeyValueArea, StorePorts } from './port';
import { KeyedQueue } from './queue';

/*
 * What every part of the store shares: the two areas, the per-case queues, the log's index, and
 * the few ways anything reaches local storage. Writes are weighed against the quota before the one
 * `set` call; every read migrates and validates, and a record that fails is moved whole to
 * `quarantine:<its key>` (written there first, removed from its own key only after), so one bad
 * record never breaks the others and is never lost.
 */
export interface StoreCore {
  local: KeyValueArea;
  session: KeyValueArea;
  now: () => number;
  toolVersion: () => string;
  queue: KeyedQueue;
  index: ListingIndex;
}

export function makeCore(ports: StorePorts): StoreCore {
  return { local: ports.local, session: ports.session, now: ports.now ?? Date.now, toolVersion: ports.toolVersion, queue: new KeyedQueue(), index: new ListingIndex() };
}

export const idOfKey = (key: string) => key.slice(CASE_PREFIX.length);

/** One key's value, or undefined. */
export async function getOne(area: KeyValueArea, key: string): Promise<unknown> {
  return (await area.get([key]))[key];
}

/* ---------- the quota ---------- */

function quotaBytes(core: StoreCore): number {
  const q = core.local.quotaBytes;
  return typeof q === 'number' && q > 0 ? q : DEFAULT_QUOTA_BYTES;
}

async function bytesInUse(core: StoreCore): Promise<number> {
  if (core.local.bytesInUse) return core.local.bytesInUse();
  // an area that does not count: weigh everything the same way a write is weighed
  const all = await core.local.getAll();
  return Object.entries(all).reduce((n, [k, v]) => n + itemBytes(k, v), 0);
}

export async function storageUsage(core: StoreCore): Promise<StorageUsage> {
  return usageOf(await bytesInUse(core), quotaBytes(core));
}

/** The one way anything is written to local storage: weighed first, then one set call. */
export async function setLocal(core: StoreCore, what: string, items: Record<string, unknown>): Promise<void> {
  const current = await core.local.get(Object.keys(items));
  checkFits(what, addedBytes(items, current), await bytesInUse(core), quotaBytes(core));
  await core.local.set(items);
  // the log's index learns of this write now, not only when the area's change event arrives
  for (const [k, v] of Object.entries(items)) core.index.applyChange(k, v);
}

/** Removes keys from local storage, and from the log's index at once. */
export async function removeLocal(core: StoreCore, keys: readonly string[]): Promise<void> {
  await core.local.remove(keys);
  for (const k of keys) core.index.applyChange(k, undefined);
}

/** Writes one case whole, validated: fields nothing reads (sent in a mark, say) are dropped. */
export async function writeCase(core: StoreCore, record: CaseRecord): Promise<CaseRecord> {
  const c = validateCase(record);
  await setLocal(core, `case ${c.id} (${c.video.pageTitle || c.video.pageUrl || 'untitled'})`, { [caseKey(c.id)]: c });
  return c;
}

/* ---------- reading, with quarantine ---------- */

/**
 * Moves a stored value that failed validation to its quarantine key. The copy is written before
 * the original is removed, so a failure between the two leaves both, never neither. A second bad
 * record under a key already quarantined gets a key of its own (the first is kept).
 */
export async function quarantine(core: StoreCore, key: string, raw: unknown, err: unknown): Promise<QuarantineEntry> {
  let qKey = quarantineKeyFor(key);
  const now = core.now();
  if ((await getOne(core.local, qKey)) !== undefined) qKey = `${qKey}~${now}`;
  const record = quarantineRecord(key, raw, err, now);
  await setLocal(core, `setting aside the unreadable record ${key}`, { [qKey]: record });
  await removeLocal(core, [key]);
  return quarantineEntry(qKey, record);
}

/** Reads one case (caller holds its queue). A bad record is quarantined and reads as absent. */
export async function readUnlocked(core: StoreCore, id: string): Promise<CaseRecord | null> {
  const key = caseKey(id);
  const raw = await getOne(core.local, key);
  if (raw === undefined) return null;
  try {
    return readStoredCase(key, raw);
  } catch (e) {
    await quarantine(core, key, raw, e);
    return null;
  }
}

/** Re-checks a record found bad outside its queue (it may have been rewritten since) and quarantines it. */
export function quarantineIfStillBad(core: StoreCore, key: string): Promise<QuarantineEntry | null> {
  return core.queue.run(idOfKey(key), async () => {
    const raw = await getOne(core.local, key);
    if (raw === undefined) return null;
    try {
      readStoredCase(key, raw);
      return null;
    } catch (e) {
      return quarantine(core, key, raw, e);
    }
  });
}

export const missing = (id: string) => new Error(`no case ${id} (deleted, or set aside as unreadable: see the case log)`);

import { toCaseFile, toCasesFile, parseCaseFileAll } from '../../src/case/casefile';
import { listingOf } from '../../src/case/catalog';
import { exportFileName, planImport } from '../../src/case/importing';
import type { CaseListing, QuarantineEntry, StorageUsage } from '../../src/case/listing';
import { newCase, upsertMark, removeMark, withAnnotation, withAssumptions, withVideo } from '../../src/case/marks';
import { readStoredCase } from '../../src/case/stored';
import { caseKey, type CaseAssumptions, type CaseRecord, type CaseStatus, type Mark, type VideoInfo } from '../../src/case/schema';
import { stripFragment } from '../../src/case/ids';
import { assumptionsFromSettings } from '../../src/case/case-settings';
import { DEFAULT_SETTINGS, readSettings, SETTINGS_KEY } from '../../src/case/settings';
import {
  addedBytes,
  CASE_PREFIX,
  checkFits,
  DEFAULT_QUOTA_BYTES,
  DELETED_PREFIX,
  dueSeek,
  itemBytes,
  QUARANTINE_PREFIX,
  quarantineEntry,
  quarantineKeyFor,
  quarantineRecord,
  SEEK_PREFIX,
  usageOf,
} from '../../src/case/store-policy';
import { CaseFormatError, normaliseTags, validateAssumptions, validateCase, validateMark, validateNotes, validateStatus } from '../../src/case/validate';
import { browser } from '../shared/browser';
import { applyChange, currentGeneration, drop as dropIndex, indexed, rebuild as rebuildIndex } from './listing-index';

/*
 * The case store: one storage key per case, so that two tabs working on different cases never
 * touch each other's data. Writes to one case are chained in this worker, so two requests for the
 * same case apply in arrival order instead of one overwriting the other (a read-modify-write that
 * interleaves would lose a mark). Each write is a single storage.set: whole or not at all.
 *
 * Every read migrates and validates. A record that fails is moved whole to
 * `quarantine:<its key>` (written there first, removed from its own key only after), so one bad
 * record never breaks the others and is never lost. Every write is weighed against the quota
 * first: one that would not fit fails with the sizes and leaves everything as it was.
 */
const queues = new Map<string, Promise<unknown>>();

function serial<T>(id: string, task: () => Promise<T>): Promise<T> {
  return serialMany([id], task);
}

/** Runs the task once every listed case's earlier work is done, and holds them all until it ends. */
function serialMany<T>(ids: readonly string[], task: () => Promise<T>): Promise<T> {
  const prev = Promise.all(ids.map((id) => queues.get(id) ?? Promise.resolve()));
  const next = prev.then(task, task);
  const settled = next.catch(() => undefined);
  for (const id of ids) queues.set(id, settled);
  return next;
}

const idOfKey = (key: string) => key.slice(CASE_PREFIX.length);

/* ---------- the quota ---------- */

function quotaBytes(): number {
  // the browser's own constant where it has one (the polyfill passes plain values through)
  const q = (browser.storage.local as unknown as { QUOTA_BYTES?: unknown }).QUOTA_BYTES;
  return typeof q === 'number' && q > 0 ? q : DEFAULT_QUOTA_BYTES;
}

async function bytesInUse(): Promise<number> {
  const local = browser.storage.local as { getBytesInUse?: (keys: null) => Promise<number> };
  if (typeof local.getBytesInUse === 'function') return local.getBytesInUse(null);
  // a browser without getBytesInUse: weigh everything the same way a write is weighed
  const all = await browser.storage.local.get(null);
  return Object.entries(all).reduce((n, [k, v]) => n + itemBytes(k, v), 0);
}

export async function storageUsage(): Promise<StorageUsage> {
  return usageOf(await bytesInUse(), quotaBytes());
}

/** The one way anything is written to local storage: weighed first, then one set call. */
async function setLocal(what: string, items: Record<string, unknown>): Promise<void> {
  const current = await browser.storage.local.get(Object.keys(items));
  checkFits(what, addedBytes(items, current), await bytesInUse(), quotaBytes());
  await browser.storage.local.set(items);
  // the log's index learns of this write now, not only when storage.onChanged reaches this worker
  for (const [k, v] of Object.entries(items)) applyChange(k, v);
}

/** Removes keys from local storage, and from the log's index at once. */
async function removeLocal(keys: string | string[]): Promise<void> {
  await browser.storage.local.remove(keys);
  for (const k of Array.isArray(keys) ? keys : [keys]) applyChange(k, undefined);
}

// every other writer (a page, another view, an import in another worker instance) reaches the index here
browser.storage.onChanged.addListener((changes: Record<string, { newValue?: unknown }>, area: string) => {
  if (area !== 'local') return;
  for (const [k, change] of Object.entries(changes)) applyChange(k, change.newValue);
});

/* ---------- reading, with quarantine ---------- */

/**
 * Moves a stored value that failed validation to its quarantine key. The copy is written before
 * the original is removed, so a failure between the two leaves both, never neither. A second bad
 * record under a key already quarantined gets a key of its own (the first is kept).
 */
async function quarantine(key: string, raw: unknown, err: unknown): Promise<QuarantineEntry> {
  let qKey = quarantineKeyFor(key);
  if ((await browser.storage.local.get(qKey))[qKey] !== undefined) qKey = `${qKey}~${Date.now()}`;
  const record = quarantineRecord(key, raw, err, Date.now());
  await setLocal(`setting aside the unreadable record ${key}`, { [qKey]: record });
  await removeLocal(key);
  return quarantineEntry(qKey, record);
}

/** Reads one case (caller holds its chain). A bad record is quarantined and reads as absent. */
async function readUnlocked(id: string): Promise<CaseRecord | null> {
  const key = caseKey(id);
  const raw = (await browser.storage.local.get(key))[key];
  if (raw === undefined) return null;
  try {
    return readStoredCase(key, raw);
  } catch (e) {
    await quarantine(key, raw, e);
    return null;
  }
}

/** Re-checks a record found bad outside its chain (it may have been rewritten since) and quarantines it. */
function quarantineIfStillBad(key: string): Promise<QuarantineEntry | null> {
  return serial(idOfKey(key), async () => {
    const raw = (await browser.storage.local.get(key))[key];
    if (raw === undefined) return null;
    try {
      readStoredCase(key, raw);
      return null;
    } catch (e) {
      return quarantine(key, raw, e);
    }
  });
}

export function readCase(id: string): Promise<CaseRecord | null> {
  return serial(id, () => readUnlocked(id));
}

/**
 * The page address a stored case was made on, or null when there is no readable case by that id.
 * For the sender check (senders.ts): it reads without quarantining, so a page naming some other
 * case cannot make the store move it.
 */
export async function casePageOf(id: string): Promise<string | null> {
  const key = caseKey(id);
  const raw = (await browser.storage.local.get(key))[key];
  if (raw === undefined) return null;
  try {
    return readStoredCase(key, raw).video.pageUrl;
  } catch {
    return null;
  }
}

/** Writes one case whole; `what` names it in a quota message. */
async function write(record: CaseRecord): Promise<CaseRecord> {
  // the validated copy is what is stored: fields nothing reads (sent in a mark, say) are dropped
  const c = validateCase(record);
  await setLocal(`case ${c.id} (${c.video.pageTitle || c.video.pageUrl || 'untitled'})`, { [caseKey(c.id)]: c });
  return c;
}

const missing = (id: string) => new Error(`no case ${id} (deleted, or set aside as unreadable: see the case log)`);

/* ---------- the overlay's and popup's edits ---------- */

export function openCase(id: string, video: VideoInfo, version: string): Promise<CaseRecord> {
  return serial(id, async () => {
    const now = Date.now();
    const existing = await readUnlocked(id);
    if (!existing) {
      // a new case starts from the user's settings when they name a camera or an observer speed
      const settings = readSettings((await browser.storage.local.get(SETTINGS_KEY))[SETTINGS_KEY]);
      const fresh = newCase(id, video, version, now);
      const custom = settings.cameraProfile !== DEFAULT_SETTINGS.cameraProfile || settings.observerSpeedMs;
      return write(custom ? withAssumptions(fresh, assumptionsFromSettings(settings), now) : fresh);
    }
    // refresh what the page tells us now (a title or duration that arrived late), keep the marks
    const changed = existing.video.pageTitle !== video.pageTitle || existing.video.duration !== video.duration;
    return changed ? write(withVideo(existing, { ...existing.video, pageTitle: video.pageTitle, duration: video.duration }, now)) : existing;
  });
}

export function putMark(id: string, mark: Mark): Promise<CaseRecord> {
  return serial(id, async () => {
    const c = await readUnlocked(id);
    if (!c) throw new Error(`no case ${id}: open it first`);
    validateMark(mark, 'mark', c.video.width, c.video.height);
    return write(upsertMark(c, mark, Date.now()));
  });
}

export function deleteMark(id: string, markId: string): Promise<CaseRecord> {
  return serial(id, async () => {
    const c = await readUnlocked(id);
    if (!c) throw missing(id);
    return write(removeMark(c, markId, Date.now()));
  });
}

export function setAssumptions(id: string, assumptions: CaseAssumptions): Promise<CaseRecord> {
  return serial(id, async () => {
    const c = await readUnlocked(id);
    if (!c) throw missing(id);
    validateAssumptions(assumptions, 'assumptions');
    return write(withAssumptions(c, assumptions, Date.now()));
  });
}

/** The cases of one page address; a record that fails validation is quarantined and counted. */
export async function casesForPage(pageUrl: string): Promise<{ cases: CaseRecord[]; unreadable: number }> {
  const all = await browser.storage.local.get(null);
  const want = stripFragment(pageUrl);
  const cases: CaseRecord[] = [];
  let unreadable = 0;
  for (const [key, raw] of Object.entries(all)) {
    if (!key.startsWith(CASE_PREFIX)) continue;
    try {
      const c = readStoredCase(key, raw);
      if (c.video.pageUrl === want) cases.push(c);
    } catch {
      unreadable++;
      await quarantineIfStillBad(key).catch(() => undefined);
    }
  }
  cases.sort((a, b) => b.updatedAt - a.updatedAt);
  return { cases, unreadable };
}

/* ---------- the case log ---------- */

export async function listCases(): Promise<{ cases: CaseListing[]; quarantined: QuarantineEntry[]; usage: StorageUsage }> {
  const known = indexed();
  if (known) {
    known.cases.sort((a, b) => b.updatedAt - a.updatedAt);
    known.quarantined.sort((a, b) => b.quarantinedAt - a.quarantinedAt);
    return { ...known, usage: await storageUsage() };
  }
  const since = currentGeneration();
  let all = await browser.storage.local.get(null);
  const cases: CaseListing[] = [];
  const stuck: QuarantineEntry[] = [];
  let moved = false;
  for (const [key, raw] of Object.entries(all)) {
    if (!key.startsWith(CASE_PREFIX)) continue;
    try {
      cases.push(listingOf(readStoredCase(key, raw)));
    } catch (e) {
      moved = true;
      try {
        await quarantineIfStillBad(key);
      } catch (moveErr) {
        // could not move it (storage full): it stays where it is, still reported
        stuck.push({ key, quarantineKey: key, reason: `${e instanceof Error ? e.message : String(e)} (not moved: ${(moveErr as Error).message})`, quarantinedAt: 0 });
      }
    }
  }
  // read the quarantine afresh when this call moved anything: another view listing at the same
  // moment may have moved a record first, and it must still be reported here
  if (moved) all = await browser.storage.local.get(null);
  const quarantined = Object.entries(all)
    .filter(([key]) => key.startsWith(QUARANTINE_PREFIX))
    .map(([key, raw]) => quarantineEntry(key, raw))
    .concat(stuck);
  cases.sort((a, b) => b.updatedAt - a.updatedAt);
  quarantined.sort((a, b) => b.quarantinedAt - a.quarantinedAt);
  // a record that could not be moved aside stays unindexed: every listing reads it again
  if (stuck.length === 0) rebuildIndex(cases, quarantined, since);
  else dropIndex();
  return { cases: [...cases], quarantined: [...quarantined], usage: await storageUsage() };
}

function checkId(caseId: unknown): string {
  if (typeof caseId !== 'string' || caseId.length < 1 || caseId.length > 200) throw new CaseFormatError('caseId', 'expected the text of a case id (1 to 200 characters)');
  return caseId;
}

/** Sets notes, status, tags (each only when given), validated first, naming the field. */
export async function annotateCase(caseId: string, a: { notes?: unknown; status?: unknown; tags?: unknown }): Promise<CaseRecord> {
  const id = checkId(caseId);
  const notes = a.notes === undefined ? undefined : validateNotes(a.notes, 'notes');
  const status: CaseStatus | undefined = a.status === undefined ? undefined : validateStatus(a.status, 'status');
  const tags = a.tags === undefined ? undefined : normaliseTags(a.tags, 'tags');
  return serial(id, async () => {
    const c = await readUnlocked(id);
    if (!c) throw missing(id);
    return write(withAnnotation(c, { notes, status, tags }, Date.now()));
  });
}

interface DeletedCase {
  record: CaseRecord;
  deletedAt: number;
}

/**
 * Deletes a case: the record goes to storage.session first (kept until the browser closes, so the
 * delete can be undone), and only then leaves local storage. Deleting again replaces the earlier
 * deleted copy of that id: undo brings back the latest delete.
 */
export async function deleteCase(caseId: string): Promise<{ deleted: true }> {
  const id = checkId(caseId);
  return serial(id, async () => {
    const c = await readUnlocked(id);
    if (!c) throw missing(id);
    const entry: DeletedCase = { record: c, deletedAt: Date.now() };
    try {
      await browser.storage.session.set({ [`${DELETED_PREFIX}${id}`]: entry });
    } catch (e) {
      // without the copy there would be no undo: refuse, and the case stays as it was
      throw new Error(`case ${id}: not deleted, the copy kept for undo could not be saved (${(e as Error).message}); export it, then try again`);
    }
    await removeLocal(caseKey(id));
    return { deleted: true as const };
  });
}

/** What delete kept in storage.session: every case that can still be brought back, newest first. */
export async function listDeleted(): Promise<{ cases: { id: string; title: string; deletedAt: number }[] }> {
  const all = await browser.storage.session.get(null);
  const cases: { id: string; title: string; deletedAt: number }[] = [];
  for (const [key, raw] of Object.entries(all)) {
    if (!key.startsWith(DELETED_PREFIX)) continue;
    const entry = raw as Partial<DeletedCase> | undefined;
    const v = entry?.record?.video;
    // the copy was validated when it was deleted; a field that is not text is shown by the id alone
    const title = typeof v?.pageTitle === 'string' && v.pageTitle ? v.pageTitle : typeof v?.pageUrl === 'string' ? v.pageUrl : '';
    cases.push({ id: key.slice(DELETED_PREFIX.length), title, deletedAt: typeof entry?.deletedAt === 'number' ? entry.deletedAt : 0 });
  }
  cases.sort((a, b) => b.deletedAt - a.deletedAt);
  return { cases };
}

export async function undeleteCase(caseId: string): Promise<CaseRecord> {
  const id = checkId(caseId);
  return serial(id, async () => {
    const sKey = `${DELETED_PREFIX}${id}`;
    const entry = (await browser.storage.session.get(sKey))[sKey] as DeletedCase | undefined;
    if (!entry) throw new Error(`case ${id}: nothing to bring back (a deleted case is kept only until the browser closes)`);
    const raw = (await browser.storage.local.get(caseKey(id)))[caseKey(id)];
    if (raw !== undefined) {
      throw new Error(`case ${id}: not brought back, a case with this id exists again (the video was measured again after the delete); export or delete that one first`);
    }
    const c = readStoredCase(caseKey(id), entry.record);
    await write(c);
    await browser.storage.session.remove(sKey);
    return c;
  });
}

/* ---------- import and export ---------- */

/**
 * Imports a case file: validated whole first (nothing is touched when any part is bad), then
 * merged (planImport: a new id is added, a stored id keeps both versions), weighed against the
 * quota as one, and written in one storage call.
 */
export async function importCases(text: unknown): Promise<{ added: string[]; merged: string[] }> {
  if (typeof text !== 'string') throw new CaseFormatError('text', 'expected the text of a case file');
  const incoming = parseCaseFileAll(text);
  const ids = [...new Set(incoming.map((c) => c.id))];
  return serialMany(ids, async () => {
    const stored = new Map<string, CaseRecord>();
    for (const id of ids) {
      const c = await readUnlocked(id); // a bad stored record is quarantined first, then the import adds
      if (c) stored.set(id, c);
    }
    const plan = planImport(stored, incoming, Date.now());
    if (plan.writes.length > 0) {
      const items = Object.fromEntries(plan.writes.map((c) => [caseKey(c.id), validateCase(c)]));
      await setLocal(`import of ${plan.writes.length === 1 ? `case ${plan.writes[0]!.id}` : `${plan.writes.length} cases`}`, items);
    }
    return { added: plan.added, merged: plan.merged };
  });
}

export async function exportCases(caseIds?: unknown): Promise<{ fileName: string; text: string }> {
  let cases: CaseRecord[];
  if (caseIds === undefined) {
    const all = await browser.storage.local.get(null);
    cases = [];
    for (const [key, raw] of Object.entries(all)) {
      if (!key.startsWith(CASE_PREFIX)) continue;
      try {
        cases.push(readStoredCase(key, raw));
      } catch {
        await quarantineIfStillBad(key).catch(() => undefined);
      }
    }
    cases.sort((a, b) => a.createdAt - b.createdAt || (a.id < b.id ? -1 : 1));
  } else {
    if (!Array.isArray(caseIds) || caseIds.length === 0) throw new CaseFormatError('caseIds', 'expected a list of case ids, or none for every case');
    cases = [];
    for (const id of caseIds.map(checkId)) {
      const c = await readCase(id);
      if (!c) throw missing(id);
      cases.push(c);
    }
  }
  if (cases.length === 0) throw new Error('no cases to export');
  const version = browser.runtime.getManifest().version;
  const file = cases.length === 1 ? toCaseFile(cases[0]!, version) : toCasesFile(cases, version);
  return { fileName: exportFileName(cases.map((c) => c.id), Date.now()), text: `${JSON.stringify(file, null, 2)}\n` };
}

/* ---------- seeking from the log ---------- */

const seekKey = (pageUrl: string) => `${SEEK_PREFIX}${stripFragment(pageUrl)}`;

function checkPageUrl(pageUrl: unknown): string {
  if (typeof pageUrl !== 'string' || pageUrl.length > 8192) throw new CaseFormatError('pageUrl', 'expected a page address of at most 8192 characters');
  return pageUrl;
}

/**
 * Keeps the seek in storage.session, keyed by page address: it outlives this worker, not the
 * browser, and waits SEEK_WAIT_MS at most (store-policy.ts dueSeek).
 */
export async function requestSeek(pageUrl: unknown, t: unknown): Promise<Record<string, never>> {
  const url = checkPageUrl(pageUrl);
  if (typeof t !== 'number' || !Number.isFinite(t) || t < 0 || t > 1e7) throw new CaseFormatError('t', `expected seconds from 0 to 10000000, got ${String(t)}`);
  await browser.storage.session.set({ [seekKey(url)]: { t, requestedAt: Date.now() } });
  return {};
}

export async function takeSeek(pageUrl: unknown): Promise<{ t: number | null }> {
  const key = seekKey(checkPageUrl(pageUrl));
  const got: unknown = (await browser.storage.session.get(key))[key];
  if (got === undefined) return { t: null };
  await browser.storage.session.remove(key);
  return { t: dueSeek(got, Date.now()) };
}

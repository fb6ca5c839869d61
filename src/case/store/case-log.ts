import { listingOf } from '../catalog';
import type { CaseListing, QuarantineEntry, StorageUsage } from '../listing';
import { caseKey, type CaseRecord } from '../schema';
import { CASE_PREFIX, DELETED_PREFIX, QUARANTINE_PREFIX, quarantineEntry } from '../store-policy';
import { readStoredCase } from '../stored';
import { getOne, missing, quarantineIfStillBad, readUnlocked, removeLocal, storageUsage, writeCase, type StoreCore } from './core';
import { checkId } from './edits';

/* The case log's powers: the listing (with its index), delete and undo. */

export async function listCases(core: StoreCore): Promise<{ cases: CaseListing[]; quarantined: QuarantineEntry[]; usage: StorageUsage }> {
  const known = core.index.indexed();
  if (known) {
    known.cases.sort((a, b) => b.updatedAt - a.updatedAt);
    known.quarantined.sort((a, b) => b.quarantinedAt - a.quarantinedAt);
    return { ...known, usage: await storageUsage(core) };
  }
  const since = core.index.currentGeneration();
  let all = await core.local.getAll();
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
        await quarantineIfStillBad(core, key);
      } catch (moveErr) {
        // could not move it (storage full): it stays where it is, still reported
        stuck.push({ key, quarantineKey: key, reason: `${e instanceof Error ? e.message : String(e)} (not moved: ${(moveErr as Error).message})`, quarantinedAt: 0 });
      }
    }
  }
  // read the quarantine afresh when this call moved anything: another view listing at the same
  // moment may have moved a record first, and it must still be reported here
  if (moved) all = await core.local.getAll();
  const quarantined = Object.entries(all)
    .filter(([key]) => key.startsWith(QUARANTINE_PREFIX))
    .map(([key, raw]) => quarantineEntry(key, raw))
    .concat(stuck);
  cases.sort((a, b) => b.updatedAt - a.updatedAt);
  quarantined.sort((a, b) => b.quarantinedAt - a.quarantinedAt);
  // a record that could not be moved aside stays unindexed: every listing reads it again
  if (stuck.length === 0) core.index.rebuild(cases, quarantined, since);
  else core.index.drop();
  return { cases: [...cases], quarantined: [...quarantined], usage: await storageUsage(core) };
}

interface DeletedCase {
  record: CaseRecord;
  deletedAt: number;
}

const deletedKey = (id: string) => `${DELETED_PREFIX}${id}`;

/**
 * Deletes a case: the record goes to the session area first (kept until the browser closes, so
 * the delete can be undone), and only then leaves local storage. Deleting again replaces the
 * earlier deleted copy of that id: undo brings back the latest delete.
 */
export async function deleteCase(core: StoreCore, caseId: string): Promise<{ deleted: true }> {
  const id = checkId(caseId);
  return core.queue.run(id, async () => {
    const c = await readUnlocked(core, id);
    if (!c) throw missing(id);
    const entry: DeletedCase = { record: c, deletedAt: core.now() };
    try {
      await core.session.set({ [deletedKey(id)]: entry });
    } catch (e) {
      // without the copy there would be no undo: refuse, and the case stays as it was
      throw new Error(`case ${id}: not deleted, the copy kept for undo could not be saved (${(e as Error).message}); export it, then try again`);
    }
    await removeLocal(core, [caseKey(id)]);
    return { deleted: true as const };
  });
}

/** What delete kept in the session area: every case that can still be brought back, newest first. */
export async function listDeleted(core: StoreCore): Promise<{ cases: { id: string; title: string; deletedAt: number }[] }> {
  const all = await core.session.getAll();
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

export async function undeleteCase(core: StoreCore, caseId: string): Promise<CaseRecord> {
  const id = checkId(caseId);
  return core.queue.run(id, async () => {
    const sKey = deletedKey(id);
    const entry = (await getOne(core.session, sKey)) as DeletedCase | undefined;
    if (!entry) throw new Error(`case ${id}: nothing to bring back (a deleted case is kept only until the browser closes)`);
    if ((await getOne(core.local, caseKey(id))) !== undefined) {
      throw new Error(`case ${id}: not brought back, a case with this id exists again (the video was measured again after the delete); export or delete that one first`);
    }
    const c = readStoredCase(caseKey(id), entry.record);
    await writeCase(core, c);
    await core.session.remove([sKey]);
    return c;
  });
}

import { assumptionsFromSettings } from '../case-settings';
import { stripFragment } from '../ids';
import { newCase, removeMark, upsertMark, withAnnotation, withAssumptions, withVideo } from '../marks';
import { caseKey, type CaseAssumptions, type CaseRecord, type CaseStatus, type Mark, type VideoInfo } from '../schema';
import { DEFAULT_SETTINGS, readSettings, SETTINGS_KEY } from '../settings';
import { CASE_PREFIX } from '../store-policy';
import { readStoredCase } from '../stored';
import { CaseFormatError, normaliseTags, validateAssumptions, validateMark, validateNotes, validateStatus } from '../validate';
import { getOne, missing, quarantineIfStillBad, readUnlocked, writeCase, type StoreCore } from './core';

/*
 * The overlay's and popup's edits and reads of single cases: each runs in its case's queue, reads
 * the record (validated, a bad one set aside), applies a pure edit from marks.ts and writes it whole.
 */

export function checkId(caseId: unknown): string {
  if (typeof caseId !== 'string' || caseId.length < 1 || caseId.length > 200) throw new CaseFormatError('caseId', 'expected the text of a case id (1 to 200 characters)');
  return caseId;
}

export function readCase(core: StoreCore, id: string): Promise<CaseRecord | null> {
  return core.queue.run(id, () => readUnlocked(core, id));
}

/**
 * The page address a stored case was made on, or null when there is no readable case by that id.
 * For the sender check (extension/background/senders.ts): it reads without quarantining, so a
 * page naming some other case cannot make the store move it.
 */
export async function casePageOf(core: StoreCore, id: string): Promise<string | null> {
  const key = caseKey(id);
  const raw = await getOne(core.local, key);
  if (raw === undefined) return null;
  try {
    return readStoredCase(key, raw).video.pageUrl;
  } catch {
    return null;
  }
}

export function openCase(core: StoreCore, id: string, video: VideoInfo, version: string): Promise<CaseRecord> {
  return core.queue.run(id, async () => {
    const now = core.now();
    const existing = await readUnlocked(core, id);
    if (!existing) {
      // a new case starts from the user's settings when they name a camera or an observer speed
      const settings = readSettings(await getOne(core.local, SETTINGS_KEY));
      const fresh = newCase(id, video, version, now);
      const custom = settings.cameraProfile !== DEFAULT_SETTINGS.cameraProfile || settings.observerSpeedMs;
      return writeCase(core, custom ? withAssumptions(fresh, assumptionsFromSettings(settings), now) : fresh);
    }
    // refresh what the page tells us now (a title or duration that arrived late), keep the marks
    const changed = existing.video.pageTitle !== video.pageTitle || existing.video.duration !== video.duration;
    return changed ? writeCase(core, withVideo(existing, { ...existing.video, pageTitle: video.pageTitle, duration: video.duration }, now)) : existing;
  });
}

export function putMark(core: StoreCore, id: string, mark: Mark): Promise<CaseRecord> {
  return core.queue.run(id, async () => {
    const c = await readUnlocked(core, id);
    if (!c) throw new Error(`no case ${id}: open it first`);
    validateMark(mark, 'mark', c.video.width, c.video.height);
    return writeCase(core, upsertMark(c, mark, core.now()));
  });
}

/**
 * Several marks in one write (a follow's accepted frames: hundreds, one write rather than one each).
 * Every mark is checked before anything is written, and the first bad one is named by its place.
 */
export function putMarks(core: StoreCore, id: string, marks: unknown): Promise<CaseRecord> {
  return core.queue.run(id, async () => {
    const c = await readUnlocked(core, id);
    if (!c) throw new Error(`no case ${id}: open it first`);
    if (!Array.isArray(marks) || marks.length === 0) throw new Error('marks: expected a list of one or more marks');
    const checked = marks.map((m, i) => validateMark(m, `marks[${i}]`, c.video.width, c.video.height));
    return writeCase(core, checked.reduce((acc, m) => upsertMark(acc, m, core.now()), c));
  });
}

export function deleteMark(core: StoreCore, id: string, markId: string): Promise<CaseRecord> {
  return core.queue.run(id, async () => {
    const c = await readUnlocked(core, id);
    if (!c) throw missing(id);
    return writeCase(core, removeMark(c, markId, core.now()));
  });
}

export function setAssumptions(core: StoreCore, id: string, assumptions: CaseAssumptions): Promise<CaseRecord> {
  return core.queue.run(id, async () => {
    const c = await readUnlocked(core, id);
    if (!c) throw missing(id);
    validateAssumptions(assumptions, 'assumptions');
    return writeCase(core, withAssumptions(c, assumptions, core.now()));
  });
}

/** Sets notes, status, tags (each only when given), validated first, naming the field. */
export async function annotateCase(core: StoreCore, caseId: string, a: { notes?: unknown; status?: unknown; tags?: unknown }): Promise<CaseRecord> {
  const id = checkId(caseId);
  const notes = a.notes === undefined ? undefined : validateNotes(a.notes, 'notes');
  const status: CaseStatus | undefined = a.status === undefined ? undefined : validateStatus(a.status, 'status');
  const tags = a.tags === undefined ? undefined : normaliseTags(a.tags, 'tags');
  return core.queue.run(id, async () => {
    const c = await readUnlocked(core, id);
    if (!c) throw missing(id);
    return writeCase(core, withAnnotation(c, { notes, status, tags }, core.now()));
  });
}

/**
 * Every readable case in `all` (a getAll() of local storage), in storage order; each record that
 * fails is quarantined (re-checked in its queue first) and counted.
 */
export async function readableCases(core: StoreCore, all: Record<string, unknown>): Promise<{ cases: CaseRecord[]; unreadable: number }> {
  const cases: CaseRecord[] = [];
  let unreadable = 0;
  for (const [key, raw] of Object.entries(all)) {
    if (!key.startsWith(CASE_PREFIX)) continue;
    try {
      cases.push(readStoredCase(key, raw));
    } catch {
      unreadable++;
      await quarantineIfStillBad(core, key).catch(() => undefined);
    }
  }
  return { cases, unreadable };
}

/** The cases of one page address, newest first; a record that fails validation is quarantined and counted. */
export async function casesForPage(core: StoreCore, pageUrl: string): Promise<{ cases: CaseRecord[]; unreadable: number }> {
  const want = stripFragment(pageUrl);
  const { cases, unreadable } = await readableCases(core, await core.local.getAll());
  const mine = cases.filter((c) => c.video.pageUrl === want);
  mine.sort((a, b) => b.updatedAt - a.updatedAt);
  return { cases: mine, unreadable };
}

import { newCase, upsertMark, removeMark, withAssumptions, withVideo } from '../../src/case/marks';
import { caseKey, type CaseAssumptions, type CaseRecord, type Mark, type VideoInfo } from '../../src/case/schema';
import { stripFragment } from '../../src/case/ids';
import { defaultAssumptions } from '../../src/case/assumptions';
import { DEFAULT_SETTINGS, readSettings, SETTINGS_KEY } from '../../src/case/settings';
import { validateAssumptions, validateCase, validateMark } from '../../src/case/validate';
import { browser } from '../shared/browser';

/*
 * The case store: one storage key per case, so that two tabs working on different cases never
 * touch each other's data. Writes to one case are chained in this worker, so two requests for the
 * same case apply in arrival order instead of one overwriting the other (a read-modify-write that
 * interleaves would lose a mark). Each write is a single storage.set of one key: whole or not at all.
 */
const queues = new Map<string, Promise<unknown>>();

function serial<T>(id: string, task: () => Promise<T>): Promise<T> {
  const prev = queues.get(id) ?? Promise.resolve();
  const next = prev.then(task, task);
  queues.set(
    id,
    next.catch(() => undefined),
  );
  return next;
}

export async function readCase(id: string): Promise<CaseRecord | null> {
  const key = caseKey(id);
  const got = await browser.storage.local.get(key);
  const raw = got[key];
  if (raw === undefined) return null;
  // validation on every read: a corrupt record is reported, never silently used or overwritten
  return validateCase(raw);
}

async function write(c: CaseRecord): Promise<CaseRecord> {
  validateCase(c);
  await browser.storage.local.set({ [caseKey(c.id)]: c });
  return c;
}

export function openCase(id: string, video: VideoInfo, version: string): Promise<CaseRecord> {
  return serial(id, async () => {
    const now = Date.now();
    const existing = await readCase(id);
    if (!existing) {
      // a new case starts from the user's settings when they name a camera or an observer speed
      const settings = readSettings((await browser.storage.local.get(SETTINGS_KEY))[SETTINGS_KEY]);
      const fresh = newCase(id, video, version, now);
      const custom = settings.cameraProfile !== DEFAULT_SETTINGS.cameraProfile || settings.observerSpeedMs;
      return write(custom ? withAssumptions(fresh, defaultAssumptions(settings), now) : fresh);
    }
    // refresh what the page tells us now (a title or duration that arrived late), keep the marks
    const changed = existing.video.pageTitle !== video.pageTitle || existing.video.duration !== video.duration;
    return changed ? write(withVideo(existing, { ...existing.video, pageTitle: video.pageTitle, duration: video.duration }, now)) : existing;
  });
}

export function putMark(id: string, mark: Mark): Promise<CaseRecord> {
  return serial(id, async () => {
    const c = await readCase(id);
    if (!c) throw new Error(`no case ${id}: open it first`);
    validateMark(mark, 'mark', c.video.width, c.video.height);
    return write(upsertMark(c, mark, Date.now()));
  });
}

export function deleteMark(id: string, markId: string): Promise<CaseRecord> {
  return serial(id, async () => {
    const c = await readCase(id);
    if (!c) throw new Error(`no case ${id}`);
    return write(removeMark(c, markId, Date.now()));
  });
}

export function setAssumptions(id: string, assumptions: CaseAssumptions): Promise<CaseRecord> {
  return serial(id, async () => {
    const c = await readCase(id);
    if (!c) throw new Error(`no case ${id}`);
    validateAssumptions(assumptions, 'assumptions');
    return write(withAssumptions(c, assumptions, Date.now()));
  });
}

/** The cases of one page address; a record that fails validation is counted, not returned. */
export async function casesForPage(pageUrl: string): Promise<{ cases: CaseRecord[]; unreadable: number }> {
  const all = await browser.storage.local.get(null);
  const want = stripFragment(pageUrl);
  const cases: CaseRecord[] = [];
  let unreadable = 0;
  for (const [key, raw] of Object.entries(all)) {
    if (!key.startsWith('case:')) continue;
    try {
      const c = validateCase(raw);
      if (c.video.pageUrl === want) cases.push(c);
    } catch {
      unreadable++;
    }
  }
  cases.sort((a, b) => b.updatedAt - a.updatedAt);
  return { cases, unreadable };
}

import { CASE_PREFIX, DELETED_PREFIX, QUARANTINE_PREFIX, readSettings, readStoredCase, SETTINGS_KEY } from '../../src/case';
import type { CaseRecord } from '../../src/case';
import { notice, type Notice, type NoticeKind } from '../shared/messages';
import { isExtensionPage, samePage } from './senders';

/*
 * What the background announces when storage changes, and to whom: pure, so that the translation
 * from storage keys to notices and the line between pages and a page's frames are tested without a
 * browser. background/announce.ts listens to storage and sends what this decides. The storage keys
 * and prefixes are known here and in the store (background/cases.ts) only; views hear notices.
 */

/** storage.onChanged's first argument. */
export type StorageChanges = Readonly<Record<string, { newValue?: unknown; oldValue?: unknown }>>;

/** The stored case as every read gives it (migrated, validated, under its own id's key), or null. */
function readable(key: string, value: unknown): CaseRecord | null {
  if (value === undefined) return null;
  try {
    return readStoredCase(key, value);
  } catch {
    // the next read through the store sets it aside; the listing that follows reports it
    return null;
  }
}

/**
 * The notices one storage change makes, in a fixed order: each changed case, then the listing,
 * the quarantine and the settings. Keys of no view's concern (seeks, anything not ours) make none.
 */
export function noticesFor(changes: StorageChanges, area: string): Notice[] {
  const keys = Object.keys(changes);
  if (area === 'session') return keys.some((k) => k.startsWith(DELETED_PREFIX)) ? [notice('deleted/changed', {})] : [];
  if (area !== 'local') return [];
  const out: Notice[] = [];
  const caseIds: string[] = [];
  for (const key of keys) {
    if (!key.startsWith(CASE_PREFIX)) continue;
    const caseId = key.slice(CASE_PREFIX.length);
    caseIds.push(caseId);
    out.push(notice('case/changed', { caseId, record: readable(key, changes[key]!.newValue) }));
  }
  if (caseIds.length > 0) out.push(notice('cases/changed', { caseIds }));
  if (keys.some((k) => k.startsWith(QUARANTINE_PREFIX))) out.push(notice('quarantine/changed', {}));
  if (SETTINGS_KEY in changes) out.push(notice('settings/changed', { settings: readSettings(changes[SETTINGS_KEY]!.newValue) }));
  return out;
}

/**
 * Who may hear each kind. 'pages': the extension's own pages only (popup, log, options). 'frames':
 * also the overlay's isolated world in a page's frame, filtered by forFrame. A new kind fails to
 * compile until it is placed here.
 */
export const AUDIENCE: Record<NoticeKind, 'pages' | 'frames'> = {
  'case/changed': 'frames',
  'cases/changed': 'pages',
  'quarantine/changed': 'pages',
  'deleted/changed': 'pages',
  'settings/changed': 'frames',
};

/**
 * What a frame at `frameUrl` (sender.url, set by the browser) may hear of a notice: a case only
 * when it is a case of that frame's page, by the same line `case/get` is held to from a page
 * (senders.ts samePage); a case that went away is not told to frames at all (its page is no longer
 * known, and a page must not learn what was measured elsewhere). null: nothing is sent.
 */
export function forFrame(n: Notice, frameUrl: string | undefined): Notice | null {
  if (AUDIENCE[n.kind] !== 'frames') return null;
  if (n.kind === 'case/changed') {
    const { record } = (n as Notice<'case/changed'>).payload;
    return record !== null && samePage(frameUrl, record.video.pageUrl) ? n : null;
  }
  return n;
}

/* ---- the frames that hear notices ---- */

/** A frame the overlay runs in, as the browser named it when the overlay there sent a request. */
export interface Follower {
  tabId: number;
  frameId: number;
  /** The frame's document (Chromium): a frame that navigated is a new document and hears nothing meant for the old one. */
  documentId?: string;
  url: string;
}

/**
 * More frames than this with the overlay open at once is far past any use; the oldest is
 * forgotten first (it hears notices again after its next request).
 */
export const MAX_FOLLOWERS = 64;

/** The list with `f` in front, replacing the entry for the same frame; unchanged (same array) when it was already there as is. */
export function follow(list: readonly Follower[], f: Follower): readonly Follower[] {
  const i = list.findIndex((x) => x.tabId === f.tabId && x.frameId === f.frameId);
  const old = i >= 0 ? list[i]! : undefined;
  if (i === 0 && old!.url === f.url && old!.documentId === f.documentId) return list;
  return [f, ...list.filter((_, k) => k !== i)].slice(0, MAX_FOLLOWERS);
}

/** The list without the frames of a tab (closed, or navigating when its frames are not known by document). */
export function unfollowTab(list: readonly Follower[], tabId: number, onlyWithoutDocument = false): readonly Follower[] {
  const next = list.filter((x) => x.tabId !== tabId || (onlyWithoutDocument && x.documentId !== undefined));
  return next.length === list.length ? list : next;
}

/** A follower from a request's sender, when it came from a page's frame (not from one of the extension's own pages). */
export function followerOf(sender: { url?: string; tab?: { id?: number }; frameId?: number; documentId?: string }, extensionOrigin: string): Follower | null {
  const tabId = sender.tab?.id;
  const { url, frameId, documentId } = sender;
  if (tabId === undefined || frameId === undefined || !url || isExtensionPage(url, extensionOrigin)) return null;
  return documentId ? { tabId, frameId, documentId, url } : { tabId, frameId, url };
}

/** A stored list read back (storage.session), keeping only well-formed entries. */
export function readFollowers(raw: unknown): Follower[] {
  if (!Array.isArray(raw)) return [];
  return raw
    .filter((x): x is Follower => typeof x === 'object' && x !== null && typeof x.tabId === 'number' && typeof x.frameId === 'number' && typeof x.url === 'string' && (x.documentId === undefined || typeof x.documentId === 'string'))
    .slice(0, MAX_FOLLOWERS);
}

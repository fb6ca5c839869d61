import type { CaseAssumptions, CaseListing, CaseRecord, CaseStatus, Mark, QuarantineEntry, Settings, StorageUsage, VideoInfo } from '../../src/case';

/**
 * The one typed contract for messages between background, overlay and popup. Each request names
 * its payload and its reply; `send` and the background's router are typed from this map, so a
 * message that one side renames fails to compile on the other.
 */
export interface RequestMap {
  /** Liveness and version, used by the popup's footer and by the browser tests. */
  'status/get': { payload: Record<string, never>; reply: { version: string; schema: number; startedAt: number } };
  /** Open (or create) the case for a video; the overlay calls this when it mounts. */
  'case/open': { payload: { caseId: string; video: VideoInfo }; reply: CaseRecord };
  /** Every case of a page address (a page may hold several videos), newest first. */
  'cases/forPage': { payload: { pageUrl: string }; reply: { cases: CaseRecord[]; unreadable: number } };
  /** Read a case, or null if there is none. */
  'case/get': { payload: { caseId: string }; reply: CaseRecord | null };
  /** Add a mark, or replace the one with the same id; saved before the reply. */
  'mark/put': { payload: { caseId: string; mark: Mark }; reply: CaseRecord };
  /** Several marks in one write: a follow's accepted frames (extension pages only). */
  'marks/put': { payload: { caseId: string; marks: Mark[] }; reply: CaseRecord };
  'mark/remove': { payload: { caseId: string; markId: string }; reply: CaseRecord };
  /** Set the assumptions behind a case's figures (the popup's editor; the overlay follows). */
  'case/assume': { payload: { caseId: string; assumptions: CaseAssumptions }; reply: CaseRecord };
  /** The popup asks the background to call the overlay up in the current tab. */
  'overlay/inject': { payload: { tabId: number }; reply: { injected: boolean } };
  /** A capture of the sender's visible tab (PNG data URL), for snapping when the video's pixels are unreadable. */
  'frame/capture': { payload: Record<string, never>; reply: { dataUrl: string } };
  /** Origins of frames in the tab that the top page cannot reach into (their videos need a grant). */
  'frames/foreign': { payload: { tabId: number }; reply: { origins: string[] } };
  /** After the user granted an origin: call the overlay up in that origin's frames that hold a video. */
  'overlay/inject-origin': { payload: { tabId: number; origin: string }; reply: { frames: number } };

  /* the case log */
  /** Every readable case as a listing, with what was quarantined and the storage in use. */
  'cases/list': { payload: Record<string, never>; reply: { cases: CaseListing[]; quarantined: QuarantineEntry[]; usage: StorageUsage } };
  /** Set a case's notes, status, tags (any subset); saved before the reply. */
  'case/annotate': { payload: { caseId: string; notes?: string; status?: CaseStatus; tags?: string[] }; reply: CaseRecord };
  /** Delete a case; it can be brought back with case/undelete until the browser closes. */
  'case/delete': { payload: { caseId: string }; reply: { deleted: true } };
  'case/undelete': { payload: { caseId: string }; reply: CaseRecord };
  /** The cases deleted since the browser started (each can still be brought back), newest first. */
  'cases/deleted': { payload: Record<string, never>; reply: { cases: { id: string; title: string; deletedAt: number }[] } };
  /** Validate a case file whole, then merge it (same id: both versions kept, newest in front). */
  'cases/import': { payload: { text: string }; reply: { added: string[]; merged: string[] } };
  /** One case or all (no ids) as a case file. */
  'cases/export': { payload: { caseIds?: string[] }; reply: { fileName: string; text: string } };
  'storage/usage': { payload: Record<string, never>; reply: StorageUsage };
  /** The log opens a case's page: the overlay, once called up there, seeks to this timestamp. */
  'seek/request': { payload: { pageUrl: string; t: number }; reply: Record<string, never> };
  /** The overlay, on mounting, takes the seek waiting for its page (null when none); taking clears it. */
  'seek/take': { payload: { pageUrl: string }; reply: { t: number | null } };
}

export type RequestType = keyof RequestMap;

export interface Envelope<K extends RequestType = RequestType> {
  /** Marks our messages so that anything else on the runtime channel is ignored. */
  channel: 'clip-caliper';
  type: K;
  payload: RequestMap[K]['payload'];
}

/** Replies are wrapped so that an error crosses the channel as data, not as a lost promise. */
export type Reply<K extends RequestType> =
  | { ok: true; value: RequestMap[K]['reply'] }
  | { ok: false; error: string };

export function envelope<K extends RequestType>(type: K, payload: RequestMap[K]['payload']): Envelope<K> {
  return { channel: 'clip-caliper', type, payload };
}

export function isEnvelope(x: unknown): x is Envelope {
  return typeof x === 'object' && x !== null && (x as { channel?: unknown }).channel === 'clip-caliper';
}

/* ---- the push half: notices the background announces ---- */

/**
 * What the background tells the views when stored data changes, so that no view reads storage
 * keys itself (background/announce.ts translates storage changes into these; shared/subscribe.ts
 * is how a view listens). Notices are outbound only: the background never takes one as a request
 * (their channel is not `clip-caliper`, so the router ignores them), and a view takes one only
 * from the extension itself, never from a page's content script (subscribe.ts).
 *
 * Who hears what (background/notices.ts, AUDIENCE): the extension's own pages hear every kind.
 * The overlay's isolated world in a tab's frame hears only `case/changed` for a case of its own
 * page (the same line as the `case/get` rule in background/senders.ts) and `settings/changed`;
 * nothing is ever sent to the page's own world.
 */
export interface NoticeMap {
  /**
   * One case was saved or went away. `record` is the stored case, migrated and validated; null
   * when there is no readable case under that id any more (deleted, or a value that fails
   * validation: the next read sets it aside, and the listing reports it).
   */
  'case/changed': { caseId: string; record: CaseRecord | null };
  /** The stored cases changed (saved, added, removed): a listing asked for now differs. Pages only. */
  'cases/changed': { caseIds: string[] };
  /** Records were set aside as unreadable, or such a record went away. Pages only. */
  'quarantine/changed': Record<string, never>;
  /** The cases that can still be brought back (deleted this browser session) changed. Pages only. */
  'deleted/changed': Record<string, never>;
  /** The settings were saved (read with defaults, as loadSettings reads them). */
  'settings/changed': { settings: Settings };
}

export type NoticeKind = keyof NoticeMap;

export interface Notice<K extends NoticeKind = NoticeKind> {
  /** Not the requests' channel: a notice can never be taken for a request, nor a request for a notice. */
  channel: 'clip-caliper/notice';
  kind: K;
  payload: NoticeMap[K];
}

export function notice<K extends NoticeKind>(kind: K, payload: NoticeMap[K]): Notice<K> {
  return { channel: 'clip-caliper/notice', kind, payload };
}

export function isNotice(x: unknown): x is Notice {
  return typeof x === 'object' && x !== null && (x as { channel?: unknown }).channel === 'clip-caliper/notice' && typeof (x as { kind?: unknown }).kind === 'string';
}

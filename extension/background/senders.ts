import { caseIdFor, stripFragment } from '../../src/case';
import type { RequestType } from '../shared/messages';

/*
 * Who may ask the background for what. The overlay runs as a content script in the page's tab, in
 * the extension's isolated world; a hostile page may confuse it into sending anything. So a request
 * from a page is held to what the overlay needs there, on that page's own cases and its own tab:
 * the case log's powers (every case listed, exported, imported, deleted, annotated) and calling
 * the overlay up in another tab come only from the extension's own pages.
 *
 * What a page cannot forge: the browser sets sender.url (the sending frame's address) and
 * sender.tab. A page can move its own address within its origin (history.pushState) and can load
 * any address of its origin in a frame the overlay measures from the top (overlay/videos.ts reaches
 * into same-origin frames, and such a case keeps the frame's address), so for http(s) pages the
 * line a page cannot cross is its origin. Other addresses (file:, data:, about:) have no origin to
 * go by and must match exactly, fragment aside.
 *
 * Pure: the background gathers the facts (sender, stored case's page) and this decides.
 */

export interface SenderFacts {
  /** sender.url: the sending frame's address (an extension page's own address for the popup, log, options). */
  url?: string;
  /** sender.tab.id: the tab the sending content script runs in. */
  tabId?: number;
  /** sender.tab.active: whether that tab is the one its window shows. */
  tabActive?: boolean;
}

export type Verdict = { allow: true } | { allow: false; reason: string };

const ALLOW: Verdict = { allow: true };
const deny = (reason: string): Verdict => ({ allow: false, reason });

/** The refusal a sender sees, naming the request and why. */
export function refusal(type: string, reason: string): string {
  return `${type}: not allowed from a page (${reason})`;
}

/** One of the extension's own pages: its address is under the extension's origin (runtime.getURL('')). */
export function isExtensionPage(url: string | undefined, extensionOrigin: string): boolean {
  if (!url || !extensionOrigin) return false;
  const base = extensionOrigin.endsWith('/') ? extensionOrigin : `${extensionOrigin}/`;
  return url.startsWith(base);
}

/**
 * Whether a page at `senderUrl` may touch what was recorded for `pageUrl`: the same origin for
 * http(s) addresses, the same address (fragment aside) otherwise.
 */
export function samePage(senderUrl: string | undefined, pageUrl: unknown): boolean {
  if (!senderUrl || typeof pageUrl !== 'string' || pageUrl === '') return false;
  let a: URL;
  let b: URL;
  try {
    a = new URL(senderUrl);
    b = new URL(pageUrl);
  } catch {
    return false;
  }
  const web = (u: URL) => u.protocol === 'http:' || u.protocol === 'https:';
  if (web(a) && web(b)) return a.origin === b.origin;
  if (web(a) !== web(b)) return false;
  return stripFragment(a.href) === stripFragment(b.href);
}

/*
 * A video whose source is a blob: has no address of its own, so its case id counts the video's
 * place on the page instead (overlay/session.ts). An id is accepted for a page if any place up to
 * this many gives it; more videos than this on one page is far past any page the overlay serves.
 */
const MAX_VIDEO_INDEX = 256;

/** Whether `caseId` is the id the overlay makes for this page address and video source. */
export function caseIdMatches(caseId: string, pageUrl: string, src: string): boolean {
  if (src) return caseIdFor(pageUrl, src) === caseId;
  for (let i = 0; i < MAX_VIDEO_INDEX; i++) if (caseIdFor(pageUrl, '', i) === caseId) return true;
  return false;
}

const field = (payload: unknown, name: string): unknown =>
  typeof payload === 'object' && payload !== null ? (payload as Record<string, unknown>)[name] : undefined;

/** The case a request names, when it names one (for the background to look up its page). */
export function caseNamed(payload: unknown): string | null {
  const id = field(payload, 'caseId');
  return typeof id === 'string' ? id : null;
}

/**
 * What a page asked for, with the stored case's page address when the request names a case
 * (`null`: no such case; `undefined`: not looked up).
 */
interface Asked {
  payload: unknown;
  sender: SenderFacts;
  casePage: string | null | undefined;
}

type Rule = (a: Asked) => Verdict;

const extensionOnly: Rule = () => deny('only the extension’s own pages may');

/*
 * The same answer for a case of another page and for no case at all: a page must not learn
 * whether the user measured some video elsewhere (case ids are derived from page and video
 * addresses, so they can be guessed).
 */
const NOT_THIS_PAGE = 'not a case of this page';

const ownCase: Rule = ({ sender, casePage }) => (typeof casePage === 'string' && samePage(sender.url, casePage) ? ALLOW : deny(NOT_THIS_PAGE));

const ownPageUrl: Rule = ({ payload, sender }) => (samePage(sender.url, field(payload, 'pageUrl')) ? ALLOW : deny('another page’s address'));

const ownTab: Rule = ({ payload, sender }) => {
  const tabId = field(payload, 'tabId');
  return sender.tabId !== undefined && tabId === sender.tabId ? ALLOW : deny('another tab');
};

const openOwnCase: Rule = ({ payload, sender, casePage }) => {
  const caseId = field(payload, 'caseId');
  const video = field(payload, 'video');
  const pageUrl = field(video, 'pageUrl');
  const src = field(video, 'src');
  if (typeof caseId !== 'string' || typeof pageUrl !== 'string' || typeof src !== 'string') return deny('payload.caseId, payload.video.pageUrl and payload.video.src must be strings');
  if (!samePage(sender.url, pageUrl)) return deny('payload.video.pageUrl is another page’s address');
  // checked before the stored case, so that a refusal tells nothing about what is stored
  if (!caseIdMatches(caseId, pageUrl, src)) return deny('payload.caseId is not the id of this page’s video');
  if (casePage !== null && casePage !== undefined && !samePage(sender.url, casePage)) return deny(NOT_THIS_PAGE);
  return ALLOW;
};

/*
 * Every request type has a rule here (the Record type makes a new one fail to compile until it
 * gets one). What the overlay sends from a page: case/open, case/get, mark/put, mark/remove,
 * seek/take, frame/capture (grep `send(` in extension/overlay).
 */
const PAGE_RULES: Record<RequestType, Rule> = {
  'status/get': () => ALLOW,
  'case/open': openOwnCase,
  'case/get': ownCase,
  'mark/put': ownCase,
  'mark/remove': ownCase,
  'marks/put': extensionOnly,
  'case/assume': ownCase,
  'cases/forPage': ownPageUrl,
  'seek/take': ownPageUrl,
  // captureVisibleTab takes what the window shows: only the sender's own tab, when it is that one
  'frame/capture': ({ sender }) => (sender.tabId !== undefined && sender.tabActive === true ? ALLOW : deny('the sender’s tab is not the one its window shows')),
  'overlay/inject': ownTab,
  'frames/foreign': ownTab,
  'overlay/inject-origin': ownTab,
  'cases/list': extensionOnly,
  'case/annotate': extensionOnly,
  'case/delete': extensionOnly,
  'case/undelete': extensionOnly,
  'cases/deleted': extensionOnly,
  'cases/import': extensionOnly,
  'cases/export': extensionOnly,
  'storage/usage': extensionOnly,
  'seek/request': extensionOnly,
};

/** Whether the background should look up the stored case's page before judging a page's request. */
export function needsCasePage(type: string, sender: SenderFacts, extensionOrigin: string, payload: unknown): string | null {
  if (isExtensionPage(sender.url, extensionOrigin)) return null;
  const rule = PAGE_RULES[type as RequestType];
  return rule === ownCase || rule === openOwnCase ? caseNamed(payload) : null;
}

/** Allow or refuse one request. Extension pages may ask anything; pages only what PAGE_RULES allow. */
export function judge(type: string, payload: unknown, sender: SenderFacts, extensionOrigin: string, casePage?: string | null): Verdict {
  if (isExtensionPage(sender.url, extensionOrigin)) return ALLOW;
  const rule = Object.prototype.hasOwnProperty.call(PAGE_RULES, type) ? PAGE_RULES[type as RequestType] : undefined;
  if (!rule) return deny('unknown request');
  return rule({ payload, sender, casePage });
}

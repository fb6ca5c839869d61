import { describe, expect, it } from 'vitest';
import { caseIdFor } from '../../src/case/ids';
import type { RequestType } from '../../extension/shared/messages';
import { caseIdMatches, isExtensionPage, judge, needsCasePage, refusal, samePage, type SenderFacts } from '../../extension/background/senders';

/*
 * Who may ask the background for what (extension/background/senders.ts).
 *
 * Outside facts the checks rest on:
 *  - runtime.MessageSender.url is "the URL of the page or frame that opened the connection", set by
 *    the browser (Chrome's chrome.runtime API reference, MessageSender; MDN runtime.MessageSender);
 *    an extension page's address is under runtime.getURL('') (chrome-extension://<id>/);
 *  - an origin is scheme, host and port (HTML Living Standard §7.1.1 "Origins", RFC 6454);
 *    history.pushState may change a document's address only within its origin (HTML §7.2.4,
 *    "URL and history update steps": a cross-origin URL throws SecurityError), so the origin is
 *    what a page cannot move past;
 *  - file:, data: and about: addresses have an opaque origin (URL Standard, "origin"), hence the
 *    exact-address rule for them.
 * Every address, id and tab number below is invented.
 */

const EXT = 'chrome-extension://abcdefghijklmnopabcdefghijklmnop/';
const POPUP: SenderFacts = { url: `${EXT}extension/popup/index.html` };
const LOG_TAB: SenderFacts = { url: `${EXT}extension/popup/index.html?log`, tabId: 3, tabActive: true };
const PAGE_A = 'http://127.0.0.1:4000/a.html';
const PAGE_B = 'http://localhost:4000/b.html';
const A: SenderFacts = { url: `${PAGE_A}#t=3`, tabId: 7, tabActive: true };

const SRC_A = 'http://127.0.0.1:4000/clips/a.webm';
const CASE_A = caseIdFor(PAGE_A, SRC_A);
const CASE_B = caseIdFor(PAGE_B, 'http://localhost:4000/clips/b.webm');
const video = (pageUrl: string, src: string) => ({ pageUrl, pageTitle: 'invented', src, width: 640, height: 360, duration: 4 });
const mark = { id: 'm1', kind: 'object-span', t: 1, points: [{ x: 1, y: 2 }, { x: 3, y: 4 }], edgeSigmaPx: 0.5 };

/**
 * One request of each type as the overlay or the popup would send it for page A (or tab 7), and
 * the page whose case it names when it names one: the legitimate request.
 */
const OWN: Record<RequestType, { payload: unknown; casePage?: string | null }> = {
  'status/get': { payload: {} },
  'case/open': { payload: { caseId: CASE_A, video: video(PAGE_A, SRC_A) }, casePage: null },
  'case/get': { payload: { caseId: CASE_A }, casePage: PAGE_A },
  'cases/forPage': { payload: { pageUrl: PAGE_A } },
  'mark/put': { payload: { caseId: CASE_A, mark }, casePage: PAGE_A },
  'marks/put': { payload: { caseId: CASE_A, marks: [mark] }, casePage: PAGE_A },
  'mark/remove': { payload: { caseId: CASE_A, markId: 'm1' }, casePage: PAGE_A },
  'case/assume': { payload: { caseId: CASE_A, assumptions: {} }, casePage: PAGE_A },
  'overlay/inject': { payload: { tabId: 7 } },
  'frame/capture': { payload: {} },
  'frames/foreign': { payload: { tabId: 7 } },
  'overlay/inject-origin': { payload: { tabId: 7, origin: 'http://localhost:4000' } },
  'cases/list': { payload: {} },
  'case/annotate': { payload: { caseId: CASE_A, notes: 'invented' }, casePage: PAGE_A },
  'case/delete': { payload: { caseId: CASE_A }, casePage: PAGE_A },
  'case/undelete': { payload: { caseId: CASE_A }, casePage: PAGE_A },
  'cases/deleted': { payload: {} },
  'cases/import': { payload: { text: '{}' } },
  'cases/export': { payload: {} },
  'storage/usage': { payload: {} },
  'seek/request': { payload: { pageUrl: PAGE_A, t: 2 } },
  'seek/take': { payload: { pageUrl: PAGE_A } },
};

/** The same request aimed at page B's case, page B's address or tab 8; null when it names none of them. */
const OTHERS: Record<RequestType, { payload: unknown; casePage?: string | null } | null> = {
  'status/get': null,
  'case/open': { payload: { caseId: CASE_B, video: video(PAGE_B, 'http://localhost:4000/clips/b.webm') }, casePage: PAGE_B },
  'case/get': { payload: { caseId: CASE_B }, casePage: PAGE_B },
  'cases/forPage': { payload: { pageUrl: PAGE_B } },
  'mark/put': { payload: { caseId: CASE_B, mark }, casePage: PAGE_B },
  'marks/put': { payload: { caseId: CASE_B, marks: [mark] }, casePage: PAGE_B },
  'mark/remove': { payload: { caseId: CASE_B, markId: 'm1' }, casePage: PAGE_B },
  'case/assume': { payload: { caseId: CASE_B, assumptions: {} }, casePage: PAGE_B },
  'overlay/inject': { payload: { tabId: 8 } },
  'frame/capture': null,
  'frames/foreign': { payload: { tabId: 8 } },
  'overlay/inject-origin': { payload: { tabId: 8, origin: 'http://localhost:4000' } },
  'cases/list': null,
  'case/annotate': { payload: { caseId: CASE_B, notes: 'invented' }, casePage: PAGE_B },
  'case/delete': { payload: { caseId: CASE_B }, casePage: PAGE_B },
  'case/undelete': { payload: { caseId: CASE_B }, casePage: PAGE_B },
  'cases/deleted': null,
  'cases/import': null,
  'cases/export': { payload: { caseIds: [CASE_B] } },
  'storage/usage': null,
  'seek/request': { payload: { pageUrl: PAGE_B, t: 2 } },
  'seek/take': { payload: { pageUrl: PAGE_B } },
};

/** What a page may do on its own page and tab (the overlay's needs, and calling itself up again). */
const PAGE_MAY = new Set<RequestType>(['status/get', 'case/open', 'case/get', 'cases/forPage', 'mark/put', 'mark/remove', 'case/assume', 'overlay/inject', 'frame/capture', 'frames/foreign', 'overlay/inject-origin', 'seek/take']);

const TYPES = Object.keys(OWN) as RequestType[];

describe('an extension page may ask anything', () => {
  it.each(TYPES)('%s, from the popup and from the log in a tab, for any page and tab', (type) => {
    for (const sender of [POPUP, LOG_TAB]) {
      expect(judge(type, OWN[type].payload, sender, EXT, OWN[type].casePage)).toEqual({ allow: true });
      const other = OTHERS[type];
      if (other) expect(judge(type, other.payload, sender, EXT, other.casePage)).toEqual({ allow: true });
    }
  });

  it('and never needs the stored case looked up first', () => {
    for (const type of TYPES) expect(needsCasePage(type, POPUP, EXT, OWN[type].payload)).toBeNull();
  });
});

describe('a page (a content script in a web page)', () => {
  it.each(TYPES)('%s: on its own page and tab, allowed only if the overlay may', (type) => {
    const v = judge(type, OWN[type].payload, A, EXT, OWN[type].casePage);
    expect(v.allow, JSON.stringify(v)).toBe(PAGE_MAY.has(type));
    if (!v.allow && !PAGE_MAY.has(type)) expect(v.reason).toBe('only the extension’s own pages may');
  });

  it.each(TYPES.filter((t) => OTHERS[t] !== null))('%s: for another page’s case, address or tab, refused', (type) => {
    const other = OTHERS[type]!;
    expect(judge(type, other.payload, A, EXT, other.casePage).allow).toBe(false);
  });

  it('reads a case of another page and a case that is not there alike (a page must not learn what else was measured)', () => {
    const foreign = judge('case/get', { caseId: CASE_B }, A, EXT, PAGE_B);
    const missing = judge('case/get', { caseId: CASE_B }, A, EXT, null);
    expect(foreign).toEqual({ allow: false, reason: 'not a case of this page' });
    expect(missing).toEqual(foreign);
    expect(judge('mark/put', { caseId: CASE_B, mark }, A, EXT, null)).toEqual(foreign);
    // without the lookup (the background always looks up for these) nothing is allowed either
    expect(judge('case/get', { caseId: CASE_A }, A, EXT, undefined).allow).toBe(false);
  });

  it('needs the stored case looked up for exactly the requests that name one and that it may make', () => {
    const looked = TYPES.filter((t) => needsCasePage(t, A, EXT, OWN[t].payload) !== null);
    expect(looked.sort()).toEqual(['case/assume', 'case/get', 'case/open', 'mark/put', 'mark/remove']);
    expect(needsCasePage('case/get', A, EXT, { caseId: CASE_B })).toBe(CASE_B);
  });

  describe('case/open', () => {
    const open = (payload: unknown, casePage: string | null = null, sender: SenderFacts = A) => judge('case/open', payload, sender, EXT, casePage);

    it('refuses a claimed page address that is not the sender’s', () => {
      expect(open({ caseId: caseIdFor(PAGE_B, 'x'), video: video(PAGE_B, 'x') })).toEqual({ allow: false, reason: 'payload.video.pageUrl is another page’s address' });
    });

    it('refuses another page’s case id under the sender’s own address, before looking at what is stored', () => {
      const v = open({ caseId: CASE_B, video: video(PAGE_A, SRC_A) });
      expect(v).toEqual({ allow: false, reason: 'payload.caseId is not the id of this page’s video' });
      expect(open({ caseId: CASE_B, video: video(PAGE_A, SRC_A) }, PAGE_B)).toEqual(v);
    });

    it('takes a video in a same-origin frame (its own address) and a stream video by its place on the page', () => {
      const framed = `${new URL(PAGE_A).origin}/plain.html?inframe`;
      expect(open({ caseId: caseIdFor(framed, SRC_A), video: video(framed, SRC_A) }).allow).toBe(true);
      expect(open({ caseId: caseIdFor(PAGE_A, '', 2), video: video(PAGE_A, '') }).allow).toBe(true);
      expect(open({ caseId: caseIdFor(PAGE_A, '', 2), video: video(PAGE_A, SRC_A) }).allow).toBe(false);
    });

    it('reopens its own stored case, not one stored for another origin under the same id', () => {
      expect(open(OWN['case/open'].payload, PAGE_A).allow).toBe(true);
      expect(open(OWN['case/open'].payload, PAGE_B)).toEqual({ allow: false, reason: 'not a case of this page' });
    });

    it('names the fields when the payload is not what the overlay sends', () => {
      for (const bad of [null, {}, { caseId: 1, video: video(PAGE_A, SRC_A) }, { caseId: CASE_A, video: { pageUrl: PAGE_A } }]) {
        expect(open(bad)).toEqual({ allow: false, reason: 'payload.caseId, payload.video.pageUrl and payload.video.src must be strings' });
      }
    });
  });

  it('frame/capture only from the tab its window shows (captureVisibleTab takes that one)', () => {
    expect(judge('frame/capture', {}, { ...A, tabActive: false }, EXT).allow).toBe(false);
    expect(judge('frame/capture', {}, { url: PAGE_A }, EXT).allow).toBe(false);
  });

  it('calls the overlay up, or looks at frames, only in its own tab', () => {
    expect(judge('overlay/inject', { tabId: 8 }, A, EXT)).toEqual({ allow: false, reason: 'another tab' });
    expect(judge('overlay/inject', { tabId: '7' }, A, EXT).allow).toBe(false);
    expect(judge('overlay/inject', { tabId: 7 }, { url: PAGE_A }, EXT).allow).toBe(false);
  });

  it('refuses a request it does not know, and one named after an Object property', () => {
    expect(judge('cases/wipe', {}, A, EXT)).toEqual({ allow: false, reason: 'unknown request' });
    expect(judge('toString', {}, A, EXT)).toEqual({ allow: false, reason: 'unknown request' });
  });

  it('a sender with no address is a page, not the extension', () => {
    expect(judge('cases/export', {}, {}, EXT).allow).toBe(false);
    expect(judge('cases/export', {}, { url: 'chrome-extension://otherotherotherotherotherother/x.html' }, EXT).allow).toBe(false);
  });
});

describe('the address rules', () => {
  it('an extension page is one under the extension’s own origin, with its slash', () => {
    expect(isExtensionPage(`${EXT}extension/popup/index.html`, EXT)).toBe(true);
    expect(isExtensionPage(`${EXT}extension/popup/index.html`, EXT.slice(0, -1))).toBe(true);
    // a longer id that starts with ours is another extension
    expect(isExtensionPage('chrome-extension://abcdefghijklmnopabcdefghijklmnopzz/x.html', EXT.slice(0, -1))).toBe(false);
    expect(isExtensionPage(undefined, EXT)).toBe(false);
    expect(isExtensionPage(`${EXT}x.html`, '')).toBe(false);
  });

  it('http(s) pages by origin (scheme, host, port: RFC 6454 §4)', () => {
    expect(samePage('http://127.0.0.1:4000/a.html', 'http://127.0.0.1:4000/other.html?q')).toBe(true);
    expect(samePage('http://127.0.0.1:4000/a.html', 'http://127.0.0.1:4001/a.html')).toBe(false);
    expect(samePage('http://127.0.0.1:4000/a.html', 'https://127.0.0.1:4000/a.html')).toBe(false);
    expect(samePage('http://127.0.0.1:4000/a.html', 'http://localhost:4000/a.html')).toBe(false);
  });

  it('opaque-origin addresses only exactly, fragment aside (URL Standard: file:, data:, about: origins are opaque)', () => {
    expect(samePage('file:///clips/a.html#x', 'file:///clips/a.html')).toBe(true);
    expect(samePage('file:///clips/a.html', 'file:///clips/b.html')).toBe(false);
    expect(samePage('http://127.0.0.1:4000/a.html', 'about:srcdoc')).toBe(false);
    expect(samePage('http://127.0.0.1:4000/a.html', 'not an address')).toBe(false);
    expect(samePage('http://127.0.0.1:4000/a.html', '')).toBe(false);
  });

  it('case ids as the overlay makes them (src/case/ids.ts)', () => {
    expect(caseIdMatches(CASE_A, PAGE_A, SRC_A)).toBe(true);
    expect(caseIdMatches(CASE_A, `${PAGE_A}#frag`, SRC_A)).toBe(true);
    expect(caseIdMatches(CASE_A, PAGE_B, SRC_A)).toBe(false);
    expect(caseIdMatches(caseIdFor(PAGE_A, '', 255), PAGE_A, '')).toBe(true);
    expect(caseIdMatches(caseIdFor(PAGE_A, '', 256), PAGE_A, '')).toBe(false);
  });

  it('the refusal names the request', () => {
    expect(refusal('cases/export', 'only the extension’s own pages may')).toBe('cases/export: not allowed from a page (only the extension’s own pages may)');
  });
});

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { AUDIENCE, follow, followerOf, forFrame, MAX_FOLLOWERS, noticesFor, readFollowers, unfollowTab, type Follower } from '../../extension/background/notices';
import { notice, type Notice } from '../../extension/shared/messages';
import { newCase } from '../../src/case/marks';
import { SCHEMA_VERSION } from '../../src/case/schema';
import { DEFAULT_SETTINGS } from '../../src/case/settings';

/*
 * The announcer's pure half: which notices a storage change makes, and which of them a page's
 * frame may hear. The changes are shaped as chrome.storage.onChanged gives them (Chrome extension
 * API reference, storage.onChanged: `(changes: {[key]: StorageChange{oldValue?, newValue?}},
 * areaName: "sync" | "local" | "managed" | "session")`; a removed key has no newValue). The
 * senders are shaped as runtime.MessageSender (same reference: `tab` is present only when the
 * message came from a tab, `frameId` and `documentId` name the sending frame and document).
 * Cases, pages and ids are invented.
 */

const video = { pageUrl: 'http://127.0.0.1:4000/invented/clip.html', pageTitle: 'Invented clip', src: 'http://127.0.0.1:4000/invented/clip.webm', width: 640, height: 360, duration: 3 };
const record = (id: string) => newCase(id, video, '0.1.0', 1_764_000_000_000);
const kinds = (ns: Notice[]) => ns.map((n) => n.kind);

describe('noticesFor (storage change -> notices)', () => {
  it('a saved case: its record as every read gives it, then the listing', () => {
    const ns = noticesFor({ 'case:c1': { newValue: record('c1') } }, 'local');
    expect(kinds(ns)).toEqual(['case/changed', 'cases/changed']);
    expect(ns[0]!.payload).toEqual({ caseId: 'c1', record: record('c1') });
    expect(ns[1]!.payload).toEqual({ caseIds: ['c1'] });
  });

  it('an old (version 2) record as it was written is announced migrated to the current schema, as case/get reads it', () => {
    // test/case/fixtures/v2: a record in the shape the version 2 code wrote (its README)
    const raw = JSON.parse(readFileSync('test/case/fixtures/v2/logged-case.json', 'utf8')) as { id: string };
    const [n] = noticesFor({ [`case:${raw.id}`]: { newValue: raw } }, 'local') as [Notice<'case/changed'>];
    expect(n.payload.record!.schema).toBe(SCHEMA_VERSION);
    expect(n.payload.record!.id).toBe(raw.id);
  });

  it('a removed case, and a value that fails validation, are announced as no readable record (null)', () => {
    const removed = noticesFor({ 'case:c1': { oldValue: record('c1') } }, 'local') as Notice<'case/changed'>[];
    expect(removed[0]!.payload).toEqual({ caseId: 'c1', record: null });
    const bad = noticesFor({ 'case:c2': { newValue: { schema: 2, id: 'c2', marks: 'not a list' } } }, 'local') as Notice<'case/changed'>[];
    expect(bad[0]!.payload.record).toBeNull();
    // a record stored under another id's key is unreadable too (src/case/stored.ts)
    const misfiled = noticesFor({ 'case:c3': { newValue: record('c4') } }, 'local') as Notice<'case/changed'>[];
    expect(misfiled[0]!.payload.record).toBeNull();
  });

  it('many keys in one change (an import) make one notice per case and one for the listing', () => {
    const ns = noticesFor({ 'case:a': { newValue: record('a') }, 'case:b': { newValue: record('b') }, 'quarantine:case:x': { newValue: {} } }, 'local');
    expect(kinds(ns)).toEqual(['case/changed', 'case/changed', 'cases/changed', 'quarantine/changed']);
    expect(ns[2]!.payload).toEqual({ caseIds: ['a', 'b'] });
  });

  it('settings are announced read with defaults, as loadSettings reads them (also when removed)', () => {
    const saved = noticesFor({ settings: { newValue: { ...DEFAULT_SETTINGS, system: 'aviation' } } }, 'local') as Notice<'settings/changed'>[];
    expect(saved).toEqual([notice('settings/changed', { settings: { ...DEFAULT_SETTINGS, system: 'aviation' } })]);
    const cleared = noticesFor({ settings: { oldValue: { ...DEFAULT_SETTINGS, system: 'aviation' } } }, 'local') as Notice<'settings/changed'>[];
    expect(cleared[0]!.payload.settings).toEqual(DEFAULT_SETTINGS);
  });

  it('the session area: deleted cases make deleted/changed; seeks and the followed frames make nothing', () => {
    expect(kinds(noticesFor({ 'deleted:c1': { newValue: {} } }, 'session'))).toEqual(['deleted/changed']);
    expect(noticesFor({ 'seek:http://127.0.0.1:4000/invented/clip.html': { newValue: { t: 1, requestedAt: 2 } } }, 'session')).toEqual([]);
    expect(noticesFor({ 'notice-followers': { newValue: [] } }, 'session')).toEqual([]);
  });

  it('keys that are not ours, and other areas, make nothing', () => {
    expect(noticesFor({ 'test-filler': { newValue: 'x' } }, 'local')).toEqual([]);
    // a key named like a case in another area is not a case
    expect(noticesFor({ 'case:c1': { newValue: record('c1') } }, 'sync')).toEqual([]);
    expect(noticesFor({ 'case:c1': { newValue: record('c1') } }, 'managed')).toEqual([]);
  });
});

describe('forFrame (what the overlay in a page frame may hear)', () => {
  const changed = (r: ReturnType<typeof record> | null) => notice('case/changed', { caseId: 'c1', record: r });

  it('a case only in a frame of its own page: the same origin for http(s), as case/get is held to (senders.ts)', () => {
    expect(forFrame(changed(record('c1')), 'http://127.0.0.1:4000/invented/other.html#t=3')).not.toBeNull();
    // another origin (port, scheme, host: the URL standard's origin tuple) hears nothing
    expect(forFrame(changed(record('c1')), 'http://127.0.0.1:4001/invented/clip.html')).toBeNull();
    expect(forFrame(changed(record('c1')), 'https://127.0.0.1:4000/invented/clip.html')).toBeNull();
    expect(forFrame(changed(record('c1')), 'http://localhost:4000/invented/clip.html')).toBeNull();
    expect(forFrame(changed(record('c1')), undefined)).toBeNull();
  });

  it('a case that went away is told to no frame (its page is not known any more)', () => {
    expect(forFrame(changed(null), video.pageUrl)).toBeNull();
  });

  it('the settings reach every followed frame; the listing, quarantine and undo list reach none', () => {
    const s = notice('settings/changed', { settings: DEFAULT_SETTINGS });
    expect(forFrame(s, 'http://127.0.0.1:5000/elsewhere.html')).toBe(s);
    for (const n of [notice('cases/changed', { caseIds: ['c1'] }), notice('quarantine/changed', {}), notice('deleted/changed', {})]) {
      expect(AUDIENCE[n.kind]).toBe('pages');
      expect(forFrame(n, video.pageUrl)).toBeNull();
    }
  });
});

describe('the followed frames', () => {
  const origin = 'chrome-extension://abcdefghijklmnopabcdefghijklmnop/';
  const tab = (id: number) => ({ id, index: 0, highlighted: false, active: true, pinned: false, incognito: false });

  it('a frame is followed from a content script request; an extension page (even in a tab) and the background are not', () => {
    expect(followerOf({ url: video.pageUrl, tab: tab(7), frameId: 0, documentId: 'D1' }, origin)).toEqual({ tabId: 7, frameId: 0, documentId: 'D1', url: video.pageUrl });
    expect(followerOf({ url: video.pageUrl, tab: tab(7), frameId: 3 }, origin)).toEqual({ tabId: 7, frameId: 3, url: video.pageUrl });
    expect(followerOf({ url: `${origin}extension/popup/index.html?view=log`, tab: tab(8), frameId: 0 }, origin)).toBeNull();
    expect(followerOf({ url: `${origin}extension/popup/index.html` }, origin)).toBeNull();
  });

  it('one entry per frame, the newest first; the same frame again with nothing new changes nothing', () => {
    const a: Follower = { tabId: 1, frameId: 0, documentId: 'D1', url: 'http://127.0.0.1:4000/a.html' };
    const b: Follower = { tabId: 2, frameId: 0, url: 'http://127.0.0.1:4000/b.html' };
    const one = follow([], a);
    const two = follow(one, b);
    expect(two).toEqual([b, a]);
    expect(follow(two, b)).toBe(two);
    // the frame navigated: a new document and address replace the old entry
    const a2 = { ...a, documentId: 'D2', url: 'http://127.0.0.1:4000/a2.html' };
    expect(follow(two, a2)).toEqual([a2, b]);
  });

  it('is bounded: past MAX_FOLLOWERS the oldest is forgotten', () => {
    let list: readonly Follower[] = [];
    for (let i = 0; i < MAX_FOLLOWERS + 5; i++) list = follow(list, { tabId: i, frameId: 0, url: `http://127.0.0.1:4000/${i}.html` });
    expect(list).toHaveLength(MAX_FOLLOWERS);
    expect(list[0]!.tabId).toBe(MAX_FOLLOWERS + 4);
    expect(list.some((f) => f.tabId === 4)).toBe(false);
  });

  it('a closed tab drops its frames; a navigating tab drops those known only by number', () => {
    const list: Follower[] = [
      { tabId: 1, frameId: 0, documentId: 'D1', url: 'http://127.0.0.1:4000/a.html' },
      { tabId: 1, frameId: 2, url: 'http://127.0.0.1:4000/a-frame.html' },
      { tabId: 2, frameId: 0, url: 'http://127.0.0.1:4000/b.html' },
    ];
    expect(unfollowTab(list, 1)).toEqual([list[2]]);
    expect(unfollowTab(list, 1, true)).toEqual([list[0], list[2]]);
    expect(unfollowTab(list, 9)).toBe(list);
  });

  it('a stored list is read back keeping only well-formed entries', () => {
    const good = { tabId: 1, frameId: 0, url: 'http://127.0.0.1:4000/a.html' };
    expect(readFollowers([good, { tabId: '1', frameId: 0, url: 'x' }, null, { tabId: 2, frameId: 0, url: 'y', documentId: 5 }])).toEqual([good]);
    expect(readFollowers(undefined)).toEqual([]);
    expect(readFollowers({ tabId: 1 })).toEqual([]);
  });
});

import { afterEach, describe, expect, it } from 'vitest';
import { envelope, notice } from '../../extension/shared/messages';
import { fromExtension, subscribe, type NoticeSender } from '../../extension/shared/subscribe';
import { DEFAULT_SETTINGS } from '../../src/case/settings';

/*
 * How views hear the background's notices, against a stand-in for Chromium's `chrome.runtime`.
 * The sender facts are those runtime.onMessage gives (Chrome extension API reference,
 * runtime.MessageSender: `id` of the extension, `url` of the sending page or script, `tab` only
 * when the message came from a tab, so always for a content script). Addresses are invented.
 */

const ID = 'abcdefghijklmnopabcdefghijklmnop';
const ORIGIN = `chrome-extension://${ID}/`;
const g = globalThis as unknown as { chrome?: unknown };
type Listener = (message: unknown, sender: NoticeSender) => unknown;

function fakeRuntime() {
  const listeners = new Set<Listener>();
  g.chrome = {
    runtime: { id: ID, getURL: (p: string) => `${ORIGIN}${p}`, onMessage: { addListener: (f: Listener) => listeners.add(f), removeListener: (f: Listener) => listeners.delete(f) } },
    storage: {},
  };
  return { listeners, deliver: (m: unknown, s: NoticeSender) => [...listeners].map((f) => f(m, s)) };
}

const background: NoticeSender = { id: ID, url: `${ORIGIN}service-worker-loader.js` };
const contentScript: NoticeSender = { id: ID, url: 'http://127.0.0.1:4000/invented/clip.html', tab: { id: 7 } };

afterEach(() => {
  delete g.chrome;
});

describe('fromExtension', () => {
  it('believes the background and the extension’s own pages, never a content script (it has a tab)', () => {
    expect(fromExtension(background, ID, ORIGIN)).toBe(true);
    // Firefox's background page, or a sender the browser gave no address
    expect(fromExtension({ id: ID }, ID, ORIGIN)).toBe(true);
    expect(fromExtension(contentScript, ID, ORIGIN)).toBe(false);
    // even a content script in a frame of one of our own pages is a tab's
    expect(fromExtension({ id: ID, url: `${ORIGIN}extension/popup/index.html`, tab: { id: 3 } }, ID, ORIGIN)).toBe(false);
    expect(fromExtension({ id: 'another-extension', url: 'chrome-extension://another-extension/bg.js' }, ID, ORIGIN)).toBe(false);
    expect(fromExtension({ id: ID, url: 'http://127.0.0.1:4000/x.html' }, ID, ORIGIN)).toBe(false);
  });
});

describe('subscribe', () => {
  it('hands the handler each notice of its kind from the extension, and never replies', () => {
    const rt = fakeRuntime();
    const heard: unknown[] = [];
    const stop = new AbortController();
    subscribe('settings/changed', (p) => heard.push(p.settings.system), stop.signal);
    const replies = rt.deliver(notice('settings/changed', { settings: { ...DEFAULT_SETTINGS, system: 'imperial' } }), background);
    expect(heard).toEqual(['imperial']);
    expect(replies).toEqual([undefined]);
  });

  it('ignores other kinds, requests, and any notice a content script sent', () => {
    const rt = fakeRuntime();
    const heard: unknown[] = [];
    subscribe('cases/changed', (p) => heard.push(p.caseIds), new AbortController().signal);
    rt.deliver(notice('quarantine/changed', {}), background);
    rt.deliver(envelope('case/get', { caseId: 'c1' }), background);
    // a page may confuse the overlay into sending anything: a forged notice from a tab is not heard
    rt.deliver(notice('cases/changed', { caseIds: ['forged'] }), contentScript);
    expect(heard).toEqual([]);
    rt.deliver(notice('cases/changed', { caseIds: ['c1'] }), background);
    expect(heard).toEqual([['c1']]);
  });

  it('stops when its signal aborts, and an aborted signal never starts', () => {
    const rt = fakeRuntime();
    const stop = new AbortController();
    let n = 0;
    subscribe('deleted/changed', () => n++, stop.signal);
    expect(rt.listeners.size).toBe(1);
    stop.abort();
    expect(rt.listeners.size).toBe(0);
    rt.deliver(notice('deleted/changed', {}), background);
    expect(n).toBe(0);
    subscribe('deleted/changed', () => n++, stop.signal);
    expect(rt.listeners.size).toBe(0);
  });
});

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CDPSession, Page } from 'playwright-core';
import { caseIdFor } from '../../src/case/ids';
import { E2E_DIST, injectOverlay, launchWithExtension, overlayReady, sendAsPopup, stopServiceWorker, storedCases, videoReady, type Loaded } from './harness';
import { startServer, type TestServer } from '../../extension/tools/static-server';

/*
 * The background's notices in the built extension (background/announce.ts): what the extension's
 * own pages hear, and what the overlay's isolated world in a page hears. A page's frame must hear
 * its own page's cases and the settings, and nothing of another page's case or of the listing,
 * also after the browser stopped and woke the service worker. The isolated world is found as in
 * senders.test.ts (DevTools protocol, Runtime.executionContextCreated with auxData.type
 * "isolated" and the extension's origin).
 *
 * Tab A is on 127.0.0.1, tab B on localhost: two origins of the local test server (invented pages).
 */

let app: Loaded;
let server: TestServer;

beforeAll(async () => {
  server = await startServer();
  app = await launchWithExtension(E2E_DIST);
});
afterAll(async () => {
  await app?.close();
  await server?.close();
});

const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };
const mark = (id: string, x: number) => ({ id, kind: 'object-span', t: 1, points: [{ x, y: 100 }, { x: x + 30, y: 101 }], edgeSigmaPx: 0.5, dimension: 'wingspan', mapping, createdAt: 1 });

interface Heard {
  kind: string;
  caseId?: string;
  marks?: number | null;
  system?: string;
  fromTab: boolean;
}

/** What a collector installed by `listen` (below) has heard, as plain data. */
const LISTEN = `(() => {
  globalThis.__heard = [];
  chrome.runtime.onMessage.addListener((m, sender) => {
    if (!m || m.channel !== 'clip-caliper/notice') return;
    const p = m.payload || {};
    globalThis.__heard.push({ kind: m.kind, caseId: p.caseId, marks: p.record === undefined ? undefined : p.record === null ? null : p.record.marks.length, system: p.settings ? p.settings.system : undefined, fromTab: sender.tab !== undefined });
  });
  return true;
})()`;

/** The overlay's isolated world in the page's top frame, with a collector of what it hears. */
async function isolatedListener(page: Page): Promise<{ cdp: CDPSession; heard(): Promise<Heard[]> }> {
  const cdp = await app.context.newCDPSession(page);
  const { frameTree } = (await cdp.send('Page.getFrameTree')) as { frameTree: { frame: { id: string } } };
  const contexts: { id: number; origin: string; auxData?: { type?: string; frameId?: string } }[] = [];
  cdp.on('Runtime.executionContextCreated', (e) => contexts.push(e.context as (typeof contexts)[number]));
  await cdp.send('Runtime.enable');
  const ours = contexts.find((c) => c.auxData?.type === 'isolated' && c.auxData.frameId === frameTree.frame.id && c.origin === `chrome-extension://${app.extensionId}`);
  if (!ours) throw new Error(`no isolated world of the extension in ${page.url()}`);
  const evaluate = async (expression: string) => ((await cdp.send('Runtime.evaluate', { contextId: ours.id, expression, returnByValue: true })) as { result: { value: unknown } }).result.value;
  await evaluate(LISTEN);
  return { cdp, heard: async () => (await evaluate('globalThis.__heard')) as Heard[] };
}

async function open(url: string): Promise<Page> {
  const page = await app.context.newPage();
  await page.goto(url);
  await videoReady(page);
  return page;
}

/** An extension page of its own (as the popup or the log is), with a collector of what it hears. */
async function extensionListener(): Promise<{ page: Page; heard(): Promise<Heard[]> }> {
  const page = await app.context.newPage();
  await page.goto(`chrome-extension://${app.extensionId}/extension/options/index.html`);
  await page.evaluate(LISTEN);
  return { page, heard: () => page.evaluate(() => (globalThis as unknown as { __heard: Heard[] }).__heard) };
}

const kinds = (hs: Heard[]) => hs.map((h) => h.kind);

describe('the extension’s own pages', () => {
  it('hear each saved and deleted case with its record, the listing, the undo list and the settings, from the background', async () => {
    const ext = await extensionListener();
    const video = { pageUrl: server.url('/plain.html?notices-ext'), pageTitle: 'Invented page', src: server.url('/invented.webm'), width: 640, height: 360, duration: 4 };
    const caseId = caseIdFor(video.pageUrl, video.src);
    await sendAsPopup(app, 'case/open', { caseId, video });
    await sendAsPopup(app, 'mark/put', { caseId, mark: mark('m1', 100) });
    await expect.poll(async () => (await ext.heard()).filter((h) => h.kind === 'case/changed' && h.marks === 1)).toHaveLength(1);
    expect(kinds(await ext.heard())).toContain('cases/changed');

    await sendAsPopup(app, 'case/delete', { caseId });
    await expect.poll(async () => (await ext.heard()).some((h) => h.kind === 'case/changed' && h.caseId === caseId && h.marks === null)).toBe(true);
    await expect.poll(async () => kinds(await ext.heard())).toContain('deleted/changed');

    await ext.page.evaluate(() => chrome.storage.local.set({ settings: { version: 1, system: 'imperial', cameraProfile: 'phone-main-landscape-stabilised' } }));
    await expect.poll(async () => (await ext.heard()).find((h) => h.kind === 'settings/changed')?.system).toBe('imperial');
    // every notice came from the background, not from a tab
    expect((await ext.heard()).every((h) => !h.fromTab)).toBe(true);
    await ext.page.evaluate(() => chrome.storage.local.remove('settings'));
    await ext.page.close();
  });
});

describe('the overlay’s isolated world in a page', () => {
  it('hears its own page’s case and the settings, never another page’s case nor the listing, also after the worker was stopped', async () => {
    const pageA = await open(server.url('/plain.html?notices-a'));
    const pageB = await open(server.url('/plain.html?notices-b', 'localhost'));
    // calling the overlay up opens each page's case: the first request from that frame, so it is followed from then on
    await injectOverlay(app, pageA.url());
    await overlayReady(pageA, 0);
    await injectOverlay(app, pageB.url());
    await overlayReady(pageB, 0);
    const a = await isolatedListener(pageA);
    const b = await isolatedListener(pageB);
    const cases = (await storedCases(app)) as Record<string, { id: string; video: { pageUrl: string } }>;
    const caseA = Object.values(cases).find((c) => c.video.pageUrl === pageA.url())!.id;
    const caseB = Object.values(cases).find((c) => c.video.pageUrl === pageB.url())!.id;

    // the popup adds a mark to A's case
    await sendAsPopup(app, 'mark/put', { caseId: caseA, mark: mark('a1', 100) });
    await expect.poll(async () => (await a.heard()).filter((h) => h.kind === 'case/changed' && h.caseId === caseA && h.marks === 1)).toHaveLength(1);
    // and then to B's: A hears nothing of it, B hears its own
    await sendAsPopup(app, 'mark/put', { caseId: caseB, mark: mark('b1', 120) });
    await expect.poll(async () => (await b.heard()).some((h) => h.kind === 'case/changed' && h.caseId === caseB)).toBe(true);
    expect((await a.heard()).some((h) => h.caseId === caseB)).toBe(false);
    expect((await b.heard()).some((h) => h.caseId === caseA)).toBe(false);

    // settings reach both; the listing and quarantine reach neither
    const ext = await extensionListener();
    await ext.page.evaluate(() => chrome.storage.local.set({ settings: { version: 1, system: 'aviation', cameraProfile: 'phone-main-landscape-stabilised' } }));
    await expect.poll(async () => (await a.heard()).some((h) => h.kind === 'settings/changed' && h.system === 'aviation')).toBe(true);
    await expect.poll(async () => (await b.heard()).some((h) => h.kind === 'settings/changed' && h.system === 'aviation')).toBe(true);
    for (const w of [a, b]) expect(kinds(await w.heard()).filter((k) => k !== 'case/changed' && k !== 'settings/changed')).toEqual([]);

    // a worker the browser stopped wakes for the next change and still knows A's frame
    await stopServiceWorker(app);
    await ext.page.evaluate((k) => chrome.storage.local.get(k).then((got) => {
      const c = got[k] as { notes: string };
      return chrome.storage.local.set({ [k]: { ...c, notes: 'written while the worker slept' } });
    }), `case:${caseA}`);
    await expect.poll(async () => (await a.heard()).filter((h) => h.kind === 'case/changed' && h.caseId === caseA).length, { timeout: 10_000 }).toBe(2);
    expect((await b.heard()).some((h) => h.caseId === caseA)).toBe(false);

    await ext.page.evaluate(() => chrome.storage.local.remove('settings'));
    await a.cdp.detach();
    await b.cdp.detach();
    await ext.page.close();
    await pageA.close();
    await pageB.close();
  });
});

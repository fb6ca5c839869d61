import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CDPSession, Page } from 'playwright-core';
import { caseIdFor } from '../../src/case/ids';
import { E2E_DIST, injectOverlay, launchWithExtension, overlayReady, sendAsPopup, storedCases, tabIdFor, videoReady, type Loaded } from './harness';
import { startServer, type TestServer } from '../../extension/tools/static-server';
import { ovl } from '../../extension/tools/overlay-world';

/*
 * The page under review is an adversary (issue 13): a content script of ours, in a tab whose page
 * may have confused it, asks the background for another tab's case and for the case log's powers.
 * Each is refused, and the stored cases are byte for byte as they were. The requests are sent from
 * the very context the overlay runs in (the extension's isolated world in tab A), found through
 * the DevTools protocol: Runtime.executionContextCreated with auxData.type "isolated" and the
 * extension's origin.
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

async function open(url: string): Promise<Page> {
  const page = await app.context.newPage();
  await page.goto(url);
  await videoReady(page);
  return page;
}

/** The extension's isolated world in the page's top frame (there once the overlay was called up). */
async function isolatedWorld(page: Page): Promise<{ cdp: CDPSession; ask(type: string, payload: unknown): Promise<{ ok: boolean; error?: string; value?: unknown }> }> {
  const cdp = await app.context.newCDPSession(page);
  const { frameTree } = (await cdp.send('Page.getFrameTree')) as { frameTree: { frame: { id: string } } };
  const contexts: { id: number; origin: string; auxData?: { type?: string; frameId?: string } }[] = [];
  cdp.on('Runtime.executionContextCreated', (e) => contexts.push(e.context as (typeof contexts)[number]));
  await cdp.send('Runtime.enable'); // reports every context that exists now
  const ours = contexts.find((c) => c.auxData?.type === 'isolated' && c.auxData.frameId === frameTree.frame.id && c.origin === `chrome-extension://${app.extensionId}`);
  if (!ours) throw new Error(`no isolated world of the extension in ${page.url()}: ${JSON.stringify(contexts.map((c) => [c.origin, c.auxData]))}`);
  return {
    cdp,
    async ask(type, payload) {
      const r = (await cdp.send('Runtime.evaluate', {
        contextId: ours.id,
        expression: `chrome.runtime.sendMessage(${JSON.stringify({ channel: 'clip-caliper', type, payload })})`,
        awaitPromise: true,
        returnByValue: true,
      })) as { result: { value?: { ok: boolean; error?: string; value?: unknown } }; exceptionDetails?: { text: string } };
      if (r.exceptionDetails || !r.result.value) throw new Error(`${type}: ${JSON.stringify(r.exceptionDetails ?? r.result)}`);
      return r.result.value;
    },
  };
}

describe('a content script acts only on its own page and tab', () => {
  it('is refused another tab’s case, the case log’s powers and calling the overlay up elsewhere; storage unchanged', async () => {
    // tab B: a case with a mark, put there by an extension page (as the popup and log do)
    const pageB = await open(server.url('/plain.html?senders-b', 'localhost'));
    const srcB = await pageB.locator('video').evaluate((v: HTMLVideoElement) => v.currentSrc);
    const caseB = caseIdFor(pageB.url(), srcB);
    await sendAsPopup(app, 'case/open', { caseId: caseB, video: { pageUrl: pageB.url(), pageTitle: 'Invented page B', src: srcB, width: 640, height: 360, duration: 4 } });
    await sendAsPopup(app, 'mark/put', { caseId: caseB, mark: mark('b1', 100) });
    const tabB = await tabIdFor(app, pageB.url());

    // tab A: the overlay called up, so that its isolated world exists
    const pageA = await open(server.url('/plain.html?senders-a'));
    await injectOverlay(app, pageA.url());
    await overlayReady(pageA, 0);
    const tabA = await tabIdFor(app, pageA.url());
    const a = await isolatedWorld(pageA);

    // what an extension page may do, so that each refusal below is the sender check and not a missing case
    const file = (await sendAsPopup(app, 'cases/export', { caseIds: [caseB] })) as { text: string };
    const before = JSON.stringify(await storedCases(app));
    expect(Object.keys(JSON.parse(before) as object)).toContain(`case:${caseB}`);

    const attempts: [string, unknown][] = [
      ['case/get', { caseId: caseB }],
      ['case/open', { caseId: caseB, video: { pageUrl: pageB.url(), pageTitle: 'x', src: srcB, width: 640, height: 360, duration: 4 } }],
      ['case/open', { caseId: caseB, video: { pageUrl: pageA.url(), pageTitle: 'x', src: srcB, width: 640, height: 360, duration: 4 } }],
      ['mark/put', { caseId: caseB, mark: mark('a1', 200) }],
      ['mark/remove', { caseId: caseB, markId: 'b1' }],
      ['case/assume', { caseId: caseB, assumptions: {} }],
      ['cases/forPage', { pageUrl: pageB.url() }],
      ['seek/take', { pageUrl: pageB.url() }],
      ['cases/export', {}],
      ['cases/export', { caseIds: [caseB] }],
      ['cases/import', { text: file.text.replace('"b1"', '"a9"') }],
      ['case/delete', { caseId: caseB }],
      ['case/undelete', { caseId: caseB }],
      ['case/annotate', { caseId: caseB, notes: 'planted' }],
      ['cases/list', {}],
      ['cases/deleted', {}],
      ['storage/usage', {}],
      ['seek/request', { pageUrl: pageB.url(), t: 1 }],
      ['overlay/inject', { tabId: tabB }],
      ['overlay/inject-origin', { tabId: tabB, origin: new URL(pageB.url()).origin }],
      ['frames/foreign', { tabId: tabB }],
    ];
    const refused: string[] = [];
    const notRefused: string[] = [];
    for (const [type, payload] of attempts) {
      const reply = await a.ask(type, payload);
      if (reply.ok || !new RegExp(`^${type}: not allowed from a page \\(.+\\)$`).test(reply.error ?? '')) notRefused.push(`${type} → ${JSON.stringify(reply).slice(0, 120)}`);
      else refused.push(reply.error!);
    }
    expect(notRefused).toEqual([]);
    expect(refused).toHaveLength(attempts.length);
    // the same answer for B's case as for a case that is not there at all
    const none = await a.ask('case/get', { caseId: caseIdFor(pageB.url(), `${srcB}?never`) });
    expect(none.error).toBe(refused[0]);

    // nothing moved: storage byte-identical, no overlay called up in B, B's case still there for the popup
    await pageB.waitForTimeout(500);
    expect(JSON.stringify(await storedCases(app))).toBe(before);
    expect(await ovl(pageB).count()).toBe(0);
    expect(((await sendAsPopup(app, 'case/get', { caseId: caseB })) as { marks: unknown[] }).marks).toHaveLength(1);

    // while what the overlay needs on its own page still works from the same world
    const own = (await storedCases(app)) as Record<string, { id: string; video: { pageUrl: string } }>;
    const caseA = Object.values(own).find((c) => c.video.pageUrl === pageA.url())!;
    expect((await a.ask('case/get', { caseId: caseA.id })).ok).toBe(true);
    expect((await a.ask('seek/take', { pageUrl: pageA.url() })).ok).toBe(true);
    expect((await a.ask('overlay/inject', { tabId: tabA })).ok).toBe(true);
    expect((await a.ask('status/get', {})).ok).toBe(true);

    await a.cdp.detach();
    await pageA.close();
    await pageB.close();
  });
});

import { chromium, type BrowserContext, type Worker } from 'playwright-core';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { ovl } from '../../extension/tools/overlay-world';

/** Where Chromium is: CHROME_PATH first, then Debian's package. */
export function chromiumPath(): string {
  const candidates = [process.env.CHROME_PATH, '/usr/bin/chromium', '/usr/bin/chromium-browser'];
  for (const c of candidates) if (c && existsSync(c)) return c;
  throw new Error('Chromium not found: set CHROME_PATH or install it (apt-get install -y chromium)');
}

/*
 * Flags for headless Chromium on this kind of machine: without the background-networking ones it
 * keeps trying (and failing) to reach the network; no sandbox as root; no GPU here.
 *
 * The browser itself must make no request off the machine. With the flags above (and Playwright's
 * own defaults) a net log of a short run still showed three: POSTs to an update service (traffic
 * annotation update_client) and an account service (gaia_auth_list_accounts), each after a DNS
 * query to the machine's resolver; both came with no extension loaded too, and with the profile's
 * signin.allowed preference off (the account check runs once the network is up, whatever the
 * sign-in settings: open report chromiumembedded/cef#4276). So they are fenced rather than
 * switched off: every request that is not for a loopback address goes to a proxy on 127.0.0.1:9, where
 * nothing listens, and fails there at once (Chromium always bypasses the proxy for localhost,
 * 127.0.0.0/8 and [::1] unless told `<-loopback>`, so the test pages load directly); and every
 * name but the two loopback ones resolves to "not found" without asking a DNS server.
 * test/e2e/offline.test.ts reads a net log to check this.
 */
export const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
  '--proxy-server=127.0.0.1:9',
  '--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE localhost, EXCLUDE 127.0.0.1',
];

export interface Loaded {
  context: BrowserContext;
  worker: Worker;
  extensionId: string;
  close(): Promise<void>;
}

/** Launches headless Chromium with the built extension loaded from `dist` and waits for its worker. */
export async function launchWithExtension(dist = resolve('dist'), options: { colorScheme?: 'light' | 'dark'; netLog?: string } = {}): Promise<Loaded> {
  if (!existsSync(join(dist, 'manifest.json'))) throw new Error(`no build at ${dist}: run npm run build first`);
  const profile = mkdtempSync(join(tmpdir(), 'clip-caliper-e2e-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: chromiumPath(),
    headless: true,
    colorScheme: options.colorScheme ?? 'light',
    args: [
      `--disable-extensions-except=${dist}`,
      `--load-extension=${dist}`,
      ...CHROMIUM_ARGS,
      // netLog: a file for Chromium's own log of every request, socket and DNS lookup (written out on close)
      ...(options.netLog ? [`--log-net-log=${options.netLog}`, '--net-log-capture-mode=Default'] : []),
    ],
  });
  const worker = context.serviceWorkers()[0] ?? (await context.waitForEvent('serviceworker', { timeout: 30_000 }));

  const extensionId = new URL(worker.url()).host;
  return {
    context,
    worker,
    extensionId,
    async close() {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** The e2e build: host permission for the local test origins, so injection works without a click. */
export const E2E_DIST = resolve('dist-e2e');

/*
 * The tests reach the extension through one of its own pages, the way the popup does, not
 * through Playwright's worker handle: once a service worker is stopped, that handle goes stale and
 * hangs, while a runtime message simply wakes a fresh worker.
 */
const extPages = new WeakMap<Loaded, Promise<import('playwright-core').Page>>();
function extensionPage(app: Loaded): Promise<import('playwright-core').Page> {
  let p = extPages.get(app);
  if (!p) {
    p = (async () => {
      const page = await app.context.newPage();
      await page.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html`);
      return page;
    })();
    extPages.set(app, p);
  }
  return p;
}

/** Sends a request to the background from an extension page, exactly as the popup does. */
export async function sendAsPopup(app: Loaded, type: string, payload: unknown): Promise<unknown> {
  const page = await extensionPage(app);
  const reply = (await page.evaluate(([t, p]) => chrome.runtime.sendMessage({ channel: 'clip-caliper', type: t, payload: p }), [type, payload] as const)) as
    | { ok: true; value: unknown }
    | { ok: false; error: string };
  if (!reply.ok) throw new Error(reply.error);
  return reply.value;
}

/** The id of the tab showing `url`. */
export async function tabIdFor(app: Loaded, url: string): Promise<number> {
  const page = await extensionPage(app);
  const tabId = await page.evaluate(async (u) => (await chrome.tabs.query({})).find((t) => t.url === u)?.id, url);
  if (tabId === undefined) throw new Error(`no tab for ${url}`);
  return tabId;
}

/** Calls the overlay up in the tab showing `url`, through the popup's own request. */
export async function injectOverlay(app: Loaded, url: string): Promise<void> {
  await sendAsPopup(app, 'overlay/inject', { tabId: await tabIdFor(app, url) });
}

/**
 * Calls the overlay up the way the popup's button does: straight from the extension page, without
 * the background (the e2e build exposes the popup's own call, extension/popup/main.tsx), with its
 * options: `videoSrc` as the context menu gives it, `overlayFile` to send the overlay proper from
 * another file (a missing one makes it fail).
 */
export async function callUpAsPopup(app: Loaded, tabId: number, options: { overlayFile?: string; videoSrc?: string } = {}): Promise<void> {
  const page = await extensionPage(app);
  await page.evaluate(
    ({ id, opts }) => (globalThis as unknown as { clipCaliperE2E: { callUp(tabId: number, options: object): Promise<boolean> } }).clipCaliperE2E.callUp(id, opts),
    { id: tabId, opts: options },
  );
}

/** A frame of the video measured in the tab, read as the follower's page reads it (extension/follow/page-frames.ts); data as a plain array. */
export async function readPageFrameAsPopup(
  app: Loaded,
  tabId: number,
  req: { t: number; x: number; y: number; width: number; height: number; step: number },
): Promise<{ gray: { data: number[]; width: number; height: number; channels: 1 }; t: number; x: number; y: number; step: number; source: string } | { error: string }> {
  const page = await extensionPage(app);
  return page.evaluate(
    ({ id, r }) => (globalThis as unknown as { clipCaliperE2E: { readPageFrame(tabId: number, frameId: number, req: object): Promise<never> } }).clipCaliperE2E.readPageFrame(id, 0, r),
    { id: tabId, r: req },
  );
}

/** Every stored case (the extension's local storage, read from its own page). */
export async function storedCases(app: Loaded): Promise<Record<string, unknown>> {
  const page = await extensionPage(app);
  return page.evaluate(async () => {
    const all = await chrome.storage.local.get(null);
    return Object.fromEntries(Object.entries(all).filter(([k]) => k.startsWith('case:')));
  });
}

/** Stops the extension's service worker (as the browser does when it is idle). */
export async function stopServiceWorker(app: Loaded): Promise<void> {
  const page = await extensionPage(app);
  const cdp = await app.context.newCDPSession(page);
  const running: string[] = [];
  cdp.on('ServiceWorker.workerVersionUpdated', (e) => {
    for (const v of e.versions) if (v.runningStatus === 'running' && v.scriptURL.includes(app.extensionId)) running.push(v.versionId);
  });
  await cdp.send('ServiceWorker.enable');
  await new Promise((ok) => setTimeout(ok, 200));
  for (const versionId of running) await cdp.send('ServiceWorker.stopWorker', { versionId });
  await cdp.detach();
}

type PageOrFrame = import('playwright-core').Page | import('playwright-core').Frame;

/** Waits until the page's video (or the one matching `selector`) has its first frame; open shadow roots are searched too. */
export async function videoReady(frame: PageOrFrame, selector = 'video'): Promise<void> {
  await frame.waitForFunction((s) => {
    const find = (root: Document | ShadowRoot): HTMLVideoElement | null => {
      const here = root.querySelector(s) as HTMLVideoElement | null;
      if (here) return here;
      for (const el of root.querySelectorAll('*')) {
        const inner = el.shadowRoot && find(el.shadowRoot);
        if (inner) return inner;
      }
      return null;
    };
    const v = find(document);
    return !!v && v.readyState >= 2 && v.videoWidth > 0;
  }, selector);
}

/** Pauses the page's video at t and waits until that frame is shown. */
export async function seek(frame: PageOrFrame, t: number): Promise<void> {
  await frame.evaluate(async (time) => {
    const v = document.querySelector('video') as HTMLVideoElement;
    v.pause();
    await new Promise<void>((ok) => {
      v.addEventListener('seeked', () => ok(), { once: true });
      v.currentTime = time;
    });
  }, t);
}

/** Waits until the overlay is up and has loaded its case (its readout counts the saved marks). */
export async function overlayReady(frame: PageOrFrame, marks?: number): Promise<void> {
  const { expect } = await import('vitest');
  await expect
    .poll(() => ovl(frame).text('[data-testid=readout]').catch(() => null), { timeout: 10_000 })
    .toMatch(marks === undefined ? /\d+ marks? saved/ : new RegExp(`\\b${marks} ${marks === 1 ? 'mark' : 'marks'} saved`));
}

import { chromium, type BrowserContext, type Worker } from 'playwright-core';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

/** Where Chromium is: CHROME_PATH first, then Debian's package. */
export function chromiumPath(): string {
  const candidates = [process.env.CHROME_PATH, '/usr/bin/chromium', '/usr/bin/chromium-browser'];
  for (const c of candidates) if (c && existsSync(c)) return c;
  throw new Error('Chromium not found: set CHROME_PATH or install it (apt-get install -y chromium)');
}

export interface Loaded {
  context: BrowserContext;
  worker: Worker;
  extensionId: string;
  close(): Promise<void>;
}

/** Launches headless Chromium with the built extension loaded from `dist` and waits for its worker. */
export async function launchWithExtension(dist = resolve('dist'), options: { colorScheme?: 'light' | 'dark' } = {}): Promise<Loaded> {
  if (!existsSync(join(dist, 'manifest.json'))) throw new Error(`no build at ${dist}: run npm run build first`);
  const profile = mkdtempSync(join(tmpdir(), 'clip-caliper-e2e-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: chromiumPath(),
    headless: true,
    colorScheme: options.colorScheme ?? 'light',
    args: [
      `--disable-extensions-except=${dist}`,
      `--load-extension=${dist}`,
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
    ],
  });
  const worker = context.serviceWorkers()[0] ?? (await context.waitForEvent('serviceworker', { timeout: 30_000 }));
  // the e2e build exposes the injection the toolbar would trigger; wait until the worker has run
  if (dist.endsWith('dist-e2e')) await worker.evaluate(() => new Promise<void>((ok) => {
    const check = () => ('__clipCaliperInject' in globalThis ? ok() : setTimeout(check, 20));
    check();
  }));
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

/** The e2e build: host permission for the local test origins, injection callable from the worker. */
export const E2E_DIST = resolve('dist-e2e');

const stopped = new WeakSet<Worker>();

/** The live service worker (a stopped one is restarted by waking it from an extension page). */
export async function currentWorker(app: Loaded): Promise<Worker> {
  for (const w of app.context.serviceWorkers()) if (!stopped.has(w)) w.once('close', () => stopped.add(w));
  const live = app.context.serviceWorkers().find((w) => w.url().includes(app.extensionId) && !stopped.has(w));
  if (live) return live;
  const wake = await app.context.newPage();
  const next = app.context.waitForEvent('serviceworker', { timeout: 30_000 });
  await wake.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html`);
  const w = await next;
  w.once('close', () => stopped.add(w));
  await wake.close();
  return w;
}

/** Calls the overlay up in the tab showing `url`, as the toolbar, command or context menu would. */
export async function injectOverlay(app: Loaded, url: string): Promise<void> {
  const worker = await currentWorker(app);
  await worker.evaluate(async (u) => {
    const tabs = await chrome.tabs.query({});
    const tab = tabs.find((t) => t.url === u);
    if (!tab?.id) throw new Error(`no tab for ${u}`);
    await (globalThis as unknown as { __clipCaliperInject: (id: number) => Promise<boolean> }).__clipCaliperInject(tab.id);
  }, url);
}

/** Every stored case (the extension's local storage, read from its worker). */
export async function storedCases(app: Loaded): Promise<Record<string, unknown>> {
  const worker = await currentWorker(app);
  return worker.evaluate(async () => {
    const all = await chrome.storage.local.get(null);
    return Object.fromEntries(Object.entries(all).filter(([k]) => k.startsWith('case:')));
  });
}

/** Sends a request to the background from an extension page, exactly as the popup does. */
export async function sendAsPopup(app: Loaded, type: string, payload: unknown): Promise<unknown> {
  const page = await app.context.newPage();
  await page.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html`);
  const reply = await page.evaluate(([t, p]) => chrome.runtime.sendMessage({ channel: 'clip-caliper', type: t, payload: p }), [type, payload] as const);
  await page.close();
  if (!(reply as { ok: boolean }).ok) throw new Error(String((reply as { error: string }).error));
  return (reply as { value: unknown }).value;
}

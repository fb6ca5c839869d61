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
export async function launchWithExtension(dist = resolve('dist')): Promise<Loaded> {
  if (!existsSync(join(dist, 'manifest.json'))) throw new Error(`no build at ${dist}: run npm run build first`);
  const profile = mkdtempSync(join(tmpdir(), 'clip-caliper-e2e-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: chromiumPath(),
    headless: true,
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

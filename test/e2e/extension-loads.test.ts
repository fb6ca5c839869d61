import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { launchWithExtension, type Loaded } from './harness';

const pkg = JSON.parse(readFileSync('package.json', 'utf8')) as { version: string };
let app: Loaded;

beforeAll(async () => {
  app = await launchWithExtension();
});
afterAll(async () => {
  await app?.close();
});

describe('built extension in Chromium', () => {
  it('registers its MV3 service worker', () => {
    expect(app.worker.url()).toMatch(/^chrome-extension:\/\/[a-p]{32}\/service-worker-loader\.js$/);
  });

  it('declares no content scripts and no host permissions (injection is on demand only)', async () => {
    const manifest = (await app.worker.evaluate(() => chrome.runtime.getManifest())) as chrome.runtime.ManifestV3;
    expect(manifest.manifest_version).toBe(3);
    expect(manifest.content_scripts ?? []).toEqual([]);
    expect(manifest.host_permissions ?? []).toEqual([]);
    expect([...manifest.permissions!].sort()).toEqual(['activeTab', 'contextMenus', 'scripting', 'storage']);
    // sites are asked for one at a time, only for a video inside a frame from another site
    expect(manifest.optional_host_permissions).toEqual(['http://*/*', 'https://*/*']);
  });

  it('does not expose the overlay file to pages (no web-accessible resources)', async () => {
    const manifest = (await app.worker.evaluate(() => chrome.runtime.getManifest())) as chrome.runtime.ManifestV3;
    const listed = (manifest.web_accessible_resources ?? []).flatMap((w) => w.resources);
    expect(listed.filter((r) => r.includes('overlay'))).toEqual([]);
    // and the file the background injects is really there
    const page = await app.context.newPage();
    const res = await page.goto(`chrome-extension://${app.extensionId}/extension/overlay/index.js`);
    expect(res?.ok()).toBe(true);
    await page.close();
  });

  it('keeps the polyfill and mathjs out of the file it sends into pages', () => {
    // each call-up sends this file into the page: the overlay reaches the browser through the
    // seam's polyfill-free part (extension/shared/native.ts) and computes with engine kernels only
    const overlay = readFileSync('dist/extension/overlay/index.js', 'utf8');
    const shared = readdirSync('dist/assets').map((f) => readFileSync(`dist/assets/${f}`, 'utf8'));
    // each marker is one the build does carry elsewhere, so the check can tell
    for (const marker of ['This script should only be loaded in a browser extension', 'Unexpected type of argument in function']) {
      expect(shared.some((text) => text.includes(marker))).toBe(true);
      expect(overlay.includes(marker)).toBe(false);
    }
  });

  it('popup shows the cautions and the version the background reports', async () => {
    const page = await app.context.newPage();
    await page.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html`);
    await expect.poll(() => page.getByTestId('version').textContent()).toContain(pkg.version);
    const text = await page.locator('body').innerText();
    expect(text).toContain('Never operate this tool, or film, while driving.');
    expect(text).toContain('not evidence of an incident');
    await page.close();
  });
});

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
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

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { transformSync } from 'esbuild';
import { chromium, type Browser, type Page } from 'playwright-core';
import { CHROMIUM_ARGS, chromiumPath } from './harness';

/*
 * The popup's one download helper (extension/popup/download.ts) in Chromium itself: a click on its
 * link starts a download (HTML Living Standard, "Downloading resources") with the name given and
 * the bytes given, and the object URL still answers after the click has returned, because it is
 * revoked only later. The helper runs as plain script in a blank page; no build is needed.
 */
let browser: Browser;
let page: Page;
beforeAll(async () => {
  browser = await chromium.launch({ executablePath: chromiumPath(), headless: true, args: CHROMIUM_ARGS });
  page = await browser.newPage({ acceptDownloads: true });
  await page.setContent('<!doctype html><title>invented</title><body></body>');
  const js = transformSync(readFileSync('extension/popup/download.ts', 'utf8'), { loader: 'ts', format: 'iife', globalName: 'dl' }).code;
  await page.addScriptTag({ content: `${js}; window.dl = dl;` });
});
afterAll(async () => {
  await browser?.close();
});

describe('saveFile and saveText', () => {
  it('download the bytes under the name given, and leave no link behind', async () => {
    const [download] = await Promise.all([
      page.waitForEvent('download'),
      page.evaluate(() => (window as unknown as { dl: typeof import('../../extension/popup/download') }).dl.saveText('a,b\n1,"é"\n', 'invented-table.csv')),
    ]);
    expect(download.suggestedFilename()).toBe('invented-table.csv');
    const path = await download.path();
    expect(readFileSync(path!, 'utf8')).toBe('a,b\n1,"é"\n');
    expect(await page.locator('a').count()).toBe(0);
  });

  it('keep the object URL alive after the click (revoked later, not at once)', async () => {
    const stillThere = await page.evaluate(async () => {
      const made: string[] = [];
      const create = URL.createObjectURL;
      URL.createObjectURL = (b: Blob | MediaSource) => {
        const u = create(b);
        made.push(u);
        return u;
      };
      (window as unknown as { dl: typeof import('../../extension/popup/download') }).dl.saveFile(new Blob(['invented bytes']), 'invented.bin');
      URL.createObjectURL = create;
      return (await fetch(made[0]!)).text();
    });
    expect(stillThere).toBe('invented bytes');
  });
});

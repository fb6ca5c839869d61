import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdirSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { E2E_DIST, injectOverlay, launchWithExtension, overlayReady, seek, sendAsPopup, tabIdFor, videoReady, type Loaded } from './harness';
import { ovl } from '../../extension/tools/overlay-world';
import { startServer, type TestServer } from '../../extension/tools/static-server';
import { demoAssumptions, markObjectAndLandmark } from '../../extension/tools/demo-flow';
import { seedCases, writeCases } from './log-seed';

/*
 * The README's walkthrough pictures, taken from the demo page and its invented clip as a user would
 * go through it: call the overlay up, mark, read the answer in the popup (light and dark). With
 * SCREENSHOTS=1 (`npm run screenshots`) they are written to test/e2e/screenshots/, the files the
 * README shows; otherwise to a temporary folder, so a test run leaves the tree alone. Either way
 * each picture is checked to be a real PNG of the size asked for.
 */
const OUT = process.env.SCREENSHOTS === '1' ? 'test/e2e/screenshots' : mkdtempSync(join(tmpdir(), 'clip-caliper-shots-'));
const truth = JSON.parse(readFileSync('test/fixtures/clips/pass-tracked.truth.json', 'utf8'));

let server: TestServer;
let fixtures: TestServer;
const apps: Loaded[] = [];
beforeAll(async () => {
  mkdirSync(OUT, { recursive: true });
  server = await startServer('extension/demo');
  fixtures = await startServer();
});
afterAll(async () => {
  for (const a of apps) await a.close();
  await server?.close();
  await fixtures?.close();
});

/** PNG width and height from the IHDR chunk (PNG specification, ISO/IEC 15948, 11.2.2). */
function pngSize(file: string): { w: number; h: number } {
  const b = readFileSync(file);
  expect([...b.subarray(0, 8)]).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
  expect(b.subarray(12, 16).toString('latin1')).toBe('IHDR');
  return { w: b.readUInt32BE(16), h: b.readUInt32BE(20) };
}

async function shoot(page: Page, name: string, fullPage = false): Promise<void> {
  const file = join(OUT, `${name}.png`);
  await page.screenshot({ path: file, fullPage, animations: 'disabled' });
  const { w, h } = pngSize(file);
  const viewport = page.viewportSize()!;
  expect(w).toBe(viewport.width);
  expect(h).toBeGreaterThanOrEqual(Math.min(viewport.height, 200));
}

async function markedDemo(app: Loaded): Promise<Page> {
  const page = await app.context.newPage();
  await page.setViewportSize({ width: 1000, height: 800 });
  await page.goto(server.url('/index.html'));
  await videoReady(page);
  const frame = truth.frames[Math.floor(truth.frames.length / 2)];
  await seek(page, frame.t);
  await injectOverlay(app, page.url());
  await overlayReady(page);
  await markObjectAndLandmark(page, frame.object, frame.landmarks.find((l: { id: string }) => l.id === 'mast'));
  await overlayReady(page, 2);
  return page;
}

describe('walkthrough pictures from the demo clip', () => {
  for (const scheme of ['light', 'dark'] as const) {
    it(`the overlay over the demo clip and the popup's answer, ${scheme}`, async () => {
      const app = await launchWithExtension(E2E_DIST, { colorScheme: scheme });
      apps.push(app);
      const page = await markedDemo(app);
      if (scheme === 'light') {
        // the README's picture holds the whole panel (at 560 px high it cut the readout off)
        const panel = (await ovl(page).box('.panel'))!;
        expect(panel.y + panel.height).toBeLessThanOrEqual(page.viewportSize()!.height);
        await shoot(page, 'overlay-marked');
      }
      // the assumptions the demo's guide suggests for its invented scene
      const mast = truth.landmarks.find((l: { id: string }) => l.id === 'mast').sizeM;
      const cases = (await sendAsPopup(app, 'cases/forPage', { pageUrl: page.url().split('#')[0] })) as { cases: { id: string }[] };
      await sendAsPopup(app, 'case/assume', { caseId: cases.cases[0]!.id, assumptions: demoAssumptions(mast) });
      const view = await app.context.newPage();
      await view.setViewportSize({ width: 520, height: 900 });
      await view.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html?tab=${await tabIdFor(app, page.url())}`);
      await expect.poll(() => view.getByTestId('implied-speed').count()).toBe(1);
      await shoot(view, `popup-${scheme}`);
      if (scheme === 'light') {
        // the figures themselves, below the assumptions: each frame, the verdict
        const results = view.getByTestId('results');
        await results.scrollIntoViewIfNeeded();
        const figures = join(OUT, 'popup-results.png');
        await results.screenshot({ path: figures });
        expect(pngSize(figures).w).toBe(Math.round((await results.boundingBox())!.width));
        // the plan view alone: one frame with its landmark, drawn abeam
        const plan = view.locator('figure:has([data-testid=plan-view])');
        await plan.scrollIntoViewIfNeeded();
        const file = join(OUT, 'popup-plan-view.png');
        await plan.screenshot({ path: file });
        const box = (await plan.boundingBox())!;
        expect(pngSize(file).w).toBe(Math.round(box.width));
      }
      // the case log with the demo's case among invented others
      const log = await app.context.newPage();
      await log.setViewportSize({ width: 1000, height: 700 });
      await log.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html`);
      await writeCases(log, seedCases(40));
      await log.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html?view=log`);
      await expect.poll(() => log.getByTestId('log-row').count()).toBeGreaterThan(5);
      await expect.poll(() => log.getByTestId('headline').first().textContent()).toMatch(/5[-–]95 %|not enough marks/);
      await shoot(log, `log-${scheme}`);
      await log.close();
      if (scheme === 'light') {
        // 200 % zoom in a popup at its largest (800 device pixels wide) leaves 400 CSS pixels:
        // nothing may need sideways scrolling there
        await view.setViewportSize({ width: 400, height: 700 });
        await view.evaluate('window.scrollTo(0, 0)');
        await shoot(view, 'popup-zoom-200');
        const overflow = (await view.evaluate('document.documentElement.scrollWidth - document.documentElement.clientWidth')) as number;
        expect(overflow).toBeLessThanOrEqual(0);
      }
      await view.close();
      await page.close();
    });
  }
});

describe('the overlay on two fixture pages, light and dark', () => {
  for (const scheme of ['light', 'dark'] as const) {
    it(`a plain video and a letterboxed one (object-fit: contain), ${scheme}`, async () => {
      const app = await launchWithExtension(E2E_DIST, { colorScheme: scheme });
      apps.push(app);
      for (const [name, path, size] of [
        ['plain', '/plain.html', { width: 700, height: 680 }],
        ['contain', '/contain.html', { width: 840, height: 600 }],
      ] as const) {
        const page = await app.context.newPage();
        await page.setViewportSize(size);
        await page.goto(fixtures.url(path));
        await videoReady(page);
        await seek(page, truth.frames[1].t);
        await injectOverlay(app, page.url());
        await overlayReady(page);
        const box = (await page.locator('video').boundingBox())!;
        await ovl(page).focus('.surface');
        await page.keyboard.press('1');
        // the object's ends on a page whose picture fills the box; a span in the middle otherwise
        const f = truth.frames[1].object;
        const sx = box.width / 640;
        const sy = box.height / 360;
        const k = Math.min(sx, sy);
        const ox = (box.width - 640 * k) / 2;
        const oy = (box.height - 360 * k) / 2;
        await page.mouse.move(box.x + ox + f.x1 * k, box.y + oy + f.y1 * k);
        await page.mouse.down();
        await page.mouse.move(box.x + ox + f.x2 * k, box.y + oy + f.y2 * k, { steps: 5 });
        await page.mouse.up();
        await overlayReady(page, 1);
        // the whole panel is in the picture
        const panel = (await ovl(page).box('.panel'))!;
        expect(panel.y + panel.height).toBeLessThanOrEqual(size.height);
        expect(panel.x + panel.width).toBeLessThanOrEqual(size.width);
        await shoot(page, `overlay-${name}-${scheme}`);
        await page.close();
      }
    });
  }
});

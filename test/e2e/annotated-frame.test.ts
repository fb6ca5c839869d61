import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import type { Page } from 'playwright-core';
import { E2E_DIST, injectOverlay, launchWithExtension, overlayReady, seek, storedCases, tabIdFor, videoReady, type Loaded } from './harness';
import { startServer, type TestServer } from '../../extension/tools/static-server';
import { ovl } from '../../extension/tools/overlay-world';

/*
 * The annotated frame (issue 15 point 7) in Chromium with the e2e build: the object of the invented
 * pass-tracked clip marked by hand through the overlay on one frame, the popup's "Save annotated
 * frame" clicked, the PNG that downloads decoded by the browser's own decoder (createImageBitmap).
 * Held against: the video's size (the clip's truth file), the stored mark's own coordinates (each end
 * drawn in the overlay's object colour, #e8590c, and the sky beside it not), and the band at the
 * bottom carrying text (white on a band of 72 % black: nothing under it is brighter than 72 of 255).
 */
interface TruthFrame {
  t: number;
  index: number;
  object: { x1: number; y1: number; x2: number; y2: number };
}
const truth = JSON.parse(readFileSync('test/fixtures/clips/pass-tracked.truth.json', 'utf8')) as { video: { width: number; height: number }; frames: TruthFrame[] };
type StoredMark = { id: string; kind: string; t: number; points: { x: number; y: number }[] };
type StoredCase = { id: string; updatedAt: number; video: { pageUrl: string }; marks: StoredMark[] };

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

async function caseOf(pageUrl: string): Promise<StoredCase> {
  const all = Object.values(await storedCases(app)) as StoredCase[];
  const c = all.find((x) => x.video.pageUrl === pageUrl);
  if (!c) throw new Error(`no case for ${pageUrl}`);
  return c;
}

/** Marks the object's span by hand on the frame shown: the span tool, a drag from end to end (snap on). */
async function markObject(page: Page, f: TruthFrame): Promise<void> {
  const box = (await page.locator('video').boundingBox())!;
  await ovl(page).focus('.surface');
  await page.keyboard.press('1');
  await page.mouse.move(box.x + f.object.x1, box.y + f.object.y1);
  await page.mouse.down();
  await page.mouse.move(box.x + (f.object.x1 + f.object.x2) / 2, box.y + f.object.y1, { steps: 4 });
  await page.mouse.move(box.x + f.object.x2, box.y + f.object.y2, { steps: 4 });
  await page.mouse.up();
}

interface Decoded {
  width: number;
  height: number;
  /** RGBA at each point asked for. */
  at: number[][];
  /** Pixels brighter than 200 in every channel, in the bottom rows asked for. */
  bright: number;
}

/** The PNG decoded by the browser (createImageBitmap), with the pixels the test asks about. */
async function decode(page: Page, png: Buffer, points: { x: number; y: number }[], bottomRows: number): Promise<Decoded> {
  return page.evaluate(
    async ({ b64, points, bottomRows }) => {
      const bin = atob(b64);
      const bytes = Uint8Array.from(bin, (ch) => ch.charCodeAt(0));
      const bmp = await createImageBitmap(new Blob([bytes], { type: 'image/png' }));
      const c = new OffscreenCanvas(bmp.width, bmp.height);
      const ctx = c.getContext('2d')!;
      ctx.drawImage(bmp, 0, 0);
      const d = ctx.getImageData(0, 0, bmp.width, bmp.height).data;
      const px = (x: number, y: number) => Array.from(d.subarray((y * bmp.width + x) * 4, (y * bmp.width + x) * 4 + 4));
      let bright = 0;
      for (let y = bmp.height - bottomRows; y < bmp.height; y++) for (let x = 0; x < bmp.width; x++) if (px(x, y).slice(0, 3).every((v) => v > 200)) bright++;
      return { width: bmp.width, height: bmp.height, at: points.map((p) => px(Math.floor(p.x), Math.floor(p.y))), bright };
    },
    { b64: png.toString('base64'), points, bottomRows },
  );
}

// the overlay's object colour (extension/overlay/drawing.ts), within what a PNG round trip and blending may move it
const OBJECT = [0xe8, 0x59, 0x0c];
const isObjectColour = (rgba: number[]) => rgba.slice(0, 3).every((v, i) => Math.abs(v - OBJECT[i]!) <= 12);

/** Marks the object on the page, clicks the popup's button (the measured tab in front, as under a real popup) and decodes what downloads. */
async function saveFrom(path: string): Promise<{ c: StoredCase; name: string; status: string | null; d: Decoded }> {
  const page = await app.context.newPage();
  await page.setViewportSize({ width: 1100, height: 800 });
  await page.goto(server.url(path));
  await videoReady(page);
  await injectOverlay(app, page.url());
  await overlayReady(page);
  const f = truth.frames[2]!; // frame 38, 1.54 s
  await seek(page, f.t);
  await markObject(page, f);
  await expect.poll(async () => (await caseOf(page.url())).marks.length).toBe(1);
  const c = await caseOf(page.url());
  const [a, b] = c.marks[0]!.points as [{ x: number; y: number }, { x: number; y: number }];

  const tabId = await tabIdFor(app, page.url());
  const popup = await app.context.newPage();
  await popup.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html?tab=${tabId}`);
  const button = popup.getByTestId('save-frame');
  await button.waitFor({ timeout: 60_000 });
  // the toolbar popup sits over the measured tab, which stays the one shown (the tab's picture needs it)
  await page.bringToFront();
  const [download] = await Promise.all([popup.waitForEvent('download', { timeout: 30_000 }), button.click()]);
  await expect.poll(() => popup.getByTestId('frame-status').textContent()).toMatch(/^Saved /);
  const png = readFileSync((await download.path())!);
  if (process.env.ANNOTATED_SHOT) writeFileSync(`${process.env.ANNOTATED_SHOT}-${path.replace(/\W+/g, '-')}.png`, png);
  // 12 px above the span's middle: the clip's sky, not a mark (the band and the arrow are elsewhere)
  const beside = { x: (a.x + b.x) / 2, y: (a.y + b.y) / 2 - 12 };
  const d = await decode(popup, png, [a, b, beside], 20);
  const status = await popup.getByTestId('frame-status').textContent();
  await popup.close();
  await page.close();
  return { c, name: download.suggestedFilename(), status, d };
}

describe('the annotated frame', () => {
  it('saves the paused frame at the video’s size, named as the case file, with the marked ends in the mark colour and text in the band', async () => {
    const { c, name, status, d } = await saveFrom('/plain.html?annotated');
    const f = truth.frames[2]!;
    const [a] = c.marks[0]!.points as [{ x: number; y: number }];
    // the snapped end lies on the object's, as a hand mark does (the follow test's 1 px)
    expect(Math.hypot(a.x - f.object.x1, a.y - f.object.y1)).toBeLessThan(1);
    const day = new Date(c.updatedAt).toISOString().slice(0, 10);
    expect(name).toBe(`clip-caliper-Invented-clip-plain-${day}-${c.id.slice(0, 8)}.png`);
    expect(status).toBe(`Saved ${name}. Pixels: the video’s own.`);
    expect([d.width, d.height]).toEqual([truth.video.width, truth.video.height]);
    expect(isObjectColour(d.at[0]!), `end a: ${d.at[0]}`).toBe(true);
    expect(isObjectColour(d.at[1]!), `end b: ${d.at[1]}`).toBe(true);
    expect(isObjectColour(d.at[2]!), `beside: ${d.at[2]}`).toBe(false);
    // the bottom 20 rows hold the cautions' last line: white text, a few hundred pixels of it at 10 px
    expect(d.bright).toBeGreaterThan(100);
  }, 120_000);

  it('takes the tab’s picture for a video from another site, and says so in the status (and the band)', async () => {
    const { c, name, status, d } = await saveFrom('/tainted.html?annotated');
    // the title is cut at 40 characters as the case export cuts it (a dash can end the cut)
    const day = new Date(c.updatedAt).toISOString().slice(0, 10);
    expect(name).toBe(`clip-caliper-Invented-clip-video-from-another-origin--${day}-${c.id.slice(0, 8)}.png`);
    expect(status).toBe(`Saved ${name}. Pixels: the tab’s picture (the video is from another site).`);
    expect([d.width, d.height]).toEqual([truth.video.width, truth.video.height]);
    expect(isObjectColour(d.at[0]!), `end a: ${d.at[0]}`).toBe(true);
    expect(isObjectColour(d.at[1]!), `end b: ${d.at[1]}`).toBe(true);
    expect(isObjectColour(d.at[2]!), `beside: ${d.at[2]}`).toBe(false);
    expect(d.bright).toBeGreaterThan(100);
  }, 120_000);
});

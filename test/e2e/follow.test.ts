import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import type { Page } from 'playwright-core';
import { E2E_DIST, injectOverlay, launchWithExtension, overlayReady, seek, storedCases, tabIdFor, videoReady, type Loaded } from './harness';
import { startServer, type TestServer } from '../../extension/tools/static-server';
import { ovl } from '../../extension/tools/overlay-world';

/*
 * Mark once, follow every frame (issue 15 point 1) in Chromium with the e2e build: the object's ends
 * marked by hand through the overlay (snap on) on one frame of the invented pass-tracked clip, the
 * follow page run over two seconds of it, the followed frames accepted into the case. Held against
 * the clip's truth file (test/fixtures/clips): every truth frame in the stretch has a followed mark
 * whose ends lie within 1 px of the exact ends (the allowance of fixture-clips.test.ts for decoded
 * frames), at the frame's own time.
 */
interface TruthFrame {
  t: number;
  index: number;
  object: { x1: number; y1: number; x2: number; y2: number };
}
const truth = JSON.parse(readFileSync('test/fixtures/clips/pass-tracked.truth.json', 'utf8')) as { frames: TruthFrame[] };
type StoredMark = { id: string; kind: string; t: number; points: { x: number; y: number }[]; edgeSigmaPx: number; followed?: { from: string; run: string; confidence: number } };

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

async function caseOf(pageUrl: string): Promise<{ id: string; marks: StoredMark[] }> {
  const all = Object.values(await storedCases(app)) as { id: string; video: { pageUrl: string }; marks: StoredMark[] }[];
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

describe('following the object from one hand mark', () => {
  it('follows two seconds of the clip; accepted, every truth frame there has a followed mark within 1 px of the truth', async () => {
    const page = await app.context.newPage();
    await page.setViewportSize({ width: 1100, height: 800 });
    await page.goto(server.url('/plain.html?follow'));
    await videoReady(page);
    await injectOverlay(app, page.url());
    await overlayReady(page);
    const seed = truth.frames[2]!; // frame 38, 1.54 s
    await seek(page, seed.t);
    await markObject(page, seed);
    await expect.poll(async () => (await caseOf(page.url())).marks.length).toBe(1);
    const hand = (await caseOf(page.url())).marks[0]!;
    const { id: caseId } = await caseOf(page.url());

    const tabId = await tabIdFor(app, page.url());
    const view = await app.context.newPage();
    // the page must draw the run without errors: a strip drawn from a run in progress once logged an
    // error per bar per frame (NaN heights), which held the page's thread for 0.3 s at a time
    const viewErrors: string[] = [];
    view.on('console', (m) => m.type() === 'error' && viewErrors.push(m.text()));
    view.on('pageerror', (e) => viewErrors.push(e.message));
    await view.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html?view=follow&tab=${tabId}&frame=0&case=${caseId}&mark=${hand.id}`);
    await view.getByTestId('follow-from').fill('0.5');
    await view.getByTestId('follow-to').fill('2.5');
    await view.getByTestId('follow-fps').fill('25');
    await view.getByTestId('follow-start').click();
    await expect.poll(() => view.getByTestId('follow-counts').textContent().catch(() => null), { timeout: 60_000 }).toMatch(/^\d+ frames followed, \d+ lost\.$/);
    const counts = /^(\d+) frames followed, (\d+) lost\.$/.exec((await view.getByTestId('follow-counts').textContent())!)!;
    // 1.04 s before the seed holds 26 steps of 0.04 s, 0.96 s after it 24: 51 frames, the seed one of them
    expect(Number(counts[1]) + Number(counts[2])).toBe(50);
    expect(Number(counts[2])).toBe(0);
    expect(viewErrors).toEqual([]);
    if (process.env.FOLLOW_SHOT) await view.screenshot({ path: process.env.FOLLOW_SHOT, fullPage: true });
    await view.getByTestId('follow-accept').click();
    await expect.poll(() => view.getByTestId('follow-added').textContent().catch(() => null)).toMatch(/^Added 50 marks/);

    const marks = (await caseOf(page.url())).marks;
    const followed = marks.filter((m) => m.followed);
    expect(followed).toHaveLength(50);
    expect(followed.every((m) => m.followed!.from === hand.id && m.kind === 'object-span')).toBe(true);
    // each at a frame of its own: the seed's time plus a whole number of 0.04 s steps
    for (const m of followed) expect(Math.abs((m.t - hand.t) / 0.04 - Math.round((m.t - hand.t) / 0.04))).toBeLessThan(1e-6);
    for (const f of truth.frames.filter((x) => x.t > 0.5 && x.t < 2.5 && x !== seed)) {
      const m = followed.find((x) => Math.abs(x.t - f.t) < 0.02);
      expect(m, `a followed mark at ${f.t} s`).toBeDefined();
      const [a, b] = m!.points as [{ x: number; y: number }, { x: number; y: number }];
      expect(Math.hypot(a.x - f.object.x1, a.y - f.object.y1)).toBeLessThan(1);
      expect(Math.hypot(b.x - f.object.x2, b.y - f.object.y2)).toBeLessThan(1);
    }
    await view.close();
    await page.close();
  }, 120_000);

  it('names a field out of range and follows nothing; Cancel stops a run and adds nothing; the popup offers the follow beside the case', async () => {
    const page = await app.context.newPage();
    await page.setViewportSize({ width: 1100, height: 800 });
    await page.goto(server.url('/plain.html?follow-refuse'));
    await videoReady(page);
    await injectOverlay(app, page.url());
    await overlayReady(page);
    const seed = truth.frames[1]!; // frame 22, 0.9 s
    await seek(page, seed.t);
    await markObject(page, seed);
    await expect.poll(async () => (await caseOf(page.url())).marks.length).toBe(1);
    const { id: caseId, marks } = await caseOf(page.url());
    const tabId = await tabIdFor(app, page.url());

    // the popup's own view of that tab links the follow page for this case and its hand mark
    const popup = await app.context.newPage();
    await popup.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html?tab=${tabId}`);
    const link = new URL((await popup.getByTestId('open-follow').getAttribute('href'))!);
    expect(Object.fromEntries(link.searchParams)).toEqual({ view: 'follow', tab: String(tabId), frame: '0', case: caseId, mark: marks[0]!.id });
    await popup.close();

    const view = await app.context.newPage();
    await view.goto(link.href);
    await view.getByTestId('follow-from').fill('1.5');
    await view.getByTestId('follow-start').click();
    await expect.poll(() => view.getByTestId('follow-field-error').textContent().catch(() => null)).toBe("From: expected 0 s to the marked frame's 0.900 s, got 1.5");
    await view.getByTestId('follow-from').fill('0');
    await view.getByTestId('follow-to').fill('3');
    await view.getByTestId('follow-start').click();
    await view.getByTestId('follow-cancel').click();
    await expect.poll(() => view.getByTestId('follow-stopped').textContent().catch(() => null)).toBe('Cancelled: nothing was added.');
    expect(await view.getByTestId('follow-accept').count()).toBe(0);
    expect((await caseOf(page.url())).marks).toHaveLength(1);
    await view.close();
    await page.close();
  }, 120_000);
});

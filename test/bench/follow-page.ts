import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, renameSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { Page } from 'playwright-core';
import { E2E_DIST, injectOverlay, launchWithExtension, seek, storedCases, tabIdFor, videoReady } from '../e2e/harness';
import { startServer } from '../../extension/tools/static-server';
import { ovl } from '../../extension/tools/overlay-world';
import { renderPicture, sceneNamed, truthEnds, type Scene } from '../engine/follow-scenes';

/*
 * The whole follow page on the clip (issue 15 point 6): 10 s of 1280 x 720 at 30 fps, the
 * invented scene pass-tracked drawn at that size and rate by the fixture library and encoded once to
 * VP9 (cached in node_modules/.cache; needs ffmpeg on PATH, else the line says so and is skipped).
 * The object is marked by hand through the overlay (snap on) on the middle frame; the follow page
 * then follows the whole clip: the page seeks, the frame server reads each window, the worker
 * follows. Printed: the wall time from Start to the counts, against the 10 s, and the
 * longest task on the follow page's thread meanwhile (W3C Long Tasks API; the issue asks for none
 * over 50 ms). One run (it takes tens of seconds); prints, asserts nothing.
 */
const FPS = 30;
const FRAMES = 300;
const TARGET_S = 10;
const CACHE = resolve('node_modules/.cache/clip-caliper-bench-follow');
const CLIP = 'follow-720p30.webm';

declare global {
  interface Window {
    benchLongTasks: number[];
  }
}

function scene(): Scene {
  const s = sceneNamed('pass-tracked', { width: 1280, height: 720 });
  return { ...s, video: { ...s.video, fps: FPS, frames: FRAMES } };
}

/** Draws and encodes the clip unless the cache has it: ffmpeg's fast VP9 settings, for a bench. */
async function ensureClip(sc: Scene): Promise<string | null> {
  const file = join(CACHE, CLIP);
  if (existsSync(file)) return file;
  if (spawnSync('ffmpeg', ['-hide_banner', '-encoders'], { encoding: 'utf8' }).status !== 0) return null;
  mkdirSync(CACHE, { recursive: true });
  const part = `${file}.part.webm`;
  const { width, height } = sc.video;
  const args = ['-hide_banner', '-loglevel', 'error', '-y', '-f', 'rawvideo', '-pix_fmt', 'rgb24', '-s', `${width}x${height}`, '-framerate', String(FPS), '-i', 'pipe:0'];
  args.push('-c:v', 'libvpx-vp9', '-b:v', '0', '-crf', '20', '-deadline', 'realtime', '-cpu-used', '8', '-g', '30', '-pix_fmt', 'yuv420p', part);
  const proc = spawn('ffmpeg', args, { stdio: ['pipe', 'inherit', 'inherit'] });
  const done = new Promise<number>((ok) => proc.on('close', (c) => ok(c ?? 1)));
  for (let i = 0; i < FRAMES; i++) {
    const pic = renderPicture(sc, i);
    const bytes = Buffer.alloc(pic.rgb.length);
    for (let k = 0; k < pic.rgb.length; k++) bytes[k] = Math.max(0, Math.min(255, Math.round(pic.rgb[k]!)));
    if (!proc.stdin.write(bytes)) await new Promise((ok) => proc.stdin.once('drain', ok));
  }
  proc.stdin.end();
  if ((await done) !== 0) throw new Error('ffmpeg failed to encode the bench clip');
  renameSync(part, file);
  return file;
}

async function markObject(page: Page, e: { x1: number; y1: number; x2: number; y2: number }): Promise<void> {
  const box = (await page.locator('video').boundingBox())!;
  await ovl(page).focus('.surface');
  await page.keyboard.press('1');
  await page.mouse.move(box.x + e.x1, box.y + e.y1);
  await page.mouse.down();
  await page.mouse.move(box.x + (e.x1 + e.x2) / 2, box.y + (e.y1 + e.y2) / 2, { steps: 4 });
  await page.mouse.move(box.x + e.x2, box.y + e.y2, { steps: 4 });
  await page.mouse.up();
}

export async function followPageBench(): Promise<void> {
  const sc = scene();
  const clip = await ensureClip(sc);
  if (!clip) {
    console.log('follow page, 1280 x 720, 10 s at 30 fps: skipped (ffmpeg with libvpx-vp9 is not on PATH to draw the clip)');
    return;
  }
  writeFileSync(join(CACHE, 'page.html'), `<!doctype html><meta charset="utf-8"><title>Invented clip: bench</title>
<style>body{margin:0;padding:10px;background:#222} video{display:block;width:1280px;height:720px}</style>
<video src="${CLIP}" preload="auto" muted playsinline></video>`);
  const server = await startServer(CACHE);
  const app = await launchWithExtension(E2E_DIST);
  try {
    const page = await app.context.newPage();
    await page.setViewportSize({ width: 1320, height: 800 });
    await page.goto(server.url('/page.html'));
    await videoReady(page);
    await injectOverlay(app, page.url());
    // the harness's overlayReady polls through vitest, which the bench does not run under
    for (let i = 0; i < 100 && !/\d+ marks? saved/.test((await ovl(page).text('[data-testid=readout]').catch(() => null)) ?? ''); i++) {
      await new Promise((r) => setTimeout(r, 100));
    }
    const mid = FRAMES >> 1;
    await seek(page, (mid + 0.5) / FPS);
    await markObject(page, truthEnds(sc, mid));
    let c: { id: string; video: { pageUrl: string }; marks: { id: string }[] } | undefined;
    for (let i = 0; i < 100 && !c?.marks.length; i++) {
      c = (Object.values(await storedCases(app)) as (typeof c & object)[]).find((x) => x.video.pageUrl === page.url());
      if (!c?.marks.length) await new Promise((r) => setTimeout(r, 100));
    }
    if (!c?.marks.length) throw new Error('the hand mark was not saved');
    const tabId = await tabIdFor(app, page.url());
    const view = await app.context.newPage();
    await view.addInitScript(() => {
      window.benchLongTasks = [];
      new PerformanceObserver((list) => {
        for (const e of list.getEntries()) window.benchLongTasks.push(e.duration);
      }).observe({ type: 'longtask', buffered: true });
    });
    await view.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html?view=follow&tab=${tabId}&frame=0&case=${c.id}&mark=${c.marks[0]!.id}`);
    // the page measures the clip's frame rate first (Start is held until then): not part of the follow's time
    await view.locator('[data-testid=follow-start]:enabled').waitFor({ timeout: 60_000 });
    await view.getByTestId('follow-from').fill('0');
    await view.getByTestId('follow-to').fill(String(FRAMES / FPS));
    await view.getByTestId('follow-fps').fill(String(FPS));
    const t0 = Date.now();
    await view.getByTestId('follow-start').click();
    let counts: string | null = null;
    while (!/^\d+ frames followed, \d+ lost\.$/.test(counts ?? '') && Date.now() - t0 < 600_000) {
      await new Promise((r) => setTimeout(r, 50));
      counts = await view.getByTestId('follow-counts').textContent({ timeout: 1000 }).catch(() => null);
    }
    const wallS = (Date.now() - t0) / 1000;
    const longest = Math.max(0, ...(await view.evaluate(() => window.benchLongTasks)));
    console.log(
      `follow page, 1280 x 720, 10 s at 30 fps (invented pass-tracked, marked once through the overlay): ${counts} in ${wallS.toFixed(1)} s ` +
        `(target <= ${TARGET_S} s: ${wallS <= TARGET_S ? 'within' : 'OVER'}); longest task on the page's thread ${longest.toFixed(0)} ms (target none over 50 ms: ${longest <= 50 ? 'within' : 'OVER'})`,
    );
  } finally {
    await app.close();
    await server.close();
  }
}

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { analyseCase } from '../../src/case/analysis';
import type { CaseRecord } from '../../src/case/schema';
import type { Estimate } from '../../src/engine/stats';
import { E2E_DIST, injectOverlay, launchWithExtension, overlayReady, seek, sendAsPopup, storedCases, tabIdFor, videoReady, type Loaded } from './harness';
import { startServer, type TestServer } from '../../extension/tools/static-server';
import { ovl } from '../../extension/tools/overlay-world';
import { loadTruth, MATRIX, pinnedLandmark, truthCase, type Ends, type Truth2 } from '../case/truth-cases';

/*
 * Issue 12's proof through the overlay: every scene of the truth matrix (invented, rendered with
 * exact truth by test/fixtures) played in Chromium and marked as a user would, with the overlay's
 * own tools and its snapping on: the object's length on each marked frame, the landmark it seems
 * pinned over, the horizon, the picture's edges where bars surround it, the road ahead for the fixed
 * camera. With the size and field of view known, every figure the truth can check is within 5 % and
 * the truth inside its 5-95 % interval; the decoy ends in a named warning in the popup.
 */

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

const RUN = { draws: 2000, seriesDraws: 800, seed: 5 };

/**
 * Every figure within 5 % of the truth; whether its interval holds the truth is tallied. A 5-95 %
 * interval misses the truth one time in ten when it is honest, so a marking by hand (unlike marks at
 * the true pixels, test/case/truth-matrix.test.ts) cannot hold it every time: the tally over the
 * whole matrix must reach 85 %, and every miss is printed.
 */
const tally = { hits: 0, n: 0, misses: [] as string[] };
function holds(e: Estimate | null | undefined, truth: number, what: string, tol = 0.05): void {
  expect(e, `${what}: no figure`).toBeTruthy();
  const rel = Math.abs(e!.median - truth) / Math.max(Math.abs(truth), 1e-9);
  expect(rel, `${what}: median ${e!.median} against the truth ${truth}`).toBeLessThanOrEqual(tol);
  tally.n++;
  if (e!.p05 <= truth && truth <= e!.p95) tally.hits++;
  else tally.misses.push(`${what}: ${e!.p05.toPrecision(5)}..${e!.p95.toPrecision(5)} against ${truth.toPrecision(5)}`);
}

/** Drags from one point to another on the video, in its intrinsic pixels (the page shows it 1:1). */
async function drag(page: Page, box: { x: number; y: number }, e: Ends): Promise<void> {
  await page.mouse.move(box.x + e.x1, box.y + e.y1);
  await page.mouse.down();
  await page.mouse.move(box.x + (e.x1 + e.x2) / 2, box.y + (e.y1 + e.y2) / 2, { steps: 3 });
  await page.mouse.move(box.x + e.x2, box.y + e.y2, { steps: 3 });
  await page.mouse.up();
}

/** A stretch of a line well inside the picture, from two points on it (the horizon truth runs edge to edge). */
function inset(e: Ends, k = 0.1): Ends {
  return { x1: e.x1 + k * (e.x2 - e.x1), y1: e.y1 + k * (e.y2 - e.y1), x2: e.x2 - k * (e.x2 - e.x1), y2: e.y2 - k * (e.y2 - e.y1) };
}

/** Marks a scene through the overlay as a user would, and returns the stored case. */
async function markScene(t: Truth2, tag = ''): Promise<{ page: Page; c: CaseRecord }> {
  const page = await app.context.newPage();
  await page.setViewportSize({ width: 1000, height: 700 });
  await page.goto(server.url(`/matrix.html?clip=${t.name}${tag}`));
  await videoReady(page);
  await seek(page, t.frames[0]!.t);
  await injectOverlay(app, page.url());
  await overlayReady(page);
  // a tab behind another draws no frames, and each pointer action would wait for one (DEVELOPERS.md)
  await page.bringToFront();
  const box = (await page.locator('video').boundingBox())!;
  const surface = { focus: () => ovl(page).focus('.surface') };
  const pinned = pinnedLandmark(t);
  let count = 0;
  const saved = async () => overlayReady(page, ++count);
  for (const f of t.frames) {
    await seek(page, f.t);
    await surface.focus();
    await page.keyboard.press('1');
    await page.keyboard.press('L');
    await drag(page, box, f.spans.length);
    await saved();
    const lm = pinned?.frames.includes(f.index) ? f.landmarks.find((x) => x.id === pinned.id) : undefined;
    if (lm) {
      // from its foot up to its top (the truth's end 1 is the foot)
      await page.keyboard.press('2');
      await drag(page, box, lm);
      await saved();
    }
    if (f.horizon && t.camera.mode === 'tracked') {
      await page.keyboard.press('6');
      await drag(page, box, inset(f.horizon));
      await saved();
    }
  }
  const first = t.frames[0]!;
  const fr = t.cameraFrame;
  const midY = (fr.top + fr.bottom) / 2;
  const midX = (fr.left + fr.right) / 2;
  if (fr.left > 0 || fr.right < t.video.width) {
    await page.keyboard.press('3');
    await drag(page, box, { x1: fr.left, y1: midY, x2: fr.right, y2: midY });
    await saved();
  }
  if (fr.top > 0 || fr.bottom < t.video.height) {
    await page.keyboard.press('7');
    await drag(page, box, { x1: midX, y1: fr.top, x2: midX, y2: fr.bottom });
    await saved();
  }
  if (t.camera.mode === 'fixed') {
    await seek(page, first.t);
    await surface.focus();
    await page.keyboard.press('6');
    await drag(page, box, inset(first.horizon!));
    await saved();
    const vp = t.frames.find((f) => f.roadVanishingPoint)!.roadVanishingPoint!;
    await page.keyboard.press('8');
    await page.mouse.click(box.x + vp.x, box.y + vp.y);
    await saved();
  }
  const c = Object.values(await storedCases(app)).find((x) => (x as CaseRecord).video.pageUrl === page.url()) as CaseRecord;
  // what a reviewer who knows the camera and the object would enter: the same as the unit proof's
  // (the overlay names no landmark, so the one marked takes the landmark size given for all)
  const assumptions = truthCase(t, { sigmaPx: 0.5 }).assumptions!;
  const size = t.landmarks.find((l) => l.id === pinned?.id)?.sizeM;
  if (size) assumptions.landmarkSizeM = { lo: size, hi: size };
  await sendAsPopup(app, 'case/assume', { caseId: c.id, assumptions });
  const withAssumptions = Object.values(await storedCases(app)).find((x) => (x as CaseRecord).id === c.id) as CaseRecord;
  return { page, c: withAssumptions };
}

describe('the truth matrix marked through the overlay, snapping on', () => {
  for (const name of MATRIX) {
    it(`${name}: every figure the truth can check within 5 %, its interval tallied`, async () => {
      const t = loadTruth(name);
      const { page, c } = await markScene(t);
      // every object span is a length, snapped to within a pixel of the truth's ends
      const spans = c.marks.filter((m) => m.kind === 'object-span');
      expect(spans.map((m) => m.dimension)).toEqual(t.frames.map(() => 'length'));
      const r = analyseCase(c, RUN);
      const s = r.series;
      expect(s, r.seriesMissing ?? '').not.toBeNull();
      const at = (what: string) => `${name}: ${what}`;
      holds(s!.closestApproach, t.pass.closestApproachSlantM, at('closest approach, slant'));
      holds(s!.closestHorizontal, t.pass.closestApproachHorizontalM, at('closest approach, horizontal'));
      holds(s!.relativeSpeed, t.pass.relativeSpeedMs, at('relative speed'));
      s!.lead.marks.forEach((m, k) => {
        holds(m.range, t.frames[k]!.objectRange, at(`slant range at ${m.t.toFixed(2)} s`));
        holds(m.horizontalRange, t.frames[k]!.objectHorizontalRange, at(`horizontal range at ${m.t.toFixed(2)} s`));
      });
      const reading = r.readings.find((x) => x.pass?.direction === t.direction);
      expect(reading, r.readings.map((x) => x.basis).join(', ')).toBeTruthy();
      holds(reading!.speed, t.groundTrack.speedMs, at('object ground speed'));
      const ref = t.frames[Math.floor((t.frames.length - 1) / 2)]!;
      holds(reading!.pass!.fixedPoint!.fromRoad, ref.fixedPoint.distanceFromRoadM, at('motionless point from the road'));
      holds(reading!.pass!.fixedPoint!.fraction, ref.fixedPoint.fraction, at('motionless point along the sight line'));
      const pinned = pinnedLandmark(t);
      for (const l of s!.lead.landmarks) {
        if (t.landmarks.find((d) => d.id === pinned?.id)?.decoy) continue;
        const truth = t.frames.find((f) => Math.abs(f.t - l.t) < 1e-3)!.landmarks.find((x) => x.id === pinned!.id)!;
        holds(l.range, truth.baseHorizontalRange, at(`landmark distance at ${l.t.toFixed(2)} s`));
        holds(l.impliedSpeed, t.object.speed, at(`implied speed at ${l.t.toFixed(2)} s`));
      }
      if (t.camera.mode === 'fixed') holds(r.track?.speed, t.groundTrack.speedMs, at('ground track speed'));
      if (pinned && !t.landmarks.some((d) => d.decoy)) expect(r.setAside, 'no landmark set aside').toHaveLength(0);
      if (t.fixedPoint.regime === 'wanders' && t.camera.mode === 'tracked') {
        // a track 20 deg off parallel: the popup says how far the motionless point moves (issue 12, point 6)
        const view = await app.context.newPage();
        await view.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html?tab=${await tabIdFor(app, page.url())}`);
        await expect.poll(() => view.getByTestId('wander').count(), { timeout: 20_000 }).toBeGreaterThan(0);
        expect(await view.getByTestId('wander').first().textContent()).toContain('not parallel');
        await view.close();
      }
      await page.close();
    }, 240_000);
  }

  it('over the whole matrix, the intervals hold the truth at least 85 % of the time (every miss printed)', () => {
    expect(tally.n).toBeGreaterThan(150);
    console.log(`intervals holding the truth: ${tally.hits} of ${tally.n} (${((100 * tally.hits) / tally.n).toFixed(1)} %)${tally.misses.length ? `; missed:\n${tally.misses.join('\n')}` : ''}`);
    expect(tally.hits / tally.n).toBeGreaterThanOrEqual(0.85);
  });

  it('same-faster-decoy: the popup names the decoy set aside and reads the point behind the observer', async () => {
    const t = loadTruth('same-faster-decoy');
    const { page } = await markScene(t, '&popup');
    const view = await app.context.newPage();
    await view.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html?tab=${await tabIdFor(app, page.url())}`);
    await expect.poll(() => view.getByTestId('warning-landmark').count(), { timeout: 20_000 }).toBeGreaterThan(0);
    expect(await view.getByTestId('warning-landmark').first().textContent()).toContain('cannot be the motionless point');
    expect(await view.getByTestId('set-aside').count()).toBe(1);
    await expect.poll(() => view.getByTestId('fit-reading').getAttribute('data-regime')).toBe('behind');
    expect(await view.getByTestId('fit-reading').textContent()).toContain('behind the observer');
    const verdicts = await view.getByTestId('verdict').allTextContents();
    expect(verdicts.length).toBe(1);
    expect(verdicts[0]).toContain('faster');
    await view.close();
    await page.close();
  }, 240_000);
});

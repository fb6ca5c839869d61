import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { execFile } from 'node:child_process';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import type { Page } from 'playwright-core';
import { E2E_DIST, injectOverlay, launchWithExtension, overlayReady, seek, sendAsPopup, storedCases, tabIdFor, videoReady, type Loaded } from './harness';
import { ovl } from '../../extension/tools/overlay-world';
import { startServer, type TestServer } from '../../extension/tools/static-server';

/*
 * The popup's view of a case, opened as a full tab for the tab being measured (`?tab=ID`): the
 * assumptions typed with units, and the figures checked against the fixture clip's truth
 * (test/fixtures, an invented scene).
 */
const truth = JSON.parse(readFileSync('test/fixtures/clips/pass-tracked.truth.json', 'utf8'));

/** Opens the summary's preview, which is built only once opened (case-view.tsx Share). */
async function openPreview(view: import('playwright-core').Page): Promise<void> {
  await view.locator('details:has([data-testid=summary-preview]) > summary').click();
  await expect.poll(async () => ((await view.getByTestId('summary-preview').textContent()) ?? '').length).toBeGreaterThan(0);
}

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

async function setUnits(system: 'metric' | 'imperial' | 'aviation'): Promise<void> {
  const options = await app.context.newPage();
  await options.goto(`chrome-extension://${app.extensionId}/extension/options/index.html`);
  await options.getByTestId('system').selectOption(system);
  await expect.poll(() => options.getByRole('status').textContent()).toContain('Saved');
  await options.close();
}

/** Opens a page with the overlay up over its video, paused at t when given. */
async function overlaid(path: string, t?: number): Promise<{ page: Page; box: { x: number; y: number } }> {
  const page = await app.context.newPage();
  await page.setViewportSize({ width: 1000, height: 700 });
  await page.goto(server.url(path));
  await videoReady(page);
  if (t !== undefined) await seek(page, t);
  await injectOverlay(app, page.url());
  await overlayReady(page);
  return { page, box: (await page.locator('video').boundingBox())! };
}

/** The popup's view of the tab showing `page`, opened as a full tab. */
async function popupFor(page: Page): Promise<Page> {
  const view = await app.context.newPage();
  await view.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html?tab=${await tabIdFor(app, page.url())}`);
  return view;
}

/** Marks the object's ends at each frame's truth pixels with the overlay's first tool. */
async function markObjectAtEachFrame(page: Page, box: { x: number; y: number }, frames: { t: number; object: { x1: number; y1: number; x2: number; y2: number } }[]) {
  for (const [i, f] of frames.entries()) {
    await seek(page, f.t);
    await ovl(page).focus('.surface');
    await page.keyboard.press('1');
    await drag(page, box, f.object);
    await overlayReady(page, i + 1);
  }
}

async function drag(page: Page, box: { x: number; y: number }, p: { x1: number; y1: number; x2: number; y2: number }) {
  await page.mouse.move(box.x + p.x1, box.y + p.y1);
  await page.mouse.down();
  await page.mouse.move(box.x + p.x2, box.y + p.y2, { steps: 5 });
  await page.mouse.up();
}

const numbers = (text: string) => {
  const m = /([-\d.]+) (\S+) \(([-\d.]+) to ([-\d.]+) \S+|([-\d.]+) (\S+) \(([-\d.]+)-([-\d.]+) \S+/.exec(text);
  if (!m) throw new Error(`no interval in ${text}`);
  const g = m[1] ? [m[1], m[2], m[3], m[4]] : [m[5], m[6], m[7], m[8]];
  return { median: Number(g[0]), unit: g[1]!, lo: Number(g[2]), hi: Number(g[3]) };
};

describe('calling the overlay up from the popup', () => {
  it("its Measure button calls the overlay up over the tab it is about, and the full-tab view stays open", async () => {
    const page = await app.context.newPage();
    await page.goto(server.url('/plain.html?measure-button'));
    await videoReady(page);
    const view = await popupFor(page);
    await view.getByTestId('measure').click();
    await overlayReady(page);
    expect(await ovl(page).count()).toBe(1);
    // the view in a full tab stays (it follows the marks) and brings the measured tab forward
    expect(view.isClosed()).toBe(false);
    await expect.poll(() => page.evaluate(() => document.visibilityState)).toBe('visible');
    expect(await view.getByRole('alert').count()).toBe(0);
    await view.close();
    await page.close();
  });

  it('says why when the tab cannot be measured: here it was closed after its view opened', async () => {
    const page = await app.context.newPage();
    await page.goto(server.url('/plain.html?measure-closed'));
    const view = await popupFor(page);
    const tabId = Number(new URL(view.url()).searchParams.get('tab'));
    await page.close();
    await view.getByTestId('measure').click();
    await expect.poll(() => view.getByRole('alert').textContent()).toMatch(new RegExp(`^Could not open the overlay on this page: .*${tabId}`));
    await view.close();
  });
});

describe('the popup view of a measured case', () => {
  it('shows the figures from the marks, follows typed assumptions, and keeps the last valid one on a bad entry', async () => {
    const f = truth.frames[1];
    const { page, box } = await overlaid('/plain.html?popup', f.t);
    await ovl(page).focus('.surface');
    await page.keyboard.press('1');
    await drag(page, box, f.object);
    await page.keyboard.press('2');
    await drag(page, box, f.landmarks.find((l: { id: string }) => l.id === 'mast'));
    await overlayReady(page, 2);

    const view = await popupFor(page);
    await expect.poll(() => view.getByTestId('timestamp').count()).toBe(1);
    expect(await view.getByTestId('case').textContent()).toContain('default assumptions');

    // what the reviewer knows: the camera's field of view to a degree, and the car's speed
    await view.getByTestId('field-hfovDeg').fill('39 to 41 deg');
    await view.getByTestId('field-hfovDeg').press('Enter');
    await view.getByTestId('field-observerSpeedMs').fill('90 km/h ± 4');
    await view.getByTestId('field-observerSpeedMs').press('Enter');
    await expect.poll(() => view.getByTestId('implied-speed').count()).toBe(1);

    const range = numbers((await view.getByTestId('range').textContent())!);
    const k = range.unit === 'km' ? 1000 : 1;
    expect(truth.frames[1].objectRange).toBeGreaterThanOrEqual(range.lo * k);
    expect(truth.frames[1].objectRange).toBeLessThanOrEqual(range.hi * k);
    const speed = numbers((await view.getByTestId('implied-speed').textContent())!);
    expect(speed.unit).toBe('km/h');
    // truth: -70 m/s = -252 km/h, the object flying the opposite way
    expect(-252).toBeGreaterThanOrEqual(speed.lo);
    expect(-252).toBeLessThanOrEqual(speed.hi);
    expect(await view.getByTestId('implied-speed').textContent()).toContain('opposite direction');
    expect(await view.getByTestId('verdict').textContent()).toContain('consistent with ordinary flight');

    // the summary to share: what the clipboard receives is the preview's text, cautions included
    // (read back from the test page: permissions cannot be granted to the extension's own origin,
    // and the browser has one clipboard)
    await app.context.grantPermissions(['clipboard-read', 'clipboard-write'], { origin: new URL(page.url()).origin });
    const readClipboard = async () => {
      await page.bringToFront();
      const text = await page.evaluate(() => navigator.clipboard.readText());
      await view.bringToFront();
      return text;
    };
    await view.getByTestId('copy-text').click();
    await expect.poll(() => view.getByTestId('copy-status').textContent()).toContain('copied as plain text');
    const clip = await readClipboard();
    await openPreview(view);
    expect(clip).toBe(await view.getByTestId('summary-preview').textContent());
    expect(clip).toContain('Never operate this tool, or film, while driving.');
    expect(clip).toContain('5-95 %');
    await view.getByTestId('copy-markdown').click();
    await expect.poll(() => view.getByTestId('copy-status').textContent()).toContain('as Markdown');
    expect(await readClipboard()).toMatch(/^# /);

    // the overlay follows the new assumptions at once
    await expect.poll(() => ovl(page).text('[data-testid=readout]')).toContain('field of view given');

    // a wrong entry is marked at its field, and the figures keep the last valid value
    const before = await view.getByTestId('range').textContent();
    await view.getByTestId('field-hfovDeg').fill('wide');
    await view.getByTestId('field-hfovDeg').press('Enter');
    await expect.poll(() => view.locator('#field-hfovDeg-error').textContent()).toContain('Camera field of view');
    expect(await view.getByTestId('field-hfovDeg').getAttribute('aria-invalid')).toBe('true');
    expect(await view.getByTestId('range').textContent()).toBe(before);
    await view.close();
    await page.close();
  });

  it('first use warns of nothing: a length marked against the default size takes the code letter’s length band (issue 12, point 11)', async () => {
    const { page, box } = await overlaid('/plain.html?first-use', truth.frames[0].t);
    const view = await popupFor(page);
    await page.bringToFront();
    await ovl(page).focus('.surface');
    await page.keyboard.press('1');
    await page.keyboard.press('L');
    await drag(page, box, truth.frames[0].object);
    await overlayReady(page, 1);
    await expect.poll(() => view.getByTestId('labels').textContent()).toContain('code letter C length, 26-45 m');
    expect(await view.getByTestId('dimension-mismatch').count()).toBe(0);
    expect(await ovl(page).count('[data-testid=dimension-mismatch]')).toBe(0);
    await view.close();
    await page.close();
  });

  it("a span marked as the object's length against a wingspan the user chose is flagged in the overlay and the popup until a size by length is chosen; called up again, the overlay then marks lengths", async () => {
    const { page, box } = await overlaid('/plain.html?marked-as-length', truth.frames[0].t);
    // the user chose a wingspan: code letter D (36 to less than 52 m, ICAO Annex 14 Vol I Table 1-1)
    // the overlay opens the case on call-up
    const id = await (async () => {
      for (let i = 0; i < 50; i++) {
        const c = Object.values(await storedCases(app)).find((x) => (x as { video: { pageUrl: string } }).video.pageUrl === page.url()) as { id: string } | undefined;
        if (c) return c.id;
        await page.waitForTimeout(100);
      }
      throw new Error(`no case for ${page.url()}`);
    })();
    await sendAsPopup(app, 'case/assume', {
      caseId: id,
      assumptions: { cameraLabel: 'Known camera', hfovDeg: { lo: 39, hi: 41 }, sizeLabel: 'code letter D wingspan, 36-52 m', objectSizeM: { lo: 36, hi: 52 }, sizeDimension: 'wingspan', aspectDeg: { lo: 90, hi: 90 }, landmarkSizeM: { lo: 8, hi: 30 } },
    });
    const view = await popupFor(page);
    await page.bringToFront();
    const live = { textContent: () => ovl(page).text('[data-testid=live]') };
    await ovl(page).focus('.surface');
    await page.keyboard.press('1');
    await page.keyboard.press('L'); // the span is the object's length; the case assumes a wingspan
    await expect.poll(() => live.textContent()).toContain('but the size assumed is a wingspan');
    await drag(page, box, truth.frames[0].object);
    await overlayReady(page, 1);
    const overlayWarning = { textContent: () => ovl(page).text('[data-testid=dimension-mismatch]'), count: () => ovl(page).count('[data-testid=dimension-mismatch]') };
    await expect.poll(() => overlayWarning.textContent()).toContain('Marked as its length, but the size assumed is a wingspan');
    await expect.poll(() => view.getByTestId('dimension-mismatch').textContent()).toContain("The object's span is marked as its length, but the size assumed is a wingspan");
    expect(await view.locator('body').innerText()).toContain('1 mark · video 640×360'); // one mark, not "1 marks"
    // the popup offers the classes by length: code letter C, 26-45 m (from memory, marked so in src/engine/size.ts)
    const sizes = view.getByTestId('field-size-class');
    await expect.poll(() => sizes.locator('option[value=letter-C]').textContent()).toContain('length 26-45 m');
    await sizes.selectOption('letter-C');
    await expect.poll(() => view.getByTestId('dimension-mismatch').count()).toBe(0);
    await expect.poll(() => overlayWarning.count()).toBe(0);
    const stored = Object.values(await storedCases(app)).find((c) => (c as { video: { pageUrl: string } }).video.pageUrl === page.url()) as { assumptions: { sizeDimension?: string; objectSizeM: { lo: number; hi: number } } };
    expect(stored.assumptions.sizeDimension).toBe('length');
    expect(stored.assumptions.objectSizeM).toEqual({ lo: 26, hi: 45 });
    // called up again on this case, the overlay starts on lengths: the size says so
    await page.reload();
    await videoReady(page);
    await seek(page, truth.frames[1].t);
    await injectOverlay(app, page.url());
    await overlayReady(page, 1);
    await expect.poll(() => ovl(page).attr('.dims button[aria-pressed=true]', 'data-dimension')).toBe('length');
    await ovl(page).focus('.surface');
    await page.keyboard.press('1');
    await drag(page, box, truth.frames[1].object);
    await overlayReady(page, 2);
    const marks = async () => (Object.values(await storedCases(app)).find((c) => (c as { video: { pageUrl: string } }).video.pageUrl === page.url()) as { marks: { dimension?: string }[] }).marks;
    await expect.poll(async () => (await marks()).map((m) => m.dimension)).toEqual(['length', 'length']);
    expect(await overlayWarning.count()).toBe(0);
    await page.close();
    await view.close();
  });

  it('settings: a new case starts from the chosen camera and observer speed, and figures follow the unit system', async () => {
    const options = await app.context.newPage();
    await options.goto(`chrome-extension://${app.extensionId}/extension/options/index.html`);
    await options.getByTestId('system').selectOption('aviation');
    await options.getByTestId('camera').selectOption('phone-main-landscape');
    await options.getByTestId('speed').fill('50 kn');
    await options.getByTestId('speed').press('Enter');
    await expect.poll(() => options.getByRole('status').textContent()).toContain('Saved');

    const { page, box } = await overlaid('/plain.html?settings');
    await ovl(page).focus('.surface');
    await page.keyboard.press('1');
    await drag(page, box, truth.frames[0].object);

    const view = await popupFor(page);
    await expect.poll(() => view.getByTestId('timestamp').count()).toBe(1);
    // 50 kn is 92.6 km/h: shown back in the field in km/h, the popup's unit for speeds typed
    expect(await view.getByTestId('field-observerSpeedMs').inputValue()).toBe('92.6 km/h');
    expect(await view.getByTestId('case').textContent()).toContain('no stabilisation'); // the chosen camera
    expect(await view.getByTestId('range').textContent()).toMatch(/ (ft|NM) /); // aviation: feet or nautical miles
    // the overlay's live readout follows the same setting
    expect(await ovl(page).text('[data-testid=range]')).toMatch(/ (ft|NM) \(/);
    await options.close();
    await view.close();
    await page.close();
  });

  it('draws the range over time once three timestamps are marked, with a point per timestamp and the fitted pass', async () => {
    const drift = JSON.parse(readFileSync('test/fixtures/clips/drift-fixed.truth.json', 'utf8'));
    const { page, box } = await overlaid('/drift.html?plot');
    await markObjectAtEachFrame(page, box, drift.frames);
    const view = await popupFor(page);
    await expect.poll(() => view.getByTestId('plot-point').count()).toBe(drift.frames.length);
    expect(await view.getByTestId('fit-curve').getAttribute('d')).toMatch(/^M[\d.]+,[\d.]+( L[\d.]+,[\d.]+){10,}$/);
    expect(await view.getByTestId('range-plot').getAttribute('aria-label')).toContain(`${drift.frames.length} timestamps`);

    // with the observer's speed, the plan view: a sight line per timestamp, all through the
    // motionless point (parallel tracks; the intercept theorem)
    await view.getByTestId('field-observerSpeedMs').fill('79.2 km/h ± 3.6');
    await view.getByTestId('field-observerSpeedMs').press('Enter');
    // the case may have started with the settings' speed: wait until the typed one is in force
    await expect.poll(() => view.getByTestId('field-observerSpeedMs').inputValue()).toBe('75.6 to 82.8 km/h');
    await expect.poll(() => view.getByTestId('sight-line').count()).toBe(drift.frames.length);
    // read the drawing in one go, so that a re-render between reads cannot mix two versions
    const drawn = (await view.evaluate(`(() => {
      const fp = document.querySelector('[data-testid=fixed-point]');
      const lines = [...document.querySelectorAll('[data-testid=sight-line]')].map((l) => ['data-x1', 'data-y1', 'data-x2', 'data-y2'].map((a) => Number(l.getAttribute(a))));
      return { fx: Number(fp.getAttribute('data-x')), fy: Number(fp.getAttribute('data-y')), lines };
    })()`)) as { fx: number; fy: number; lines: [number, number, number, number][] };
    expect(drawn.lines).toHaveLength(drift.frames.length);
    for (const [x1, y1, x2, y2] of drawn.lines) {
      const xAtF = x1 + ((drawn.fy - y1) / (y2 - y1)) * (x2 - x1);
      expect(Math.abs(xAtF - drawn.fx), JSON.stringify(drawn)).toBeLessThan(1e-6 * Math.max(1, Math.abs(drawn.fx)));
    }
    expect(await view.getByTestId('plan-view').getAttribute('aria-label')).toContain('between the road and the track');

    // the observation window, against the clip's length (3.2 s)
    expect(await view.getByTestId('window').textContent()).toMatch(/of abeam \(half the field of view\) for .*; the clip is 3\.2\d* s long/);

    // both pictures save as files: PNG (checked by its signature) and SVG
    for (const [id, name] of [['plan-png', 'plan-view.png'], ['range-png', 'range-over-time.png']] as const) {
      const [dl] = await Promise.all([view.waitForEvent('download'), view.getByTestId(id).click()]);
      expect(dl.suggestedFilename()).toBe(name);
      const bytes = readFileSync((await dl.path())!);
      expect([...bytes.subarray(0, 8)]).toEqual([137, 80, 78, 71, 13, 10, 26, 10]); // the PNG signature
    }
    const [svgDl] = await Promise.all([view.waitForEvent('download'), view.getByTestId('plan-svg').click()]);
    expect(readFileSync((await svgDl.path())!, 'utf8')).toMatch(/^<svg[^>]*xmlns="http:\/\/www.w3.org\/2000\/svg"/);
    await view.close();
    await page.close();
  });

  it('chosen assumptions: camera class, size class, direction, wind, and a fixed camera’s ground track from its marked horizon and road ahead (issue 12, point 10)', async () => {
    // fixed-large (test/fixtures/README.md, invented): a windscreen mount on a car at 20 m/s, a 70 m
    // jet flying the other way 15 deg off parallel at 75 m/s, the horizon and the road ahead in view
    const large = JSON.parse(readFileSync('test/fixtures/clips/fixed-large.truth.json', 'utf8'));
    await setUnits('metric');
    const { page, box } = await overlaid('/matrix.html?clip=fixed-large');
    const frames = large.frames.map((f: { t: number; spans: { length: { x1: number; y1: number; x2: number; y2: number } } }) => ({ t: f.t, object: f.spans.length }));
    for (const [i, f] of frames.entries()) {
      await seek(page, f.t);
      await ovl(page).focus('.surface');
      await page.keyboard.press('1');
      await page.keyboard.press('L');
      await drag(page, box, f.object);
      await overlayReady(page, i + 1);
    }
    // the horizon and the road ahead, on the last frame: the camera kept its aim, so they hold for all
    const last = large.frames[large.frames.length - 1];
    await page.keyboard.press('6');
    await drag(page, box, last.horizon);
    await overlayReady(page, frames.length + 1);
    await page.keyboard.press('8');
    await page.mouse.click(box.x + last.roadVanishingPoint.x, box.y + last.roadVanishingPoint.y);
    await overlayReady(page, frames.length + 2);
    const view = await popupFor(page);
    await expect.poll(() => view.getByTestId('series').count()).toBe(1);

    // a camera class sets the field of view from its derivation; a size class the size band
    await view.getByTestId('field-camera').selectOption('phone-main-landscape');
    await expect.poll(() => view.getByTestId('labels').textContent()).toContain('Phone main camera, landscape video, no stabilisation crop');
    await view.getByTestId('field-size-class').selectOption('letter-E');
    // code letter E by length: 55 to 76 m (src/engine/size.ts, from memory)
    await expect.poll(() => view.getByTestId('field-objectSizeM').inputValue()).toBe('55 to 76 m');

    // a field of view outside (0, 180) degrees is refused at the field, naming the allowed range
    await view.getByTestId('field-hfovDeg').fill('200 deg');
    await view.getByTestId('field-hfovDeg').press('Enter');
    await expect.poll(() => view.getByRole('alert').first().textContent()).toContain('outside the allowed 0.01 to 179.9 deg');

    // the scene's own camera: 70 degrees, the truth's length, 20 m/s on the road
    await view.getByTestId('field-hfovDeg').fill('69.5 to 70.5');
    await view.getByTestId('field-hfovDeg').press('Enter');
    await view.getByTestId('field-objectSizeM').fill('69 to 71 m');
    await view.getByTestId('field-objectSizeM').press('Enter');
    await view.getByTestId('field-observerSpeedMs').fill('72 km/h ± 3.6');
    await view.getByTestId('field-observerSpeedMs').press('Enter');
    await expect.poll(() => view.getByTestId('field-observerSpeedMs').inputValue()).toBe('68.4 to 75.6 km/h');

    // direction unknown: a reading per direction the pass allows; told "opposite", only that one
    await expect.poll(() => view.getByTestId('fit-reading').count()).toBeGreaterThanOrEqual(2);
    await view.getByTestId('field-direction').selectOption('opposite');
    await expect.poll(() => view.getByTestId('fit-reading').count()).toBe(1);
    expect(await view.getByTestId('fit-reading').getAttribute('data-direction')).toBe('opposite');
    // the plan view follows: no choice of direction left, and it reads the object as flying the other way
    expect(await view.getByTestId('plan-direction').count()).toBe(0);
    expect(await view.getByTestId('plan-view').getAttribute('aria-label')).toContain('flying opposite');

    // wind: the verdict judges the airspeed
    await view.getByTestId('field-headwindMs').fill('10 to 20 km/h');
    await view.getByTestId('field-headwindMs').press('Enter');
    await expect.poll(() => view.getByTestId('verdict').first().textContent()).toContain('with the wind, an airspeed of');

    // a mount on the car: its aim is measured by the road ahead and its pitch by the horizon, and the
    // fields say so rather than offering a silent default
    expect(await view.getByTestId('track-missing').textContent()).toContain('kept its aim');
    await view.getByTestId('field-mount').selectOption('vehicle');
    await expect.poll(() => view.getByTestId('default-axisHeadingDeg').textContent()).toContain('Measured from the road ahead');
    expect(await view.getByTestId('default-pitchDeg').textContent()).toContain('Measured from the horizon');
    await expect.poll(() => view.getByTestId('track').count()).toBe(1);
    const text = (await view.getByTestId('track').textContent())!;
    const speed = numbers(text.slice(text.indexOf('Object ground speed')));
    // 75 m/s = 270 km/h (the truth file)
    expect(speed.lo, text).toBeLessThan(270);
    expect(speed.hi, text).toBeGreaterThan(270);
    expect(Math.abs(speed.median / 270 - 1), text).toBeLessThan(0.05);
    await view.close();
    await page.close();
  }, 180_000);

  it('a name given in the settings goes with each new mark; too long a name is refused at the field', async () => {
    const options = await app.context.newPage();
    await options.goto(`chrome-extension://${app.extensionId}/extension/options/index.html`);
    await options.getByTestId('marker-name').fill('x'.repeat(101));
    await options.getByTestId('marker-name').press('Enter');
    await expect.poll(() => options.getByRole('alert').textContent()).toContain('101 characters is more than the 100 allowed');
    // an invented reviewer's name
    await options.getByTestId('marker-name').fill('  Reviewer Plover ');
    await options.getByTestId('marker-name').press('Enter');
    await expect.poll(() => options.getByRole('status').textContent()).toContain('Saved');
    await options.close();
    const { page, box } = await overlaid('/plain.html?named', truth.frames[0].t);
    await ovl(page).focus('.surface');
    await page.keyboard.press('1');
    await drag(page, box, truth.frames[0].object);
    await overlayReady(page, 1);
    const stored = Object.values(await storedCases(app)) as { video: { pageUrl: string }; marks: { by?: string }[] }[];
    const c = stored.find((x) => x.video.pageUrl === page.url())!;
    expect(c.marks.map((m) => m.by)).toEqual(['Reviewer Plover']);
    // and the name can be taken away again: later marks carry none
    const again = await app.context.newPage();
    await again.goto(`chrome-extension://${app.extensionId}/extension/options/index.html`);
    await again.getByTestId('marker-name').fill('');
    await again.getByTestId('marker-name').press('Enter');
    await expect.poll(() => again.getByRole('status').textContent()).toContain('Saved');
    await again.close();
    await page.close();
  });

  it('measures the observer speed from lane-dash passes marked in the overlay, once the cycle is chosen', async () => {
    await setUnits('aviation');
    const { page, box } = await overlaid('/plain.html?lanes');
    // invented passes: a dash's leading edge meets the reference at these times
    const times = [0.2, 0.7, 1.2, 1.7];
    for (const [i, t] of times.entries()) {
      await seek(page, t);
      await ovl(page).focus('.surface');
      await page.keyboard.press('4');
      await page.mouse.click(box.x + 300, box.y + 340);
      await overlayReady(page, i + 1);
    }
    const view = await popupFor(page);
    await expect.poll(() => view.getByTestId('case').textContent()).toContain('choose the road’s lane-line cycle');
    await view.getByTestId('field-lanes').selectOption('us-broken');
    // 3 cycles of 40 ft (12.192 m, MUTCD 2009 section 3A.06) in 1.5 s: 24.384 m/s, shown in the
    // aviation units chosen above: 24.384 / (1852/3600) = 47.4 kt
    await expect.poll(() => view.getByTestId('lane-speed').textContent()).toContain('4 dash passes');
    expect(await view.getByTestId('lane-speed').textContent()).toMatch(/47\.4 kt/);
    await view.close();
    await page.close();
  });

  it('a colleague recomputes the exported case file with `npm run solve` to the same text, byte for byte', async () => {
    await setUnits('metric');
    const f = truth.frames[2];
    const { page, box } = await overlaid('/plain.html?recompute', f.t);
    await ovl(page).focus('.surface');
    await page.keyboard.press('1');
    await drag(page, box, f.object);
    await overlayReady(page, 1);

    const view = await popupFor(page);
    await expect.poll(() => view.getByTestId('timestamp').count()).toBe(1);
    const [download] = await Promise.all([view.waitForEvent('download'), view.getByTestId('export').click()]);
    expect(download.suggestedFilename()).toMatch(/^clip-caliper-Invented-clip-plain-\d{4}-\d{2}-\d{2}-[0-9a-f]{8}\.json$/);
    const file = join(mkdtempSync(join(tmpdir(), 'clip-caliper-export-')), download.suggestedFilename());
    await download.saveAs(file);
    const { stdout } = await promisify(execFile)('node', ['src/cli/run.mjs', file, '--units', 'metric']);
    await openPreview(view);
    expect(stdout).toBe(await view.getByTestId('summary-preview').textContent());
    // and --json gives every result with its interval
    const json = JSON.parse((await promisify(execFile)('node', ['src/cli/run.mjs', file, '--json'])).stdout);
    expect(json.analysis.timestamps[0].result.range).toEqual({ p05: expect.any(Number), median: expect.any(Number), p95: expect.any(Number) });
    await view.close();
    await page.close();
  });

  it('the recompute refuses a spoiled file, naming the field', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'clip-caliper-bad-'));
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, JSON.stringify({ format: 'clip-caliper-case', schema: 1, case: { schema: 1, id: 'x' } }));
    const err = await promisify(execFile)('node', ['src/cli/run.mjs', bad]).then(
      () => null,
      (e: { stderr: string; code: number }) => e,
    );
    expect(err?.code).toBe(1);
    expect(err?.stderr).toContain('file.case.video: expected an object');
  });
});


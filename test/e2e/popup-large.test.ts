import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { E2E_DIST, launchWithExtension, sendAsPopup, tabIdFor, type Loaded } from './harness';
import { startServer, type TestServer } from '../../extension/tools/static-server';
import { bigCase, limitCaseOptions } from '../case/big-case';
import { toCaseFile } from '../../src/case/casefile';
import { MAX_MARKS_PER_CASE } from '../../src/case/validate';

/*
 * The popup on a case at the documented mark limit (validate.ts MAX_MARKS_PER_CASE; the invented
 * long pass of test/case/big-case.ts): the figures are computed in a worker, so the page shows how
 * far along they are and answers input meanwhile, an edit restarts the computation, and the figures
 * arrive. Responsiveness is read from the browser's own long-task timing (W3C Long Tasks API: a task
 * over 50 ms on the page's thread).
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

declare global {
  interface Window {
    longTasks: number[];
  }
}

/** The popup's view of the tab showing `page`, opened as a full tab, recording its long tasks from the start. */
async function popupFor(page: Page): Promise<Page> {
  const view = await app.context.newPage();
  await view.addInitScript(() => {
    window.longTasks = [];
    new PerformanceObserver((list) => {
      for (const e of list.getEntries()) window.longTasks.push(e.duration);
    }).observe({ type: 'longtask', buffered: true });
  });
  await view.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html?tab=${await tabIdFor(app, page.url())}`);
  return view;
}

describe('the popup on a case at the mark limit', () => {
  it('shows its progress, answers input while computing, restarts on an edit, and the figures arrive', async () => {
    const page = await app.context.newPage();
    await page.goto(server.url('/plain.html?large-case'));
    const c = bigCase(limitCaseOptions());
    expect(c.marks.length).toBe(MAX_MARKS_PER_CASE);
    const frames = c.marks.filter((m) => m.kind === 'object-span').length;
    const stored = { ...c, id: 'largecase000001', video: { ...c.video, pageUrl: page.url() } };
    await sendAsPopup(app, 'cases/import', { text: JSON.stringify(toCaseFile(stored, '0.1.0')) });

    const view = await popupFor(page);
    const text = view.getByTestId('computing-text');
    await expect.poll(() => text.textContent(), { timeout: 30_000 }).toMatch(/^Computing the figures: \d+ % \(\d+ of \d+ steps\)$/);
    // the bar moves on: a later reading is further along
    const along = async () => Number((await view.getByTestId('computing-progress').getAttribute('value')) ?? 0);
    const first = await along();
    await expect.poll(along, { timeout: 30_000 }).toBeGreaterThan(first);

    // input answers at once while the figures are computed: a frame is drawn within a second
    const t0 = Date.now();
    await view.evaluate(() => new Promise((r) => requestAnimationFrame(() => r(null))));
    expect(Date.now() - t0).toBeLessThan(1000);
    expect(await text.count()).toBe(1);
    // an edit (a lane cycle chosen) is taken while computing, and starts the figures afresh
    await view.getByTestId('field-lanes').selectOption({ index: 1 });
    // the select follows the stored case, so it shows the choice once the edit is saved
    await expect.poll(() => view.getByTestId('field-lanes').inputValue(), { timeout: 30_000 }).not.toBe('');

    // the figures arrive, one per frame, from the edited case (the chosen cycle asks for dashes), with
    // the note that a case this large ran fewer draws
    await expect
      .poll(async () => (await view.getByTestId('case').textContent())?.includes('Measuring the observer’s speed needs 2 or more lane-dash passes (0 so far).'), { timeout: 120_000 })
      .toBe(true);
    // the first 60 frames are drawn at once, the rest a batch at a time when asked (results.tsx)
    expect(await view.getByTestId('timestamp').count()).toBe(Math.min(frames, 60));
    await view.getByTestId('more-frames').click();
    await expect.poll(() => view.getByTestId('timestamp').count()).toBe(Math.min(frames, 260));
    expect(await view.getByTestId('more-frames').textContent()).toContain(`the ${frames - 260} frames not listed yet`);
    expect(await view.getByTestId('computing').count()).toBe(0);
    expect(await view.getByTestId('results').textContent()).toContain('Fewer draws for a large case');
    const longest = Math.max(0, ...(await view.evaluate(() => window.longTasks)));
    console.log(`popup on a ${c.marks.length}-mark case: longest main-thread task ${longest.toFixed(0)} ms`);
    await view.close();
    await page.close();
  }, 240_000);
});

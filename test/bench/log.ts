import { existsSync } from 'node:fs';
import type { Page } from 'playwright-core';
import { E2E_DIST, launchWithExtension } from '../e2e/harness';
import { seedCases, writeCases } from '../e2e/log-seed';

/*
 * The case log part of `npm run bench`: with 1 000 invented cases in storage, how long the log
 * view takes to show its first rows, and how long a filter takes to show its result, as medians
 * over several runs in headless Chromium. Prints figures with their targets; asserts nothing.
 * Uses the e2e build as it is (the overlay part of the bench builds it just before).
 */
const CASES = 1_000;
const RENDER_RUNS = 7;
const FILTER_RUNS = 15;
const TARGET_FIRST_RENDER_MS = 150;
const TARGET_FILTER_MS = 50;

const median = (xs: readonly number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
};
const verdict = (ok: boolean) => (ok ? 'within' : 'OVER');

/*
 * Installed before the page's own scripts: notes the moment the list first holds rows and the
 * count line reads "N of N", relative to the navigation's start (performance.now() counts from it).
 */
function watchFirstRender(count: number): void {
  const w = window as unknown as { __firstRows?: number };
  const check = () => {
    if (w.__firstRows !== undefined) return;
    const line = document.querySelector('[data-testid=log-count]')?.textContent ?? '';
    if (document.querySelector('[data-testid=log-row]') && line.startsWith(`${count} of ${count}`)) {
      w.__firstRows = performance.now();
      mo.disconnect();
    }
  };
  const mo = new MutationObserver(check);
  mo.observe(document, { childList: true, subtree: true, characterData: true });
}

/** Types into the search box and waits for the count line to change, then for the next frame. */
function timeFilter(text: string): Promise<number> {
  const input = document.querySelector('[data-testid=log-search]') as HTMLInputElement;
  const line = document.querySelector('[data-testid=log-count]')!;
  const before = line.textContent;
  return new Promise((done) => {
    const t0 = performance.now();
    const mo = new MutationObserver(() => {
      if (line.textContent === before) return;
      mo.disconnect();
      requestAnimationFrame(() => done(performance.now() - t0));
    });
    mo.observe(line, { childList: true, subtree: true, characterData: true });
    input.value = text;
    input.dispatchEvent(new Event('input', { bubbles: true }));
  });
}

interface Render {
  total: number;
  /** When the page's HTML had arrived (navigation timing). */
  html: number;
  /** When the page's modules had been evaluated, and when the listing arrived (log-view.tsx marks them). */
  modules: number;
  listed: number;
  listing: number;
}

async function firstRender(page: Page, url: string): Promise<Render> {
  await page.goto(url);
  await page.waitForFunction(() => (window as unknown as { __firstRows?: number }).__firstRows !== undefined, undefined, { timeout: 30_000 });
  const { total, html, modules, listed } = await page.evaluate(() => {
    const at = (name: string) => performance.getEntriesByName(name)[0]?.startTime ?? Number.NaN;
    const nav = performance.getEntriesByType('navigation')[0] as PerformanceNavigationTiming | undefined;
    return { total: (window as unknown as { __firstRows: number }).__firstRows, html: nav?.responseEnd ?? Number.NaN, modules: at('log:module'), listed: at('log:listed') };
  });
  // the part that is the background's: one cases/list round trip from this page
  const listing = await page.evaluate(async () => {
    const t0 = performance.now();
    await chrome.runtime.sendMessage({ channel: 'clip-caliper', type: 'cases/list', payload: {} });
    return performance.now() - t0;
  });
  return { total, html, modules, listed, listing };
}

export async function logBench(): Promise<void> {
  if (!existsSync(E2E_DIST)) {
    console.log(`log benchmark: skipped, no build at ${E2E_DIST} (run npm run build:e2e)`);
    return;
  }
  const app = await launchWithExtension(E2E_DIST);
  try {
    const base = `chrome-extension://${app.extensionId}/extension/popup/index.html`;
    const seeder = await app.context.newPage();
    await seeder.goto(base);
    await writeCases(seeder, seedCases(CASES));
    await seeder.close();

    const page = await app.context.newPage();
    await page.setViewportSize({ width: 1200, height: 900 });
    await page.addInitScript(watchFirstRender, CASES);
    const renders: Render[] = [];
    // one run to warm the browser's caches of the bundle, not counted
    await firstRender(page, `${base}?view=log`);
    for (let i = 0; i < RENDER_RUNS; i++) renders.push(await firstRender(page, `${base}?view=log`));
    const first = median(renders.map((r) => r.total));
    const listing = median(renders.map((r) => r.listing));
    const html = median(renders.map((r) => r.html));
    const modules = median(renders.map((r) => r.modules));
    const listed = median(renders.map((r) => r.listed));
    console.log(
      `log view, ${CASES} cases: first render median ${first.toFixed(1)} ms from navigation start ` +
        `(target < ${TARGET_FIRST_RENDER_MS} ms: ${verdict(first < TARGET_FIRST_RENDER_MS)}; ${RENDER_RUNS} runs); ` +
        `page HTML in at ${html.toFixed(1)} ms, its scripts evaluated at ${modules.toFixed(1)} ms, listing received at ${listed.toFixed(1)} ms, rows drawn ${(first - listed).toFixed(1)} ms later; ` +
        `one cases/list round trip alone ${listing.toFixed(1)} ms`,
    );

    // let the headlines of the rows in view finish, so the filter runs do not share the thread with them
    await page.waitForFunction(() => !document.body.innerText.includes('working out the figure'), undefined, { timeout: 30_000 }).catch(() => undefined);
    const narrow: number[] = [];
    const widen: number[] = [];
    for (let i = 0; i < FILTER_RUNS; i++) {
      narrow.push(await page.evaluate(timeFilter, 'ridge'));
      widen.push(await page.evaluate(timeFilter, ''));
    }
    const n = median(narrow);
    const w = median(widen);
    console.log(
      `log view, ${CASES} cases: filter (search "ridge", 1000 to 125 cases) median ${n.toFixed(1)} ms, clearing it median ${w.toFixed(1)} ms, ` +
        `to the next frame (target < ${TARGET_FILTER_MS} ms: ${verdict(Math.max(n, w) < TARGET_FILTER_MS)}; ${FILTER_RUNS} runs each)`,
    );
  } finally {
    await app.close();
  }
}

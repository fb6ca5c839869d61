import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import type { Page } from 'playwright-core';
import { E2E_DIST, injectOverlay, launchWithExtension, sendAsPopup, storedCases, videoReady, type Loaded } from './harness';
import { ovl } from '../../extension/tools/overlay-world';
import { HOUR, SEED_START, seedCase, seedCases, writeCases } from './log-seed';
import { startServer, type TestServer } from '../../extension/tools/static-server';
import { caseKey, type CaseRecord } from '../../src/case/schema';
import { newCase, upsertMark } from '../../src/case/marks';

/*
 * The case log in real Chromium with the built extension: 300 invented cases written straight into
 * storage (the real record shape, test/e2e/log-seed.ts), then found, filtered, edited, deleted and
 * brought back, exported and imported, and opened at a mark, all through the page as a user would.
 */
const COUNT = 300;
let app: Loaded;
let server: TestServer;
let log: Page;

const logUrl = () => `chrome-extension://${app.extensionId}/extension/popup/index.html?view=log`;
const countText = () => log.getByTestId('log-count').textContent();
/*
 * The harness reads storage from a page of its own, opened in front of the log the first time: a
 * tab behind another draws no frames, and Playwright's clicks wait for frames, so the log comes back to the front.
 */
const stored = async (id: string) => {
  const all = await storedCases(app);
  await log.bringToFront();
  return all[caseKey(id)] as CaseRecord | undefined;
};

async function openLog(): Promise<Page> {
  const page = await app.context.newPage();
  await page.setViewportSize({ width: 1200, height: 900 });
  await page.goto(logUrl());
  await page.waitForFunction(() => /of \d+ cases shown/.test(document.querySelector('[data-testid=log-count]')?.textContent ?? ''), undefined, { timeout: 15_000 });
  return page;
}

/** Picks the case in the list by searching for its number, then clicking its row. */
async function pick(page: Page, n: string): Promise<void> {
  await page.getByTestId('log-search').fill(`clip ${n}`);
  await expect.poll(() => page.getByTestId('log-row').count()).toBe(1);
  await page.getByTestId('log-row').first().click();
  await expect(page.getByTestId('log-detail').locator('h2').textContent()).resolves.toContain(n);
}

beforeAll(async () => {
  server = await startServer();
  app = await launchWithExtension(E2E_DIST);
  const seeder = await app.context.newPage();
  await seeder.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html`);
  await writeCases(seeder, seedCases(COUNT));
  await seeder.close();
  log = await openLog();
});
afterAll(async () => {
  await app?.close();
  await server?.close();
});

describe('the case log lists and finds cases', () => {
  it('lists every seeded case but draws only the rows in view', async () => {
    await expect.poll(countText).toBe(`${COUNT} of ${COUNT} cases shown`);
    const drawn = await log.getByTestId('log-row').count();
    expect(drawn).toBeGreaterThan(5);
    expect(drawn).toBeLessThan(60);
    // newest change first: the last seeded case on top
    await expect(log.getByTestId('log-row').first().textContent()).resolves.toContain('Invented clip 0299');
  });

  it('scrolling to the end draws the last rows (and still only a window of them)', async () => {
    await log.getByTestId('log-list').evaluate((el) => (el.scrollTop = el.scrollHeight));
    await expect.poll(() => log.getByTestId('log-row').last().textContent()).toContain('Invented clip 0000');
    expect(await log.getByTestId('log-row').count()).toBeLessThan(60);
    await log.getByTestId('log-list').evaluate((el) => (el.scrollTop = 0));
  });

  it('shows the headline with its 5-95 % interval for a case with marks, and says so when there is none', async () => {
    // every third case has an object span (297 = 3 x 99 has one; 298 has none)
    await expect.poll(() => log.locator('[data-case-id=seed0297] [data-testid=headline]').textContent(), { timeout: 20_000 }).toMatch(/range at .+ \(.+, 5-95 %\)/);
    await expect(log.locator('[data-case-id=seed0298] .log-row-headline').textContent()).resolves.toContain('not enough marks');
  });

  it('search narrows to cases with every word, in any field, case-insensitive', async () => {
    await log.getByTestId('log-search').fill('RIDGE');
    // word i % 8 == 0: 38 of 0..299
    await expect.poll(countText).toBe(`38 of ${COUNT} cases shown`);
    await log.getByTestId('log-search').fill('ridge kestrel');
    // ridge (i % 8 == 0) and marked by the first name (i % 12 == 0): i % 24 == 0, 13 cases
    await expect.poll(countText).toBe(`13 of ${COUNT} cases shown`);
    await log.getByTestId('log-search').fill('ridge nobody-has-this');
    await expect.poll(countText).toBe(`0 of ${COUNT} cases shown`);
    await log.getByTestId('log-search').fill('');
  });

  it('filters by status, tag, site and date range', async () => {
    await log.getByTestId('log-filter-second-look').check();
    await expect.poll(countText).toBe(`100 of ${COUNT} cases shown`);
    await log.getByTestId('log-filter-second-look').uncheck();
    await log.getByTestId('log-tag').selectOption('hover');
    // i % 4 == 1 (75 cases) less those with i % 5 == 0 (i % 20 == 5: 15)
    await expect.poll(countText).toBe(`60 of ${COUNT} cases shown`);
    await log.getByTestId('log-tag').selectOption('');
    await log.getByTestId('log-site').selectOption('clips-b.example.test');
    await expect.poll(countText).toBe(`100 of ${COUNT} cases shown`);
    await log.getByTestId('log-site').selectOption('');
    // one calendar day in the browser's time zone (the same zone as this Node process)
    await log.locator('#log-date-field').selectOption('createdAt');
    await log.getByTestId('log-from').fill('2026-01-02');
    await log.getByTestId('log-to').fill('2026-01-02');
    const start = new Date(2026, 0, 2).getTime();
    const expected = seedCases(COUNT).filter((c) => c.createdAt >= start && c.createdAt < start + 24 * HOUR).length;
    await expect.poll(countText).toBe(`${expected} of ${COUNT} cases shown`);
    expect(SEED_START).toBe(Date.parse('2026-01-01T00:00:00Z'));
  });

  it('a day range that ends before it starts is marked at the field, and the list keeps the last good filter', async () => {
    const before = await countText();
    await log.getByTestId('log-to').fill('2026-01-01');
    await expect(log.getByTestId('log-to').getAttribute('aria-invalid')).resolves.toBe('true');
    await expect(log.locator('#log-to-error').textContent()).resolves.toMatch(/to date: .*on or after the from date \(2026-01-02\)/);
    expect(await countText()).toBe(before);
    await log.getByRole('button', { name: 'Clear search and filters' }).click();
    await expect.poll(countText).toBe(`${COUNT} of ${COUNT} cases shown`);
  });

  it('is keyboard operable: arrows move through the rows, Enter opens one', async () => {
    await log.getByTestId('log-list').focus();
    await log.keyboard.press('ArrowDown');
    await log.keyboard.press('Enter');
    await expect.poll(() => log.getByTestId('log-detail').locator('h2').textContent()).toContain('Invented clip 0298');
    // opened from the keyboard, the reader goes on at the case's heading
    await expect.poll(() => log.evaluate(() => document.activeElement?.id)).toBe('log-detail-title');
    await log.getByTestId('log-list').focus();
    await log.keyboard.press('End');
    await log.keyboard.press('Enter');
    await expect.poll(() => log.getByTestId('log-detail').locator('h2').textContent()).toContain('Invented clip 0000');
    const active = await log.getByTestId('log-list').getAttribute('aria-activedescendant');
    expect(active).toBe('log-row-seed0000');
    await expect(log.locator('#log-row-seed0000').count()).resolves.toBe(1);
  });
});

describe('the case log edits, deletes and brings back', () => {
  it('notes, status and tags are saved to storage and survive a reload', async () => {
    await pick(log, '0042');
    await log.getByTestId('log-notes').fill('Invented note: the light sits over the mast.');
    await log.getByTestId('log-status').selectOption('explained');
    await log.getByTestId('log-tags').fill('night, checked,  night');
    await log.getByTestId('log-save').click();
    await expect.poll(async () => (await stored('seed0042'))?.status).toBe('explained');
    const rec = (await stored('seed0042'))!;
    expect(rec.notes).toBe('Invented note: the light sits over the mast.');
    expect(rec.tags).toEqual(['night', 'checked']);
    // the marks were not touched by the edit
    expect(rec.marks).toEqual(seedCase(42).marks);
    await log.reload();
    await log.getByTestId('log-search').fill('checked');
    await expect.poll(countText).toBe(`1 of ${COUNT} cases shown`);
    await expect(log.locator('[data-case-id=seed0042] [data-testid=row-status]').textContent()).resolves.toBe('explained');
    await log.getByTestId('log-search').fill('');
  });

  it('a bad tag is marked at the field with the limit, and nothing is written', async () => {
    await pick(log, '0043');
    const before = await stored('seed0043');
    await log.getByTestId('log-tags').fill('x'.repeat(41));
    await log.getByTestId('log-save').click();
    await expect(log.getByTestId('log-tags').getAttribute('aria-invalid')).resolves.toBe('true');
    await expect(log.locator('#log-tags-error').textContent()).resolves.toMatch(/tags: .*tags of 1 to 40 characters/);
    expect(await stored('seed0043')).toEqual(before);
  });

  it('a change saved elsewhere while typing does not wipe what is typed; the form says so', async () => {
    await pick(log, '0044');
    await log.getByTestId('log-notes').fill('Invented: typed here, not saved yet');
    // another view of the extension saves a status for the same case
    await sendAsPopup(app, 'case/annotate', { caseId: 'seed0044', status: 'second-look' });
    await log.bringToFront();
    await expect.poll(() => log.getByTestId('log-changed-elsewhere').count(), { timeout: 10_000 }).toBe(1);
    expect(await log.getByTestId('log-notes').inputValue()).toBe('Invented: typed here, not saved yet');
    await log.getByTestId('log-save').click();
    await expect.poll(async () => (await stored('seed0044'))?.notes).toBe('Invented: typed here, not saved yet');
    await expect(log.getByTestId('log-changed-elsewhere').count()).resolves.toBe(0);
  });

  it('delete asks first, removes the case, and Undo brings it back whole', async () => {
    await pick(log, '0042');
    const before = (await stored('seed0042'))!;
    await log.getByTestId('log-delete').click();
    // nothing happens until confirmed; the confirm button takes the focus
    expect(await stored('seed0042')).toBeDefined();
    await expect.poll(() => log.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('log-delete-confirm');
    await log.getByTestId('log-delete-confirm').click();
    await expect.poll(() => stored('seed0042')).toBeUndefined();
    // the case's own buttons went with it: the focus is on its Undo
    await expect.poll(() => log.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('log-undo');
    await log.getByTestId('log-search').fill('');
    await expect.poll(countText).toBe(`${COUNT - 1} of ${COUNT - 1} cases shown`);
    await log.getByTestId('log-undo').first().click();
    await expect.poll(() => stored('seed0042')).toEqual(before);
    await expect.poll(countText).toBe(`${COUNT} of ${COUNT} cases shown`);
  });
  it('a delete can still be undone after the log tab was closed and opened again (until the browser closes)', async () => {
    await pick(log, '0043');
    const before = (await stored('seed0043'))!;
    await log.getByTestId('log-delete').click();
    await log.getByTestId('log-delete-confirm').click();
    await expect.poll(() => stored('seed0043')).toBeUndefined();
    await log.close();
    log = await openLog();
    await expect.poll(() => log.getByTestId('log-undo').count()).toBeGreaterThanOrEqual(1);
    expect(await log.locator('.log-undo').textContent()).toContain('0043');
    await log.getByTestId('log-undo').first().click();
    await expect.poll(() => stored('seed0043')).toEqual(before);
    await expect.poll(() => log.getByTestId('log-undo').count()).toBe(0);
  });
});

describe('the case log exports and imports', () => {
  it('export all, remove cases, import the file: they are back as they were', async () => {
    const downloading = log.waitForEvent('download');
    await log.getByTestId('log-export-all').click();
    const file = await downloading;
    expect(file.suggestedFilename()).toMatch(/\.json$/);
    const text = readFileSync((await file.path())!, 'utf8');
    const before = [(await stored('seed0010'))!, (await stored('seed0011'))!];
    await log.evaluate((keys) => chrome.storage.local.remove(keys), [caseKey('seed0010'), caseKey('seed0011')]);
    await expect.poll(countText).toBe(`${COUNT - 2} of ${COUNT - 2} cases shown`);
    await log.getByTestId('log-import').setInputFiles({ name: 'all.json', mimeType: 'application/json', buffer: Buffer.from(text) });
    await expect.poll(() => log.getByTestId('log-notice').textContent(), { timeout: 15_000 }).toMatch(/Imported: 2 new case\(s\), \d+ merged/);
    await expect.poll(countText).toBe(`${COUNT} of ${COUNT} cases shown`);
    expect((await stored('seed0010'))!.marks).toEqual(before[0]!.marks);
    expect((await stored('seed0011'))!.notes).toBe(before[1]!.notes);
  });

  it('export one case downloads a file holding that case', async () => {
    await pick(log, '0003');
    const downloading = log.waitForEvent('download');
    await log.getByTestId('log-export-one').click();
    const file = await downloading;
    const parsed = JSON.parse(readFileSync((await file.path())!, 'utf8')) as { case?: { id: string } };
    expect(parsed.case?.id).toBe('seed0003');
    await log.getByTestId('log-search').fill('');
  });

  it('marks as CSV and the summary as text, each named by case and date', async () => {
    await pick(log, '0003');
    const record = (await stored('seed0003'))!;
    const csvDl = log.waitForEvent('download');
    await log.getByTestId('log-export-csv').click();
    const csv = await csvDl;
    expect(csv.suggestedFilename()).toMatch(/^clip-caliper-seed0003-\d{4}-\d{2}-\d{2}\.csv$/);
    const lines = readFileSync((await csv.path())!, 'utf8').split('\r\n').filter((l) => l !== '');
    // a header and one row per mark point (RFC 4180 line ends are CRLF)
    expect(lines.length).toBe(1 + record.marks.reduce((n, m) => n + m.points.length, 0));
    const txtDl = log.waitForEvent('download');
    await log.getByTestId('log-export-summary').click();
    const txt = await txtDl;
    expect(txt.suggestedFilename()).toMatch(/^clip-caliper-seed0003-\d{4}-\d{2}-\d{2}\.txt$/);
    const summary = readFileSync((await txt.path())!, 'utf8');
    expect(summary).toContain('Clip Caliper case summary');
    expect(summary).toContain('Never operate this tool, or film, while driving.');
    await log.getByTestId('log-search').fill('');
  });

  it('a bad file is rejected whole, with the message naming the field, and nothing changes', async () => {
    const before = Object.keys(await storedCases(app)).length;
    await log.bringToFront();
    const good = seedCase(900);
    const bad = { format: 'clip-caliper-case', schema: good.schema, exportedBy: 'invented', case: { ...good, status: 'closed-forever' } };
    await log.getByTestId('log-import').setInputFiles({ name: 'bad.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(bad)) });
    await expect.poll(() => log.getByTestId('log-import-error').textContent(), { timeout: 10_000 }).toMatch(/bad\.json was not imported, nothing was changed: .*status/);
    await expect(log.getByTestId('log-import').getAttribute('aria-invalid')).resolves.toBe('true');
    expect(Object.keys(await storedCases(app)).length).toBe(before);
    expect(await stored('seed0900')).toBeUndefined();
  });
});

describe('the case log opens a case at a mark', () => {
  it('opens the video’s page in a tab; the overlay called up there seeks to the chosen timestamp', async () => {
    const pageUrl = server.url('/plain.html');
    let c = newCase('seekcase1', { pageUrl, pageTitle: 'Invented clip: plain', src: '', width: 640, height: 360, duration: 3.2 }, '0.1.0', Date.now());
    const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };
    for (const [i, t] of [0.5, 1.25].entries()) c = upsertMark(c, { id: `s${i}`, kind: 'object-span', t, points: [{ x: 300, y: 150 }, { x: 340, y: 150 }], edgeSigmaPx: 0.5, mapping, createdAt: 1, by: 'Reviewer Wren' }, Date.now());
    await writeCases(log, [c]);
    await pick(log, 'plain');
    await expect(log.getByTestId('marked-by').first().textContent()).resolves.toContain('Reviewer Wren');
    await log.getByTestId('log-seek').selectOption('1.25');
    const opening = app.context.waitForEvent('page', { timeout: 10_000 });
    await log.getByTestId('log-open').click();
    const page = await opening.catch(async (e: Error) => {
      throw new Error(`${e.message}; the log says: ${await log.locator('.log-actions').innerText()}`);
    });
    await page.waitForURL(pageUrl);
    await videoReady(page);
    await injectOverlay(app, page.url());
    // the overlay is up; the seek follows once it has opened its case
    await expect.poll(() => ovl(page).ready(), { timeout: 10_000 }).toBe(true);
    await expect.poll(() => page.evaluate(() => (document.querySelector('video') as HTMLVideoElement).currentTime), { timeout: 10_000 }).toBeCloseTo(1.25, 2);
    expect(await page.evaluate(() => (document.querySelector('video') as HTMLVideoElement).paused)).toBe(true);
    await page.close();
  });
});

describe('the case log reports storage', () => {
  it('shows storage in use, and a record that fails validation as quarantined (not dropped)', async () => {
    await expect(log.getByTestId('log-usage').textContent()).resolves.toMatch(/Storage in use: .+ of .+\./);
    await log.evaluate((k) => chrome.storage.local.set({ [k]: { schema: 2, id: 'broken1', marks: 'not a list' } }), caseKey('broken1'));
    await log.reload();
    await expect.poll(() => log.getByTestId('log-quarantine').textContent(), { timeout: 10_000 }).toContain('case:broken1');
  });

  it('warns when storage is nearly full (over 0.9 of the quota, store-policy.ts), and stops warning once room is made', async () => {
    // a filler value that is not a case: with the seeded cases it takes use past 0.9 of chrome.storage.local's 10 MB
    await log.evaluate(() => chrome.storage.local.set({ 'test-filler': 'x'.repeat(9_600_000) }));
    await log.reload();
    await expect.poll(() => log.getByTestId('log-usage').textContent(), { timeout: 10_000 }).toContain('Storage is nearly full');
    await expect(log.getByTestId('log-usage').getAttribute('role')).resolves.toBe('alert');
    await log.evaluate(() => chrome.storage.local.remove('test-filler'));
    await log.reload();
    await expect.poll(() => log.getByTestId('log-usage').textContent(), { timeout: 10_000 }).not.toContain('nearly full');
  });

  it('the popup links to the log, which opens in a tab of its own', async () => {
    const popup = await app.context.newPage();
    await popup.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html`);
    const opening = app.context.waitForEvent('page', { timeout: 10_000 });
    await popup.getByTestId('open-log').click();
    const tab = await opening;
    await tab.waitForURL(/\?view=log$/);
    await tab.waitForSelector('[data-testid=log-row]');
    await tab.close();
    await popup.close();
    await log.bringToFront();
  });

  it('reflows at a narrow window (200 % zoom of a 1280 px screen): no sideways scrolling; dark scheme follows the system', async () => {
    await log.setViewportSize({ width: 640, height: 720 });
    const over = await log.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(over).toBeLessThanOrEqual(0);
    const light = await log.evaluate(() => getComputedStyle(document.body).backgroundColor);
    await log.emulateMedia({ colorScheme: 'dark' });
    const dark = await log.evaluate(() => getComputedStyle(document.body).backgroundColor);
    expect(dark).not.toBe(light);
    // the values popup.css sets for each scheme (--bg)
    expect(light).toBe('rgb(251, 252, 254)');
    expect(dark).toBe('rgb(19, 26, 34)');
  });
});

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { analyseCase } from '../../src/case/analysis';
import { itemBytes } from '../../src/case/store-policy';
import { summaryText } from '../../src/case/summary';
import { SCHEMA_VERSION, type CaseRecord, type Mark, type VideoInfo } from '../../src/case/schema';
import { CHROMIUM_ARGS, chromiumPath, E2E_DIST, injectOverlay, launchWithExtension, sendAsPopup, stopServiceWorker, videoReady, type Loaded } from './harness';
import { ovl } from '../../extension/tools/overlay-world';
import { startServer, type TestServer } from '../../extension/tools/static-server';

/*
 * The case store in real Chromium: marks survive the worker being stopped and the page being
 * reloaded, an edit whose sender closes at once is still saved, concurrent edits from two tabs
 * all land, a corrupt record is quarantined without harming the others, a write past the quota
 * fails and leaves everything, deletes can be undone, an export imported into a fresh profile
 * gives the same records and the same summary, and a browser restart keeps every case. The real
 * quota is filled (one large item fills 10 MiB in well under a second), so no test-only seam is
 * needed in the e2e build. Every page, title and figure is invented.
 */
let app: Loaded;
let server: TestServer;
let ext: Page;
beforeAll(async () => {
  server = await startServer();
  app = await launchWithExtension(E2E_DIST);
  ext = await app.context.newPage();
  await ext.goto(`chrome-extension://${app.extensionId}/extension/options/index.html`);
});
afterAll(async () => {
  await app?.close();
  await server?.close();
});

const ask = <T>(type: string, payload: unknown = {}) => sendAsPopup(app, type, payload) as Promise<T>;
const askFails = (type: string, payload: unknown = {}) => ask(type, payload).then(
  () => {
    throw new Error(`${type} did not fail`);
  },
  (e: Error) => e.message,
);
const local = (keys: string | string[] | null) => ext.evaluate((k) => chrome.storage.local.get(k), keys) as Promise<Record<string, unknown>>;
const plant = (items: Record<string, unknown>) => ext.evaluate((i) => chrome.storage.local.set(i), items);
const unplant = (keys: string[]) => ext.evaluate((k) => chrome.storage.local.remove(k), keys);

const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };
const video = (n: string): VideoInfo => ({ pageUrl: `http://127.0.0.1:9/invented-${n}`, pageTitle: `Invented clip ${n}`, src: '', width: 640, height: 360, duration: 5 });
const mark = (id: string, x: number, t = 1): Mark => ({ id, kind: 'object-span', t, points: [{ x, y: 100 }, { x: x + 30, y: 101 }], edgeSigmaPx: 0.5, dimension: 'wingspan', mapping, createdAt: 1 });
const open = (id: string) => ask<CaseRecord>('case/open', { caseId: id, video: video(id) });

describe('marks are never lost', () => {
  it('survive the service worker being stopped, and a page reload (the overlay finds them again)', async () => {
    const page = await app.context.newPage();
    await page.goto(server.url('/plain.html?store'));
    await videoReady(page);
    await injectOverlay(app, page.url());
    // the overlay opened (created) the page's case
    const find = async () => Object.values(await local(null)).find((c) => (c as CaseRecord).video?.pageUrl === page.url()) as CaseRecord | undefined;
    await expect.poll(find, { timeout: 10_000 }).toBeTruthy();
    const stored = (await find())!;
    await ask('mark/put', { caseId: stored.id, mark: mark('s1', 100) });
    await ask('mark/put', { caseId: stored.id, mark: mark('s2', 200, 2) });
    const before = (await ask<{ startedAt: number }>('status/get')).startedAt;

    await stopServiceWorker(app);
    const after = (await ask<{ startedAt: number }>('status/get')).startedAt;
    expect(after).toBeGreaterThan(before); // a new worker instance answered
    const back = await ask<CaseRecord>('case/get', { caseId: stored.id });
    expect(back.marks.map((m) => m.id)).toEqual(['s1', 's2']);

    await page.reload();
    await videoReady(page);
    await injectOverlay(app, page.url());
    // the overlay mounts again and opens the same case (case/open keeps the marks)
    await expect.poll(() => ovl(page).count()).toBe(1);
    await expect.poll(async () => (await ask<{ cases: CaseRecord[] }>('cases/forPage', { pageUrl: page.url() })).cases.map((c) => c.marks.length)).toEqual([2]);
    await page.close();
  });

  it('an edit whose sender closes right away (a popup closed mid-edit) is still saved whole', async () => {
    const c = await open('closing0000000001');
    await ask('mark/put', { caseId: c.id, mark: mark('c1', 50) });
    const popup = await app.context.newPage();
    await popup.goto(`chrome-extension://${app.extensionId}/extension/options/index.html`);
    // fire and close without waiting for the reply, the way a popup dies when it loses focus
    await popup.evaluate((id) => {
      void chrome.runtime.sendMessage({ channel: 'clip-caliper', type: 'case/annotate', payload: { caseId: id, notes: 'invented note typed before closing', tags: ['night'] } });
    }, c.id);
    await popup.close();
    await expect.poll(async () => (await ask<CaseRecord>('case/get', { caseId: c.id })).notes).toBe('invented note typed before closing');
    const saved = await ask<CaseRecord>('case/get', { caseId: c.id });
    expect(saved.tags).toEqual(['night']);
    expect(saved.marks.map((m) => m.id)).toEqual(['c1']);
  });

  it('two tabs editing different cases at once, and the same case at once: every mark lands', async () => {
    const [a, b] = [await open('tabsa00000000001'), await open('tabsb00000000001')];
    const tabs = [await app.context.newPage(), await app.context.newPage()];
    for (const t of tabs) await t.goto(`chrome-extension://${app.extensionId}/extension/options/index.html`);
    const burst = (tab: Page, caseId: string, prefix: string) =>
      tab.evaluate(
        async ([id, p, m]) => {
          const replies = await Promise.all(
            Array.from({ length: 15 }, (_, i) =>
              chrome.runtime.sendMessage({ channel: 'clip-caliper', type: 'mark/put', payload: { caseId: id, mark: { ...m, id: `${p}${i}`, points: [{ x: 10 + i, y: 5 }, { x: 40 + i, y: 5 }] } } }),
            ),
          );
          return replies.every((r: { ok: boolean }) => r.ok);
        },
        [caseId, prefix, mark('x', 0)] as const,
      );
    // different cases from two tabs, then one case from both tabs, all at once
    const oks = await Promise.all([burst(tabs[0]!, a.id, 'a'), burst(tabs[1]!, b.id, 'b'), burst(tabs[0]!, a.id, 'p'), burst(tabs[1]!, a.id, 'q')]);
    expect(oks).toEqual([true, true, true, true]);
    const ra = await ask<CaseRecord>('case/get', { caseId: a.id });
    const rb = await ask<CaseRecord>('case/get', { caseId: b.id });
    expect(ra.marks.map((m) => m.id).sort()).toEqual(['a', 'p', 'q'].flatMap((p) => Array.from({ length: 15 }, (_, i) => `${p}${i}`)).sort());
    expect(rb.marks).toHaveLength(15);
    for (const t of tabs) await t.close();
  });
});

describe('reading validates every record', () => {
  it('a corrupt record is quarantined whole and reported; the other cases list as before; a version 1 record is migrated', async () => {
    const good = await open('good000000000001');
    const v1 = JSON.parse(readFileSync('test/case/fixtures/v1/marked-case.json', 'utf8'));
    const corrupt = { ...(await open('bad0000000000001')), video: { ...video('bad'), width: -5 } };
    await plant({ 'case:bad0000000000001': corrupt, 'case:junk': 'not a record', [`case:${v1.id}`]: v1 });

    const list = await ask<{ cases: { id: string; status: string }[]; quarantined: { key: string; quarantineKey: string; reason: string }[] }>('cases/list');
    expect(list.cases.map((c) => c.id)).toContain(good.id);
    expect(list.cases.find((c) => c.id === v1.id)?.status).toBe('open');
    const reasons = Object.fromEntries(list.quarantined.map((q) => [q.key, q]));
    expect(reasons['case:bad0000000000001']).toMatchObject({ quarantineKey: 'quarantine:case:bad0000000000001', reason: 'case.video.width: expected 1 to 20000, got -5' });
    expect(reasons['case:junk']?.reason).toBe('case: expected an object');

    const raw = await local(['case:bad0000000000001', 'quarantine:case:bad0000000000001', 'case:junk', 'quarantine:case:junk']);
    expect(raw['case:bad0000000000001']).toBeUndefined();
    expect((raw['quarantine:case:bad0000000000001'] as { raw: unknown }).raw).toEqual(corrupt); // kept whole
    expect((raw['quarantine:case:junk'] as { raw: unknown }).raw).toBe('not a record');
    // a second listing still reports them, and reading the good case is unaffected
    expect((await ask<{ quarantined: unknown[] }>('cases/list')).quarantined.length).toBeGreaterThanOrEqual(2);
    expect((await ask<CaseRecord>('case/get', { caseId: good.id })).id).toBe(good.id);
    // case/get of a planted bad record quarantines it too, and reads as absent
    await plant({ 'case:bad0000000000002': { ...corrupt, id: 'bad0000000000002', marks: [{ kind: 'banana' }] } });
    expect(await ask('case/get', { caseId: 'bad0000000000002' })).toBeNull();
    expect(Object.keys(await local(null))).toContain('quarantine:case:bad0000000000002');
    const v1Read = await ask<CaseRecord>('case/get', { caseId: v1.id });
    expect(v1Read).toMatchObject({ schema: SCHEMA_VERSION, status: 'open', tags: [], history: [] });
    expect(v1Read.marks).toEqual(v1.marks);
  });
});

describe('what is stored is the known fields, under the record\'s own key', () => {
  it('a record under another id\'s key is quarantined with that reason (it was listed yet could not be edited, deleted or set aside), by a full listing and by the index', async () => {
    const good = await open('keyid00000000001');
    const copy = { ...good, notes: 'invented copy under another key' };
    await plant({ 'case:keyid00000000002': copy });
    const list = await ask<{ cases: { id: string }[]; quarantined: { key: string; reason: string }[] }>('cases/list');
    expect(list.cases.filter((c) => c.id === good.id)).toHaveLength(1);
    const reason = (key: string) => `case.id: expected "${key.slice(5)}", the id its storage key "${key}" names, got "keyid00000000001"`;
    expect(list.quarantined.find((q) => q.key === 'case:keyid00000000002')?.reason).toBe(reason('case:keyid00000000002'));
    const raw = await local(['case:keyid00000000002', 'quarantine:case:keyid00000000002']);
    expect(raw['case:keyid00000000002']).toBeUndefined();
    expect((raw['quarantine:case:keyid00000000002'] as { raw: unknown }).raw).toEqual(copy); // kept whole
    // the listing is now served from the index: a record planted under another key afterwards drops it, and the next listing sets it aside too
    await plant({ 'case:keyid00000000003': copy });
    await expect
      .poll(async () => (await ask<{ quarantined: { key: string; reason: string }[] }>('cases/list')).quarantined.find((q) => q.key === 'case:keyid00000000003')?.reason)
      .toBe(reason('case:keyid00000000003'));
    expect((await ask<CaseRecord>('case/get', { caseId: good.id })).notes).toBe('');
  });

  it('fields nothing reads are dropped from a mark sent and from an imported file; an import with a javascript: page address is refused naming it', async () => {
    const c = await open('shape00000000001');
    await ask('mark/put', { caseId: c.id, mark: { ...mark('j1', 100), junk: { deep: [1] } } });
    const stored = (await local(`case:${c.id}`))[`case:${c.id}`] as { marks: Record<string, unknown>[] };
    expect(stored.marks.map((m) => Object.hasOwn(m, 'junk'))).toEqual([false]);

    const incoming = { ...c, id: 'shape00000000002', extra: 'invented', video: { ...c.video, src: 'data:video/webm;base64,AAAA' } };
    await ask('cases/import', { text: JSON.stringify({ format: 'clip-caliper-case', schema: 3, case: incoming }) });
    const imported = (await local('case:shape00000000002'))['case:shape00000000002'] as Record<string, unknown>;
    expect(Object.hasOwn(imported, 'extra')).toBe(false);
    expect((imported.video as VideoInfo).src).toBe('');

    const hostile = { ...incoming, id: 'shape00000000003', video: { ...c.video, pageUrl: 'javascript:alert(1)' } };
    expect(await askFails('cases/import', { text: JSON.stringify({ format: 'clip-caliper-case', schema: 3, case: hostile }) })).toContain('file.case.video.pageUrl: expected an http, https or file address');
    expect((await local('case:shape00000000003'))['case:shape00000000003']).toBeUndefined();
  });
});

describe('the storage quota', () => {
  it('is the browser’s QUOTA_BYTES; a write that would not fit fails naming the case and sizes, and nothing saved changes', async () => {
    const quota = await ext.evaluate(() => chrome.storage.local.QUOTA_BYTES);
    const usage0 = await ask<{ bytesInUse: number; quotaBytes: number; nearLimit: boolean }>('storage/usage');
    expect(usage0.quotaBytes).toBe(quota);
    expect(usage0.nearLimit).toBe(false);

    // our estimate of a write is never below what Chromium counts for it
    const probe = { s: 'é€x'.repeat(1000) };
    const inUse0 = await ext.evaluate(() => chrome.storage.local.getBytesInUse(null));
    await plant({ 'e2e:probe': probe });
    const inUse1 = await ext.evaluate(() => chrome.storage.local.getBytesInUse(null));
    expect(itemBytes('e2e:probe', probe)).toBeGreaterThanOrEqual(inUse1 - inUse0);
    await unplant(['e2e:probe']);

    const c = await open('quota00000000001');
    await ask('mark/put', { caseId: c.id, mark: mark('k1', 10) });
    const before = await local(null);
    // fill to 4 000 bytes short of the quota
    const used = await ext.evaluate(() => chrome.storage.local.getBytesInUse(null));
    await plant({ 'e2e:filler': 'f'.repeat(quota - used - 4000 - 'e2e:filler'.length - 2) });
    const usage1 = await ask<{ bytesInUse: number; nearLimit: boolean }>('storage/usage');
    expect(usage1.nearLimit).toBe(true);

    const message = await askFails('case/annotate', { caseId: c.id, notes: 'n'.repeat(10_000) });
    expect(message).toMatch(/^case quota00000000001 \(Invented clip quota00000000001\): not saved, storage is full: it needs \d+ more bytes but only \d+ of \d+ are free/);
    const importMsg = await askFails('cases/import', { text: JSON.stringify({ format: 'clip-caliper-case', schema: 2, case: { ...c, id: 'quota00000000002', notes: 'n'.repeat(10_000) } }) });
    expect(importMsg).toContain('not saved, storage is full');

    const after = await local(null);
    delete after['e2e:filler'];
    expect(after).toEqual(before); // everything saved stays, nothing half-written
    // a small edit that fits still goes through
    await ask('mark/put', { caseId: c.id, mark: mark('k2', 20) });
    await unplant(['e2e:filler']);
    expect((await ask<CaseRecord>('case/get', { caseId: c.id })).marks).toHaveLength(2);
  });
});

describe('delete with undo', () => {
  it('moves the case to session storage, brings it back after a worker restart, and refuses when the id exists again', async () => {
    const c = await open('delete0000000001');
    await ask('mark/put', { caseId: c.id, mark: mark('d1', 10) });
    const saved = await ask<CaseRecord>('case/get', { caseId: c.id });
    await ask('case/delete', { caseId: c.id });
    expect(await ask('case/get', { caseId: c.id })).toBeNull();
    expect((await ask<{ cases: { id: string }[] }>('cases/list')).cases.map((x) => x.id)).not.toContain(c.id);
    await stopServiceWorker(app);
    expect(await ask('case/undelete', { caseId: c.id })).toEqual(saved);
    expect(await ask('case/get', { caseId: c.id })).toEqual(saved);
    expect(await askFails('case/undelete', { caseId: c.id })).toContain('nothing to bring back');

    await ask('case/delete', { caseId: c.id });
    await open(c.id); // the video measured again
    expect(await askFails('case/undelete', { caseId: c.id })).toContain('a case with this id exists again');
  });

  it('annotate refuses bad values naming the field and its range', async () => {
    const c = await open('annot00000000001');
    expect(await askFails('case/annotate', { caseId: c.id, status: 'closed' })).toBe('status: expected one of open, explained, second-look, got "closed"');
    expect(await askFails('case/annotate', { caseId: c.id, tags: ['x'.repeat(41)] })).toBe('tags[0]: expected 1 to 40 characters, got 41');
    expect(await askFails('case/annotate', { caseId: c.id, notes: 'n'.repeat(20_001) })).toBe('notes: expected 0 to 20000 characters, got 20001');
    const ok = await ask<CaseRecord>('case/annotate', { caseId: c.id, status: 'second-look', tags: [' dusk ', 'dusk'] });
    expect(ok).toMatchObject({ status: 'second-look', tags: ['dusk'] });
  });
});

describe('seeking from the log', () => {
  it('the pending seek outlives the worker, and taking it clears it', async () => {
    await ask('seek/request', { pageUrl: 'http://127.0.0.1:9/invented-seek#frag', t: 2.5 });
    await stopServiceWorker(app);
    expect(await ask('seek/take', { pageUrl: 'http://127.0.0.1:9/invented-seek' })).toEqual({ t: 2.5 });
    expect(await ask('seek/take', { pageUrl: 'http://127.0.0.1:9/invented-seek' })).toEqual({ t: null });
    expect(await askFails('seek/request', { pageUrl: 'http://127.0.0.1:9/x', t: -1 })).toContain('t: expected seconds from 0');
  });
});

describe('export and import', () => {
  it('an export imported into a fresh profile gives the same records and the same summary; a bad file changes nothing', async () => {
    const c = await open('export0000000001');
    await ask('mark/put', { caseId: c.id, mark: mark('e1', 100, 1) });
    await ask('mark/put', { caseId: c.id, mark: { ...mark('e2', 300, 1), kind: 'landmark-span', dimension: undefined } });
    await ask('case/annotate', { caseId: c.id, notes: '<b>invented</b> note', status: 'explained', tags: ['dusk'] });
    const all = await ask<{ fileName: string; text: string }>('cases/export', {});
    expect(all.fileName).toMatch(/^clip-caliper-\d+-cases-\d{4}-\d{2}-\d{2}\.json$/);
    const one = await ask<{ fileName: string; text: string }>('cases/export', { caseIds: [c.id] });
    expect(one.fileName).toMatch(/^clip-caliper-export00-\d{4}-\d{2}-\d{2}\.json$/);
    const exported = (JSON.parse(all.text) as { cases: CaseRecord[] }).cases;

    const fresh = await launchWithExtension(E2E_DIST);
    try {
      const ask2 = <T>(type: string, payload: unknown = {}) => sendAsPopup(fresh, type, payload) as Promise<T>;
      const bad = JSON.parse(all.text);
      bad.cases[bad.cases.length - 1].marks = 'none';
      const refused = await ask2('cases/import', { text: JSON.stringify(bad) }).then(
        () => 'imported',
        (e: Error) => e.message,
      );
      expect(refused).toMatch(/^file\.cases\[\d+\]\.marks: expected a list$/);
      expect((await ask2<{ cases: unknown[] }>('cases/list')).cases).toEqual([]);

      const result = await ask2<{ added: string[]; merged: string[] }>('cases/import', { text: all.text });
      expect(result.added.sort()).toEqual(exported.map((x) => x.id).sort());
      const again = JSON.parse((await ask2<{ text: string }>('cases/export', {})).text) as { cases: CaseRecord[] };
      const byId = (xs: CaseRecord[]) => Object.fromEntries(xs.map((x) => [x.id, x]));
      expect(byId(again.cases)).toEqual(byId(exported));
      // the same summary text from either side (analysis is seeded, so byte for byte)
      const mine = exported.find((x) => x.id === c.id)!;
      const theirs = again.cases.find((x) => x.id === c.id)!;
      const text = (x: CaseRecord) => summaryText(x, analyseCase(x, { draws: 500, seriesDraws: 500, seed: 1 }), { format: 'text', system: 'metric', toolVersion: '0.1.0' });
      expect(text(theirs)).toBe(text(mine));

      // importing the same file again merges and changes nothing; an edited copy keeps both versions
      expect((await ask2<{ merged: string[] }>('cases/import', { text: all.text })).merged.sort()).toEqual(result.added.sort());
      const edited = { ...mine, notes: 'edited elsewhere (invented)', updatedAt: mine.updatedAt + 1000 };
      await ask2('cases/import', { text: JSON.stringify({ format: 'clip-caliper-case', schema: 2, case: edited }) });
      const merged = await ask2<CaseRecord>('case/get', { caseId: c.id });
      expect(merged.notes).toBe('edited elsewhere (invented)');
      expect(merged.history.map((h) => h.notes)).toEqual(['<b>invented</b> note']);
    } finally {
      await fresh.close();
    }
  });
});

/*
 * chrome.runtime.reload() of an unpacked extension in headless Chromium leaves its pages blocked
 * (net::ERR_BLOCKED_BY_CLIENT) rather than reloading it, so the closest real check here is a
 * restart of the whole browser on the same profile: the worker, every page and storage.session
 * go away; local storage must keep every case.
 */
describe('a browser restart on the same profile', () => {
  it('keeps every case; a delete can no longer be undone (session storage is gone, as documented)', async () => {
    const profile = mkdtempSync(join(tmpdir(), 'clip-caliper-restart-'));
    const launch = () =>
      chromium.launchPersistentContext(profile, {
        executablePath: chromiumPath(),
        headless: true,
        args: [`--disable-extensions-except=${E2E_DIST}`, `--load-extension=${E2E_DIST}`, ...CHROMIUM_ARGS],
      });
    const talk = async (context: BrowserContext) => {
      const worker = context.serviceWorkers()[0] ?? (await context.waitForEvent('serviceworker', { timeout: 30_000 }));
      const page = await context.newPage();
      await page.goto(`chrome-extension://${new URL(worker.url()).host}/extension/options/index.html`);
      return async <T>(type: string, payload: unknown): Promise<T> => {
        const r = (await page.evaluate(([t, pl]) => chrome.runtime.sendMessage({ channel: 'clip-caliper', type: t, payload: pl }), [type, payload] as const)) as { ok: boolean; value: T; error?: string };
        if (!r.ok) throw new Error(r.error);
        return r.value;
      };
    };
    try {
      const first = await launch();
      const send = await talk(first);
      await send('case/open', { caseId: 'restart000000001', video: video('restart') });
      await send('mark/put', { caseId: 'restart000000001', mark: mark('r1', 10) });
      const before = await send<CaseRecord>('case/annotate', { caseId: 'restart000000001', status: 'explained', tags: ['kept'] });
      await send('case/open', { caseId: 'restart000000002', video: video('restart-2') });
      await send('case/delete', { caseId: 'restart000000002' });
      await first.close();

      const second = await launch();
      try {
        const send2 = await talk(second);
        expect(await send2('case/get', { caseId: 'restart000000001' })).toEqual(before);
        const refused = await send2('case/undelete', { caseId: 'restart000000002' }).then(
          () => 'brought back',
          (e: Error) => e.message,
        );
        expect(refused).toContain('nothing to bring back');
      } finally {
        await second.close();
      }
    } finally {
      rmSync(profile, { recursive: true, force: true });
    }
  });
});

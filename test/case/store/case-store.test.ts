import { describe, expect, it } from 'vitest';
import type { CaseRecord } from '../../../src/case/schema';
import { StorageFullError } from '../../../src/case/store-policy';
import { MemoryArea } from './memory-area';
import { mark, restartWorker, rig, video } from './setup';

/*
 * The case store's rules over an in-memory area that behaves as chrome.storage.local is
 * documented to (memory-area.ts). test/e2e/case-store.test.ts checks the same store in Chromium;
 * these reach the cases a browser cannot stage on demand: interleavings, a failure between two
 * calls, a quota of a few kilobytes. Every page, title and figure is invented.
 */

describe('one queue per case', () => {
  it('concurrent edits of one case all land, over an area whose calls really interleave', async () => {
    const local = new MemoryArea({ jitterMs: 3 });
    const { store } = rig({ local });
    await store.openCase('same', video('same'), '0.1.0');
    await Promise.all(Array.from({ length: 20 }, (_, i) => store.putMark('same', mark(`m${i}`, 10 + i))));
    const got = await store.readCase('same');
    expect(got!.marks.map((m) => m.id).sort()).toEqual(Array.from({ length: 20 }, (_, i) => `m${i}`).sort());
  });

  it('the same interleaving without the queue loses marks (the lost update the queue is there for)', async () => {
    // control: two stores over one area stand for two unqueued writers; this shows the area's
    // jitter does interleave read-modify-writes, so the test above could fail
    const local = new MemoryArea({ jitterMs: 3 });
    const writers = Array.from({ length: 20 }, () => rig({ local }).store);
    await writers[0]!.openCase('race', video('race'), '0.1.0');
    await Promise.all(writers.map((s, i) => s.putMark('race', mark(`m${i}`, 10 + i))));
    expect((await writers[0]!.readCase('race'))!.marks.length).toBeLessThan(20);
  });

  it('an edit of another case is not held up by a case whose read is stuck', async () => {
    const local = new MemoryArea();
    const { store } = rig({ local });
    await store.openCase('slow', video('slow'), '0.1.0');
    await store.openCase('fast', video('fast'), '0.1.0');
    const release = local.hold('case:slow');
    const stuck = store.putMark('slow', mark('s1', 10));
    const fast = await store.putMark('fast', mark('f1', 10)); // completes while 'slow' waits
    expect(fast.marks.map((m) => m.id)).toEqual(['f1']);
    let slowDone = false;
    void stuck.then(() => (slowDone = true));
    await new Promise((ok) => setTimeout(ok, 5));
    expect(slowDone).toBe(false);
    release();
    expect((await stuck).marks.map((m) => m.id)).toEqual(['s1']);
  });

  it('a failed write rejects its caller and the next edit of that case still runs', async () => {
    const local = new MemoryArea();
    const { store } = rig({ local });
    await store.openCase('f', video('f'), '0.1.0');
    local.failNext('set');
    const failed = store.putMark('f', mark('lost', 10));
    const next = store.putMark('f', mark('kept', 20));
    await expect(failed).rejects.toThrow('invented set failure');
    expect((await next).marks.map((m) => m.id)).toEqual(['kept']);
  });
});

describe('edits', () => {
  it('open keeps the marks and refreshes a late title; a mark with an unknown field is stored without it', async () => {
    const { store, local } = rig();
    await store.openCase('o', { ...video('o'), pageTitle: '' }, '0.1.0');
    await store.putMark('o', { ...mark('m1', 50), junk: { deep: [1] } } as never);
    const again = await store.openCase('o', video('o'), '0.1.0');
    expect(again.video.pageTitle).toBe('Invented clip o');
    expect(again.marks.map((m) => m.id)).toEqual(['m1']);
    const stored = local.snapshot()['case:o'] as { marks: Record<string, unknown>[] };
    expect(Object.hasOwn(stored.marks[0]!, 'junk')).toBe(false);
  });

  it('a mark on a case never opened, or an annotation of a missing case, fails naming the case', async () => {
    const { store } = rig();
    await expect(store.putMark('nope', mark('m', 1))).rejects.toThrow('no case nope: open it first');
    await expect(store.annotateCase('nope', { notes: 'x' })).rejects.toThrow(/^no case nope \(deleted, or set aside/);
    await expect(store.annotateCase('', { notes: 'x' })).rejects.toThrow('caseId: expected the text of a case id (1 to 200 characters)');
  });

  it("several marks land in one write (a follow's accepted frames); a bad one is named by its place and nothing is written", async () => {
    const { store, local } = rig();
    await store.openCase('f', video('f'), '0.1.0');
    await store.putMark('f', mark('hand', 50, 1));
    const sets = local.callsOf('set');
    const added = await store.putMarks('f', [mark('f1', 52, 1.04), mark('f2', 54, 1.08), mark('f3', 56, 1.12)]);
    expect(added.marks.map((m) => m.id)).toEqual(['hand', 'f1', 'f2', 'f3']);
    expect(local.callsOf('set')).toBe(sets + 1);
    const before = local.snapshot()['case:f'];
    await expect(store.putMarks('f', [mark('f4', 58, 1.16), { ...mark('f5', 60, 1.2), edgeSigmaPx: 99 }])).rejects.toThrow('marks[1].edgeSigmaPx: expected 0 to 50, got 99');
    await expect(store.putMarks('f', [])).rejects.toThrow('marks: expected a list of one or more marks');
    expect(local.snapshot()['case:f']).toEqual(before);
  });

  it('annotate refuses bad values naming the field and its range, before touching storage', async () => {
    const { store, local } = rig();
    await store.openCase('a', video('a'), '0.1.0');
    const sets = local.callsOf('set');
    await expect(store.annotateCase('a', { status: 'closed' })).rejects.toThrow('status: expected one of open, explained, second-look, got "closed"');
    await expect(store.annotateCase('a', { notes: 'n'.repeat(20_001) })).rejects.toThrow('notes: expected 0 to 20000 characters, got 20001');
    expect(local.callsOf('set')).toBe(sets);
  });
});

describe('every read validates: a bad record is set aside whole, never lost', () => {
  const bad = () => ({ ...video('bad'), width: -5 });

  it('read of a corrupt record: quarantined under quarantine:<key> with the first bad field, and reads as absent', async () => {
    const { store, local } = rig();
    const good = await store.openCase('bad1', video('bad1'), '0.1.0');
    const corrupt = { ...good, video: bad() };
    local.plant({ 'case:bad1': corrupt });
    expect(await store.readCase('bad1')).toBeNull();
    const after = local.snapshot();
    expect(after['case:bad1']).toBeUndefined();
    expect(after['quarantine:case:bad1']).toEqual({ key: 'case:bad1', reason: 'case.video.width: expected 1 to 20000, got -5', quarantinedAt: expect.any(Number), raw: corrupt });
  });

  it('a record under another id\'s key is set aside with that reason (src/case/stored.ts)', async () => {
    const { store, local } = rig();
    const a = await store.openCase('keyid1', video('k'), '0.1.0');
    local.plant({ 'case:keyid2': a });
    const list = await store.listCases();
    expect(list.cases.map((c) => c.id)).toEqual(['keyid1']);
    expect(list.quarantined).toEqual([
      { key: 'case:keyid2', quarantineKey: 'quarantine:case:keyid2', reason: 'case.id: expected "keyid2", the id its storage key "case:keyid2" names, got "keyid1"', quarantinedAt: expect.any(Number) },
    ]);
    expect((local.snapshot()['quarantine:case:keyid2'] as { raw: unknown }).raw).toEqual(a);
  });

  it('a second bad record under a key already quarantined gets a key of its own; the first is kept', async () => {
    const { store, local, clock } = rig();
    local.plant({ 'case:twice': 'first junk' });
    await store.readCase('twice');
    clock.t += 1000;
    local.plant({ 'case:twice': 'second junk' });
    await store.readCase('twice');
    const q = local.snapshot();
    expect((q['quarantine:case:twice'] as { raw: unknown }).raw).toBe('first junk');
    expect((q[`quarantine:case:twice~${clock.t}`] as { raw: unknown }).raw).toBe('second junk');
  });

  it('a failure between the copy and the removal leaves both, never neither', async () => {
    const { store, local } = rig();
    local.plant({ 'case:half': 'junk' });
    local.failNext('remove');
    await expect(store.readCase('half')).rejects.toThrow('invented remove failure');
    const s = local.snapshot();
    expect(s['case:half']).toBe('junk');
    expect((s['quarantine:case:half'] as { raw: unknown }).raw).toBe('junk');
  });

  it('listing, the page\'s cases and export all set bad records aside and go on with the good ones', async () => {
    const { store, local } = rig();
    await store.openCase('ok', video('page'), '0.1.0');
    local.plant({ 'case:junk1': 'not a record', 'case:junk2': { schema: 3 } });
    const forPage = await store.casesForPage('http://127.0.0.1:9/invented-page#t=3');
    expect(forPage.cases.map((c) => c.id)).toEqual(['ok']);
    expect(forPage.unreadable).toBe(2);
    expect(Object.keys(local.snapshot()).sort()).toEqual(['case:ok', 'quarantine:case:junk1', 'quarantine:case:junk2']);
    const list = await store.listCases();
    expect(list.quarantined.map((q) => q.key).sort()).toEqual(['case:junk1', 'case:junk2']);
    expect(list.quarantined.find((q) => q.key === 'case:junk1')!.reason).toBe('case: expected an object');
  });

  it('the sender check reads a case\'s page without moving anything, even a bad record', async () => {
    const { store, local } = rig();
    await store.openCase('p', video('p'), '0.1.0');
    local.plant({ 'case:q': 'junk' });
    expect(await store.casePageOf('p')).toBe('http://127.0.0.1:9/invented-p');
    expect(await store.casePageOf('q')).toBeNull();
    expect(await store.casePageOf('absent')).toBeNull();
    expect(local.snapshot()['case:q']).toBe('junk');
  });

  it('a version 1 record is migrated on read and not written back until the next edit', async () => {
    const { readFileSync } = await import('node:fs');
    const v1 = JSON.parse(readFileSync('test/case/fixtures/v1/marked-case.json', 'utf8')) as CaseRecord;
    const { store, local } = rig();
    local.plant({ [`case:${v1.id}`]: v1 });
    const read = await store.readCase(v1.id);
    expect(read).toMatchObject({ status: 'open', tags: [], history: [] });
    expect(read!.marks).toEqual(v1.marks);
    expect(local.snapshot()[`case:${v1.id}`]).toEqual(v1);
  });
});

describe('the quota', () => {
  /** What chrome's getBytesInUse counts for these items: key plus JSON, by Node's own UTF-8 count. */
  const weigh = (items: Record<string, unknown>) => Object.entries(items).reduce((n, [k, v]) => n + Buffer.byteLength(k) + Buffer.byteLength(JSON.stringify(v)), 0);

  it('usage is the area\'s own count against its own quota, with the warning past 90 %', async () => {
    const local = new MemoryArea({ quotaBytes: 50_000 });
    const { store } = rig({ local });
    await store.openCase('u', video('u'), '0.1.0');
    const usage = await store.storageUsage();
    expect(usage).toEqual({ bytesInUse: weigh(local.snapshot()), quotaBytes: 50_000, nearLimit: false });
    local.plant({ filler: 'f'.repeat(45_000) });
    expect((await store.storageUsage()).nearLimit).toBe(true);
  });

  it('an area that does not count is weighed by the store the same way; no quota stated means Chrome\'s 10 485 760', async () => {
    const local = new MemoryArea({ counts: false });
    const { store } = rig({ local });
    await store.openCase('w', video('w'), '0.1.0');
    local.plant({ 'é€': { s: 'x€' } });
    expect(await store.storageUsage()).toEqual({ bytesInUse: weigh(local.snapshot()), quotaBytes: 10_485_760, nearLimit: false });
  });

  it('a write that would not fit fails naming the case and sizes, before any set; everything saved stays; a small edit still fits', async () => {
    const local = new MemoryArea({ quotaBytes: 20_000 });
    const { store } = rig({ local });
    await store.openCase('q', video('q'), '0.1.0');
    await store.putMark('q', mark('k1', 10));
    local.plant({ filler: 'f'.repeat(20_000 - local.usedBytes() - 4000 - 'filler'.length - 2) });
    const before = local.snapshot();
    const sets = local.callsOf('set');
    const err = await store.annotateCase('q', { notes: 'n'.repeat(10_000) }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StorageFullError);
    expect((err as Error).message).toMatch(/^case q \(Invented clip q\): not saved, storage is full: it needs \d+ more bytes but only \d+ of 20000 are free/);
    const file = JSON.stringify({ format: 'clip-caliper-case', schema: 3, case: { ...(await store.readCase('q'))!, id: 'q2', notes: 'n'.repeat(10_000) } });
    await expect(store.importCases(file)).rejects.toThrow('import of case q2: not saved, storage is full');
    expect(local.callsOf('set')).toBe(sets); // refused before the area was asked
    expect(local.snapshot()).toEqual(before);
    await store.putMark('q', mark('k2', 20));
    expect((await store.readCase('q'))!.marks).toHaveLength(2);
  });

  it('our weighing of a write is never below what the area counts for it', async () => {
    const local = new MemoryArea();
    const { store } = rig({ local });
    const before = local.usedBytes();
    await store.openCase('é€', { ...video('w'), pageTitle: 'é€\u{1F6E9}'.repeat(50) }, '0.1.0');
    const full = new MemoryArea({ quotaBytes: local.usedBytes() - before - 1 }); // one byte short
    await expect(rig({ local: full }).store.openCase('é€', { ...video('w'), pageTitle: 'é€\u{1F6E9}'.repeat(50) }, '0.1.0')).rejects.toThrow(StorageFullError);
  });

  it('a record that cannot be set aside for want of room stays where it is and is still reported', async () => {
    const local = new MemoryArea({ quotaBytes: 3_000 });
    const { store } = rig({ local });
    local.plant({ 'case:stuck': { junk: 'j'.repeat(1500) } });
    const list = await store.listCases();
    expect(list.quarantined).toHaveLength(1);
    expect(list.quarantined[0]).toMatchObject({ key: 'case:stuck', quarantineKey: 'case:stuck' });
    expect(list.quarantined[0]!.reason).toContain('(not moved: setting aside the unreadable record case:stuck: not saved, storage is full');
    expect(local.snapshot()['case:stuck']).toEqual({ junk: 'j'.repeat(1500) });
  });
});

describe('the log\'s index', () => {
  it('after one full read, listings follow this store\'s writes and others\' without reading everything again', async () => {
    const { store, local } = rig();
    await store.openCase('i1', video('i1'), '0.1.0');
    expect((await store.listCases()).cases.map((c) => c.id)).toEqual(['i1']);
    const fullReads = local.callsOf('getAll');
    await store.annotateCase('i1', { notes: 'looked again' });
    // another view writes a case: the background hears it through storage.onChanged
    const other = rig({ local }).store;
    const written = await other.openCase('i2', video('i2'), '0.1.0');
    store.noteChange('case:i2', written);
    const list = await store.listCases();
    expect(list.cases.map((c) => [c.id, c.notes]).sort()).toEqual([
      ['i1', 'looked again'],
      ['i2', ''],
    ]);
    expect(local.callsOf('getAll')).toBe(fullReads);
  });

  it('a bad value arriving drops the index, so the next listing takes the long way and sets it aside', async () => {
    const { store, local } = rig();
    await store.listCases();
    local.plant({ 'case:late': 'junk' });
    store.noteChange('case:late', 'junk');
    expect((await store.listCases()).quarantined.map((q) => q.key)).toEqual(['case:late']);
  });
});

describe('a worker restart', () => {
  it('a new store over the same areas finds every case, with its queues and index fresh', async () => {
    const r = rig();
    await r.store.openCase('r', video('r'), '0.1.0');
    await r.store.putMark('r', mark('r1', 10));
    const again = restartWorker(r);
    expect((await again.store.readCase('r'))!.marks.map((m) => m.id)).toEqual(['r1']);
    expect((await again.store.listCases()).cases.map((c) => c.id)).toEqual(['r']);
  });
});

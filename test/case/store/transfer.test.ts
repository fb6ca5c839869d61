import { describe, expect, it } from 'vitest';
import { parseCaseFileAll } from '../../../src/case/casefile';
import type { CaseRecord } from '../../../src/case/schema';
import { mark, rig, video } from './setup';

/*
 * Import and export through the store. The merge rule itself is importing.ts's (tested in
 * test/case/importing.test.ts); here: a file is validated whole before anything is touched, a
 * merge keeps both versions with the newer in front, the write is one call holding the queues of
 * the cases it names, and an export reads back (through the project's own reader, and as plain
 * JSON) to the records stored. Every page, title and note is invented.
 */
const fileOf = (c: CaseRecord | CaseRecord[]) =>
  JSON.stringify(Array.isArray(c) ? { format: 'clip-caliper-case', schema: 3, cases: c } : { format: 'clip-caliper-case', schema: 3, case: c });

describe('import', () => {
  it('a new id is added; the same id keeps both versions, the newer by updatedAt in front', async () => {
    const r = rig();
    await r.store.openCase('m', video('m'), '0.1.0');
    const mine = await r.store.annotateCase('m', { notes: 'mine (invented)' });
    const theirs = { ...mine, notes: 'edited elsewhere (invented)', updatedAt: mine.updatedAt + 1000 };
    const other = { ...mine, id: 'n', video: video('n'), notes: '' };
    expect(await r.store.importCases(fileOf([theirs, other]))).toEqual({ added: ['n'], merged: ['m'] });
    const merged = (await r.store.readCase('m'))!;
    expect(merged.notes).toBe('edited elsewhere (invented)');
    expect(merged.history.map((h) => h.notes)).toEqual(['mine (invented)']);
    expect((await r.store.readCase('n'))!.id).toBe('n');

    // an older copy goes behind: what the user sees stays in front, nothing is lost
    const older = { ...mine, notes: 'older copy (invented)', updatedAt: mine.updatedAt - 1000 };
    await r.store.importCases(fileOf(older));
    const after = (await r.store.readCase('m'))!;
    expect(after.notes).toBe('edited elsewhere (invented)');
    expect(after.history.map((h) => h.notes)).toEqual(['mine (invented)', 'older copy (invented)']);
  });

  it('importing the same file again merges and writes nothing', async () => {
    const r = rig();
    await r.store.openCase('same', video('same'), '0.1.0');
    const c = (await r.store.readCase('same'))!;
    const sets = r.local.callsOf('set');
    expect(await r.store.importCases(fileOf(c))).toEqual({ added: [], merged: ['same'] });
    expect(r.local.callsOf('set')).toBe(sets);
  });

  it('a file bad anywhere changes nothing and names the field', async () => {
    const r = rig();
    await r.store.openCase('keep', video('keep'), '0.1.0');
    const good = (await r.store.readCase('keep'))!;
    const before = r.local.snapshot();
    const bad = [{ ...good, id: 'fresh' }, { ...good, id: 'worse', marks: 'none' }];
    await expect(r.store.importCases(fileOf(bad as never))).rejects.toThrow('file.cases[1].marks: expected a list');
    await expect(r.store.importCases(42)).rejects.toThrow('text: expected the text of a case file');
    expect(r.local.snapshot()).toEqual(before);
  });

  it('several cases go in one storage call', async () => {
    const r = rig();
    await r.store.openCase('base', video('base'), '0.1.0');
    const base = (await r.store.readCase('base'))!;
    const sets = r.local.calls.filter((c) => c.kind === 'set').length;
    await r.store.importCases(fileOf(['i1', 'i2', 'i3'].map((id) => ({ ...base, id }))));
    const newSets = r.local.calls.filter((c) => c.kind === 'set').slice(sets);
    expect(newSets).toEqual([{ kind: 'set', keys: ['case:i1', 'case:i2', 'case:i3'] }]);
  });

  it('an import and a mark on the same case at once: both land (the import holds the case\'s queue)', async () => {
    const r = rig();
    await r.store.openCase('busy', video('busy'), '0.1.0');
    const c = await r.store.putMark('busy', mark('first', 10));
    const incoming = { ...c, notes: 'imported (invented)', updatedAt: c.updatedAt + 10_000 };
    await Promise.all([r.store.importCases(fileOf(incoming)), r.store.putMark('busy', mark('second', 20))]);
    const got = (await r.store.readCase('busy'))!;
    // whichever ran first, the mark is in the front record or in the kept version, never lost
    const everywhere = [got, ...got.history].flatMap((v) => v.marks.map((m) => m.id));
    expect(everywhere).toContain('second');
    expect([got.notes, ...got.history.map((h) => h.notes)]).toContain('imported (invented)');
  });

  it('a bad stored record is set aside first, then the import adds the good one', async () => {
    const r = rig();
    await r.store.openCase('src', video('src'), '0.1.0');
    const good = (await r.store.readCase('src'))!;
    r.local.plant({ 'case:clash': 'junk' });
    expect(await r.store.importCases(fileOf({ ...good, id: 'clash' }))).toEqual({ added: ['clash'], merged: [] });
    expect(r.local.snapshot()['quarantine:case:clash']).toMatchObject({ raw: 'junk' });
  });
});

describe('export', () => {
  it('every case, oldest first, reads back to the stored records; named by count and date; the version written is the tool\'s', async () => {
    const r = rig();
    await r.store.openCase('e2', video('e2'), '0.1.0');
    r.clock.t += 1;
    await r.store.openCase('e1', video('e1'), '0.1.0');
    await r.store.putMark('e1', mark('x', 10));
    r.local.plant({ 'case:junk': 'junk' });
    const out = await r.store.exportCases();
    expect(out.fileName).toBe('clip-caliper-2-cases-2026-12-02.json');
    const parsed = JSON.parse(out.text) as { exportedBy: string; cases: CaseRecord[] };
    expect(parsed.exportedBy).toBe('Clip Caliper 9.9.9-invented');
    expect(parsed.cases.map((c) => c.id)).toEqual(['e2', 'e1']);
    expect(parseCaseFileAll(out.text)).toEqual([await r.store.readCase('e2'), await r.store.readCase('e1')]);
    expect(r.local.snapshot()['quarantine:case:junk']).toMatchObject({ raw: 'junk' }); // set aside, not exported
  });

  it('the listed cases only; one case goes out as a single-case file; a missing or bad id fails naming it', async () => {
    const r = rig();
    await r.store.openCase('only0000', video('only'), '0.1.0');
    const one = await r.store.exportCases(['only0000']);
    expect(one.fileName).toBe('clip-caliper-only0000-2026-12-02.json');
    expect((JSON.parse(one.text) as { case: CaseRecord }).case.id).toBe('only0000');
    await expect(r.store.exportCases(['only0000', 'absent'])).rejects.toThrow(/^no case absent/);
    await expect(r.store.exportCases([])).rejects.toThrow('caseIds: expected a list of case ids, or none for every case');
    await expect(rig().store.exportCases()).rejects.toThrow('no cases to export');
  });

  it('an export imported into an empty store gives the same records', async () => {
    const r = rig();
    await r.store.openCase('a', video('a'), '0.1.0');
    await r.store.putMark('a', mark('a1', 10));
    await r.store.annotateCase('a', { notes: '<b>invented</b> note', status: 'explained', tags: ['dusk'] });
    await r.store.openCase('b', video('b'), '0.1.0');
    const all = await r.store.exportCases();
    const fresh = rig();
    expect((await fresh.store.importCases(all.text)).added.sort()).toEqual(['a', 'b']);
    expect(JSON.parse((await fresh.store.exportCases()).text)).toEqual(JSON.parse(all.text));
  });
});

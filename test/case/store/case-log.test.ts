import { describe, expect, it } from 'vitest';
import { MemoryArea } from './memory-area';
import { mark, restartWorker, rig, video } from './setup';

/*
 * Delete with undo: the deleted copy lives in the session area, which chrome.storage.session
 * keeps "in memory ... not persisted to disk" and clears when the browser restarts (chrome.storage
 * API reference). A worker restart is a new store over the same two areas; a browser restart is a
 * new store over the same local area and an empty session area. Every page and title is invented.
 */
describe('delete and undo', () => {
  it('a deleted case leaves the list, comes back whole after a worker restart, and undo is then spent', async () => {
    const r = rig();
    await r.store.openCase('d', video('d'), '0.1.0');
    const saved = await r.store.putMark('d', mark('d1', 10));
    r.clock.t += 5000;
    await r.store.deleteCase('d');
    expect(await r.store.readCase('d')).toBeNull();
    expect((await r.store.listCases()).cases).toEqual([]);
    expect(await r.store.listDeleted()).toEqual({ cases: [{ id: 'd', title: 'Invented clip d', deletedAt: r.clock.t }] });

    const again = restartWorker(r);
    expect(await again.store.undeleteCase('d')).toEqual(saved);
    expect(await again.store.readCase('d')).toEqual(saved);
    expect((await again.store.listDeleted()).cases).toEqual([]);
    await expect(again.store.undeleteCase('d')).rejects.toThrow('case d: nothing to bring back (a deleted case is kept only until the browser closes)');
  });

  it('after a browser restart (session area gone) every case is kept and a delete can no longer be undone', async () => {
    const r = rig();
    await r.store.openCase('kept', video('kept'), '0.1.0');
    const before = await r.store.annotateCase('kept', { status: 'explained', tags: ['kept'] });
    await r.store.openCase('gone', video('gone'), '0.1.0');
    await r.store.deleteCase('gone');
    const restarted = rig({ local: r.local, session: new MemoryArea() });
    expect(await restarted.store.readCase('kept')).toEqual(before);
    await expect(restarted.store.undeleteCase('gone')).rejects.toThrow('nothing to bring back');
  });

  it('undo refuses when a case with that id exists again, and changes neither copy', async () => {
    const r = rig();
    await r.store.openCase('x', video('x'), '0.1.0');
    await r.store.putMark('x', mark('old', 10));
    await r.store.deleteCase('x');
    const fresh = await r.store.openCase('x', video('x'), '0.1.0'); // the video measured again
    await expect(r.store.undeleteCase('x')).rejects.toThrow('case x: not brought back, a case with this id exists again');
    expect(await r.store.readCase('x')).toEqual(fresh);
    expect((await r.store.listDeleted()).cases.map((c) => c.id)).toEqual(['x']);
  });

  it('deleting again keeps the latest copy: undo brings back the latest delete', async () => {
    const r = rig();
    await r.store.openCase('twice', video('t'), '0.1.0');
    await r.store.deleteCase('twice');
    const second = await r.store.openCase('twice', video('t'), '0.1.0');
    await r.store.putMark('twice', mark('m2', 10));
    const latest = await r.store.readCase('twice');
    await r.store.deleteCase('twice');
    expect(await r.store.undeleteCase('twice')).toEqual(latest);
    expect(latest).not.toEqual(second);
  });

  it('when the undo copy cannot be saved the case is not deleted', async () => {
    const r = rig();
    await r.store.openCase('s', video('s'), '0.1.0');
    r.session.failNext('set', 'invented session full');
    await expect(r.store.deleteCase('s')).rejects.toThrow('case s: not deleted, the copy kept for undo could not be saved (invented session full); export it, then try again');
    expect(await r.store.readCase('s')).not.toBeNull();
  });

  it('the list of deleted cases is newest first and names a case by its title, else its page', async () => {
    const r = rig();
    await r.store.openCase('a', { ...video('a'), pageTitle: '' }, '0.1.0');
    await r.store.openCase('b', video('b'), '0.1.0');
    await r.store.deleteCase('a');
    r.clock.t += 10;
    await r.store.deleteCase('b');
    expect((await r.store.listDeleted()).cases).toEqual([
      { id: 'b', title: 'Invented clip b', deletedAt: r.clock.t },
      { id: 'a', title: 'http://127.0.0.1:9/invented-a', deletedAt: r.clock.t - 10 },
    ]);
  });
});

describe('the listing', () => {
  it('lists newest first with the log\'s fields, and the usage', async () => {
    const r = rig();
    await r.store.openCase('old', video('old'), '0.1.0');
    r.clock.t += 1000;
    await r.store.openCase('new', video('new'), '0.1.0');
    await r.store.putMark('new', mark('n1', 10, 2));
    const list = await r.store.listCases();
    expect(list.cases.map((c) => [c.id, c.markCount, c.timestamps, c.site])).toEqual([
      ['new', 1, [2], '127.0.0.1:9'],
      ['old', 0, [], '127.0.0.1:9'],
    ]);
    expect(list.usage.bytesInUse).toBe(r.local.usedBytes());
  });
});

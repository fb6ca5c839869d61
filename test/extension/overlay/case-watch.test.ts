import { describe, expect, it } from 'vitest';
import { watchCase, type CaseWatchDeps } from '../../../extension/overlay/case-watch';
import { newCase } from '../../../src/case/marks';
import { caseKey, type CaseRecord } from '../../../src/case/schema';

/*
 * The overlay follows its stored case while the popup or another tab changes it. The storage change
 * event is the one documented for the WebExtensions storage API (storage.onChanged: a map of the
 * keys changed to their old and new values, and the area's name, "local" here); the reads back may
 * settle in any order, and only the latest counts (common practice for racing replies).
 */
type Listener = (changes: Record<string, { newValue?: unknown }>, area: string) => void;

function fakeBrowser() {
  const listeners = new Set<Listener>();
  const reads: { caseId: string; settle: (c: CaseRecord | null) => void }[] = [];
  const deps: CaseWatchDeps = {
    onChanged: { addListener: (fn) => void listeners.add(fn), removeListener: (fn) => void listeners.delete(fn) },
    read: (caseId) => new Promise((settle) => reads.push({ caseId, settle })),
  };
  // a removed key comes with its old value only
  const change = (key: string, area = 'local', removed = false) => {
    for (const fn of listeners) fn({ [key]: removed ? {} : { newValue: {} } }, area);
  };
  return { deps, listeners, reads, change };
}

const version = (n: number): CaseRecord => ({ ...newCase('c1', { pageUrl: 'http://127.0.0.1/x', pageTitle: 'invented', src: '', width: 640, height: 360, duration: 2 }, '0.1.0', n), notes: `version ${n}` });
const tick = () => new Promise((r) => setTimeout(r, 0));

describe('watchCase', () => {
  it("reads its own case back when its key changes in local storage, and nothing else's", async () => {
    const b = fakeBrowser();
    const seen: CaseRecord[] = [];
    watchCase('c1', (c) => seen.push(c), new AbortController().signal, b.deps);
    b.change(caseKey('c2'));
    b.change(caseKey('c1'), 'sync');
    b.change(caseKey('c1'), 'local', true); // removed: nothing to follow
    expect(b.reads).toHaveLength(0);
    b.change(caseKey('c1'));
    expect(b.reads.map((r) => r.caseId)).toEqual(['c1']);
    b.reads[0]!.settle(version(1));
    await tick();
    expect(seen.map((c) => c.notes)).toEqual(['version 1']);
  });

  it('takes only the latest read when the replies arrive out of order', async () => {
    const b = fakeBrowser();
    const seen: string[] = [];
    watchCase('c1', (c) => seen.push(c.notes), new AbortController().signal, b.deps);
    b.change(caseKey('c1'));
    b.change(caseKey('c1'));
    b.reads[1]!.settle(version(2));
    await tick();
    b.reads[0]!.settle(version(1));
    await tick();
    expect(seen).toEqual(['version 2']);
  });

  it('stops listening when its signal aborts, and drops a read still on its way', async () => {
    const b = fakeBrowser();
    const ac = new AbortController();
    const seen: string[] = [];
    watchCase('c1', (c) => seen.push(c.notes), ac.signal, b.deps);
    b.change(caseKey('c1'));
    ac.abort();
    expect(b.listeners.size).toBe(0);
    b.reads[0]!.settle(version(1));
    await tick();
    expect(seen).toEqual([]);
  });

  it('a failed or empty read changes nothing', async () => {
    const b = fakeBrowser();
    const seen: string[] = [];
    const failing: CaseWatchDeps = { ...b.deps, read: () => Promise.reject(new Error('worker asleep')) };
    watchCase('c1', (c) => seen.push(c.notes), new AbortController().signal, failing);
    b.change(caseKey('c1'));
    watchCase('c1', (c) => seen.push(c.notes), new AbortController().signal, b.deps);
    b.change(caseKey('c1'));
    b.reads[0]!.settle(null);
    await tick();
    expect(seen).toEqual([]);
  });
});

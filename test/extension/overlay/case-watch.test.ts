import { describe, expect, it } from 'vitest';
import { watchCase, type CaseWatchDeps } from '../../../extension/overlay/case-watch';
import type { NoticeKind, NoticeMap } from '../../../extension/shared/messages';
import { newCase } from '../../../src/case/marks';
import type { CaseRecord } from '../../../src/case/schema';

/*
 * The overlay follows its stored case while the popup or another tab changes it, from the
 * background's `case/changed` notices (shared/messages.ts NoticeMap; background/announce.ts sends
 * them in the order the changes were stored). A stand-in for subscribe() delivers notices as the
 * runtime would: to every handler of that kind, until its signal aborts.
 */
function fakeNotices() {
  const handlers: { kind: NoticeKind; fn: (p: never) => void; signal: AbortSignal }[] = [];
  const deps: CaseWatchDeps = {
    subscribe: (kind, fn, signal) => {
      if (!signal.aborted) handlers.push({ kind, fn: fn as (p: never) => void, signal });
    },
  };
  const announce = <K extends NoticeKind>(kind: K, payload: NoticeMap[K]) => {
    for (const h of handlers) if (h.kind === kind && !h.signal.aborted) (h.fn as (p: NoticeMap[K]) => void)(payload);
  };
  return { deps, handlers, announce };
}

const version = (id: string, n: number): CaseRecord => ({ ...newCase(id, { pageUrl: 'http://127.0.0.1/x', pageTitle: 'invented', src: '', width: 640, height: 360, duration: 2 }, '0.1.0', n), notes: `version ${n}` });

describe('watchCase', () => {
  it("takes each announced version of its own case, in order, and nothing of another case's", () => {
    const b = fakeNotices();
    const seen: string[] = [];
    watchCase('c1', (c) => seen.push(c.notes), new AbortController().signal, b.deps);
    expect(b.handlers.map((h) => h.kind)).toEqual(['case/changed']);
    b.announce('case/changed', { caseId: 'c2', record: version('c2', 1) });
    b.announce('case/changed', { caseId: 'c1', record: version('c1', 1) });
    b.announce('case/changed', { caseId: 'c1', record: version('c1', 2) });
    expect(seen).toEqual(['version 1', 'version 2']);
  });

  it('a removed or unreadable case (no record) changes nothing', () => {
    const b = fakeNotices();
    const seen: string[] = [];
    watchCase('c1', (c) => seen.push(c.notes), new AbortController().signal, b.deps);
    b.announce('case/changed', { caseId: 'c1', record: null });
    expect(seen).toEqual([]);
  });

  it('stops when its signal aborts, and never starts on an aborted one', () => {
    const b = fakeNotices();
    const ac = new AbortController();
    const seen: string[] = [];
    watchCase('c1', (c) => seen.push(c.notes), ac.signal, b.deps);
    ac.abort();
    b.announce('case/changed', { caseId: 'c1', record: version('c1', 1) });
    watchCase('c1', (c) => seen.push(c.notes), ac.signal, b.deps);
    b.announce('case/changed', { caseId: 'c1', record: version('c1', 2) });
    expect(seen).toEqual([]);
  });
});

import { describe, expect, it } from 'vitest';
import type { Runtime } from 'webextension-polyfill';
import { routeMessages, type Guard, type Handlers } from '../../extension/background/router';
import { notice, type RequestType } from '../../extension/shared/messages';

/*
 * The background's router: every request passes the sender guard before its handler runs, and a
 * refusal reaches the sender as an `{ ok: false }` reply (the message contract in
 * extension/shared/messages.ts). Senders and payloads are invented.
 */

const calls: string[] = [];
const handle = (type: string) => async (payload: unknown) => {
  calls.push(`${type} ${JSON.stringify(payload)}`);
  return { handled: type };
};
const table = Object.fromEntries((['status/get', 'case/get', 'cases/export'] as RequestType[]).map((t) => [t, handle(t)])) as unknown as Handlers;

const page: Runtime.MessageSender = { url: 'http://127.0.0.1:4000/a.html', tab: { id: 7, index: 0, highlighted: false, active: true, pinned: false, incognito: false } };
const env = (type: string, payload: unknown = {}) => ({ channel: 'clip-caliper', type, payload });

describe('routeMessages', () => {
  it('runs the handler only when the guard lets the request through, and passes the refusal on as the error', async () => {
    const asked: string[] = [];
    const guard: Guard = async (type) => {
      asked.push(type);
      return type === 'cases/export' ? 'cases/export: not allowed from a page (only the extension’s own pages may)' : null;
    };
    const listen = routeMessages(table, guard);
    calls.length = 0;
    expect(await listen(env('case/get', { caseId: 'c1' }), page)).toEqual({ ok: true, value: { handled: 'case/get' } });
    expect(await listen(env('cases/export'), page)).toEqual({ ok: false, error: 'cases/export: not allowed from a page (only the extension’s own pages may)' });
    expect(calls).toEqual(['case/get {"caseId":"c1"}']);
    expect(asked).toEqual(['case/get', 'cases/export']);
  });

  it('a guard that fails refuses too (the handler never runs)', async () => {
    calls.length = 0;
    const listen = routeMessages(table, async () => {
      throw new Error('storage unreadable');
    });
    expect(await listen(env('case/get', { caseId: 'c1' }), page)).toEqual({ ok: false, error: 'storage unreadable' });
    expect(calls).toEqual([]);
  });

  it('answers an unknown type, a prototype name among them, without asking the guard', async () => {
    let asked = 0;
    const listen = routeMessages(table, async () => {
      asked++;
      return null;
    });
    expect(await listen(env('cases/wipe'), page)).toEqual({ ok: false, error: 'unknown request cases/wipe' });
    expect(await listen(env('toString'), page)).toEqual({ ok: false, error: 'unknown request toString' });
    expect(await listen(env('__proto__'), page)).toEqual({ ok: false, error: 'unknown request __proto__' });
    expect(asked).toBe(0);
  });

  it('leaves messages that are not ours to other listeners', () => {
    const listen = routeMessages(table, async () => null);
    expect(listen({ type: 'case/get' }, page)).toBeUndefined();
    expect(listen('case/get', page)).toBeUndefined();
  });

  it('never takes a notice for a request: notices are outbound only, even one a page forged with a request type as its kind', () => {
    let asked = 0;
    const listen = routeMessages(table, async () => {
      asked++;
      return null;
    });
    calls.length = 0;
    expect(listen(notice('cases/changed', { caseIds: ['c1'] }), page)).toBeUndefined();
    expect(listen({ channel: 'clip-caliper/notice', kind: 'case/get', type: 'case/get', payload: { caseId: 'c1' } }, page)).toBeUndefined();
    expect(asked).toBe(0);
    expect(calls).toEqual([]);
  });
});

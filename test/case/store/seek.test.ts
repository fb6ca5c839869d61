import { describe, expect, it } from 'vitest';
import { SEEK_WAIT_MS } from '../../../src/case/store-policy';
import { restartWorker, rig } from './setup';

/* Seeking from the log, through the session area. Page addresses are invented. */
describe('a seek asked for by the log', () => {
  it('outlives the worker, is taken once, and the page\'s fragment does not matter', async () => {
    const r = rig();
    await r.store.requestSeek('http://127.0.0.1:9/invented-seek#frag', 2.5);
    const again = restartWorker(r);
    expect(await again.store.takeSeek('http://127.0.0.1:9/invented-seek')).toEqual({ t: 2.5 });
    expect(await again.store.takeSeek('http://127.0.0.1:9/invented-seek')).toEqual({ t: null });
  });

  it('a seek that waited longer than SEEK_WAIT_MS is dropped, not taken', async () => {
    const r = rig();
    await r.store.requestSeek('http://127.0.0.1:9/late', 4);
    r.clock.t += SEEK_WAIT_MS + 1;
    expect(await r.store.takeSeek('http://127.0.0.1:9/late')).toEqual({ t: null });
    expect(r.session.snapshot()).toEqual({}); // and cleared
  });

  it('refuses a bad time or address, naming the field and range', async () => {
    const r = rig();
    await expect(r.store.requestSeek('http://127.0.0.1:9/x', -1)).rejects.toThrow('t: expected seconds from 0 to 10000000, got -1');
    await expect(r.store.requestSeek(7, 1)).rejects.toThrow('pageUrl: expected a page address of at most 8192 characters');
    expect(r.session.snapshot()).toEqual({});
  });
});

import { describe, expect, it } from 'vitest';
import { KeyedQueue } from '../../../src/case/store/queue';

/*
 * The per-case queue against the rule it exists for: a read-modify-write that interleaves with
 * another on the same record loses an update (the "lost update" of concurrent programming, common
 * practice); serialising the two removes it. A deferred promise stands in for slow storage.
 */
function deferred(): { promise: Promise<void>; resolve: () => void } {
  let resolve!: () => void;
  const promise = new Promise<void>((ok) => (resolve = ok));
  return { promise, resolve };
}
const tick = () => new Promise((ok) => setTimeout(ok, 0));

describe('KeyedQueue', () => {
  it('runs tasks on one case one at a time, in arrival order', async () => {
    const q = new KeyedQueue();
    const order: string[] = [];
    let running = 0;
    let most = 0;
    const task = (name: string) => async () => {
      running++;
      most = Math.max(most, running);
      order.push(`start ${name}`);
      await tick();
      order.push(`end ${name}`);
      running--;
      return name;
    };
    const got = await Promise.all(['a', 'b', 'c'].map((n) => q.run('case-1', task(n))));
    expect(got).toEqual(['a', 'b', 'c']);
    expect(most).toBe(1);
    expect(order).toEqual(['start a', 'end a', 'start b', 'end b', 'start c', 'end c']);
  });

  it('a lost update without it, none with it (the textbook read-modify-write race)', async () => {
    // a counter "stored" behind an await: read, yield, write back plus one
    const bump = (store: { n: number }) => async () => {
      const read = store.n;
      await tick();
      store.n = read + 1;
    };
    const bare = { n: 0 };
    await Promise.all(Array.from({ length: 10 }, () => bump(bare)()));
    expect(bare.n).toBeLessThan(10); // the race is real: updates were lost

    const q = new KeyedQueue();
    const queued = { n: 0 };
    await Promise.all(Array.from({ length: 10 }, () => q.run('c', bump(queued))));
    expect(queued.n).toBe(10);
  });

  it('work on another case does not wait for a case that is busy', async () => {
    const q = new KeyedQueue();
    const gate = deferred();
    const slow = q.run('a', () => gate.promise.then(() => 'a'));
    await expect(q.run('b', async () => 'b')).resolves.toBe('b'); // finished while 'a' is still held
    gate.resolve();
    await expect(slow).resolves.toBe('a');
  });

  it('a failed task rejects its caller and does not stop the tasks behind it', async () => {
    const q = new KeyedQueue();
    const failed = q.run('a', async () => {
      throw new Error('invented failure');
    });
    const next = q.run('a', async () => 'after');
    await expect(failed).rejects.toThrow('invented failure');
    await expect(next).resolves.toBe('after');
  });

  it('a task holding several cases waits for each one and holds them all until it ends', async () => {
    const q = new KeyedQueue();
    const gateA = deferred();
    const gateImport = deferred();
    const events: string[] = [];
    const a = q.run('a', () => gateA.promise.then(() => events.push('a done')));
    const both = q.runMany(['a', 'b', 'a'], async () => {
      events.push('import start');
      await gateImport.promise;
      events.push('import end');
    });
    const b = q.run('b', async () => events.push('b after import'));
    await tick();
    expect(events).toEqual([]); // the import waits for 'a'; 'b' waits for the import
    gateA.resolve();
    await tick();
    expect(events).toEqual(['a done', 'import start']);
    gateImport.resolve();
    await Promise.all([a, both, b]);
    expect(events).toEqual(['a done', 'import start', 'import end', 'b after import']);
  });

  it('forgets a case once its queue is empty, so a long-lived worker does not keep one entry per case ever touched', async () => {
    const q = new KeyedQueue();
    const gate = deferred();
    const p = q.run('a', () => gate.promise);
    void q.run('b', async () => undefined);
    expect(q.busy).toBe(2);
    gate.resolve();
    await p;
    await tick();
    expect(q.busy).toBe(0);
  });
});

import type { KeyValueArea } from '../../../src/case/store/port';

/*
 * An in-memory key-value area for the store's unit tests, behaving as chrome.storage.local is
 * documented to (chrome.storage API reference): values are stored as JSON, so what is read back
 * is a copy and never the object written; a missing key is left out of get(); each set or remove
 * is whole or not at all; a set past QUOTA_BYTES fails and changes nothing; getBytesInUse counts
 * each key plus its value's JSON. Its weighing is written here from that rule with Node's
 * Buffer.byteLength, not taken from the store's own store-policy.ts, so the two can disagree.
 *
 * For the tests it can also: let every call yield to the event loop for a while (so concurrent
 * work really interleaves), hold reads of one key until released, fail the next call of a kind,
 * and log the calls.
 */
export interface MemoryAreaOptions {
  quotaBytes?: number;
  /** Whether the area offers bytesInUse (chrome does; a browser without getBytesInUse does not). */
  counts?: boolean;
  /** Each call waits this many milliseconds times a seeded pseudo-random share in [0, 1). */
  jitterMs?: number;
}

type Kind = 'get' | 'getAll' | 'set' | 'remove';

export class MemoryArea implements KeyValueArea {
  private data = new Map<string, string>();
  readonly calls: { kind: Kind; keys: string[] }[] = [];
  private readonly held = new Map<string, Promise<void>>();
  private readonly failing = new Map<Kind, Error>();
  private seed = 12345;
  readonly quotaBytes?: number;
  bytesInUse?: () => Promise<number>;

  constructor(private readonly options: MemoryAreaOptions = {}) {
    if (options.quotaBytes !== undefined) this.quotaBytes = options.quotaBytes;
    if (options.counts !== false) this.bytesInUse = async () => this.count(this.data);
  }

  /** Bytes as chrome documents getBytesInUse: each key's length plus its value's JSON, here in UTF-8. */
  private count(data: ReadonlyMap<string, string>): number {
    let n = 0;
    for (const [k, json] of data) n += Buffer.byteLength(k) + Buffer.byteLength(json);
    return n;
  }

  private async pause(kind: Kind, keys: string[]): Promise<void> {
    this.calls.push({ kind, keys });
    if (this.options.jitterMs) {
      // a small linear congruential generator (Numerical Recipes constants): repeatable runs
      this.seed = (this.seed * 1664525 + 1013904223) >>> 0;
      await new Promise((ok) => setTimeout(ok, (this.seed / 2 ** 32) * this.options.jitterMs!));
    } else {
      await Promise.resolve();
    }
    const err = this.failing.get(kind);
    if (err) {
      this.failing.delete(kind);
      throw err;
    }
  }

  async get(keys: readonly string[]): Promise<Record<string, unknown>> {
    await this.pause('get', [...keys]);
    for (const k of keys) await this.held.get(k);
    const out: Record<string, unknown> = {};
    for (const k of keys) if (this.data.has(k)) out[k] = JSON.parse(this.data.get(k)!);
    return out;
  }

  async getAll(): Promise<Record<string, unknown>> {
    await this.pause('getAll', []);
    return this.snapshot();
  }

  async set(items: Readonly<Record<string, unknown>>): Promise<void> {
    await this.pause('set', Object.keys(items));
    const next = new Map(this.data);
    for (const [k, v] of Object.entries(items)) next.set(k, JSON.stringify(v));
    if (this.quotaBytes !== undefined && this.count(next) > this.quotaBytes) throw new Error('QUOTA_BYTES quota exceeded');
    this.data = next;
  }

  async remove(keys: readonly string[]): Promise<void> {
    await this.pause('remove', [...keys]);
    for (const k of keys) this.data.delete(k);
  }

  /* ---- for the tests, outside the port ---- */

  /** Everything stored, read back from JSON, without a call being logged. */
  snapshot(): Record<string, unknown> {
    return Object.fromEntries([...this.data].map(([k, json]) => [k, JSON.parse(json)]));
  }

  /** Writes directly, as another page or a damaged profile would, outside the store. */
  plant(items: Record<string, unknown>): void {
    for (const [k, v] of Object.entries(items)) this.data.set(k, JSON.stringify(v));
  }

  usedBytes(): number {
    return this.count(this.data);
  }

  /** Reads of `key` wait until the returned function is called. */
  hold(key: string): () => void {
    let release!: () => void;
    this.held.set(key, new Promise<void>((ok) => (release = ok)));
    return () => {
      this.held.delete(key);
      release();
    };
  }

  failNext(kind: Kind, message = `invented ${kind} failure`): void {
    this.failing.set(kind, new Error(message));
  }

  callsOf(kind: Kind): number {
    return this.calls.filter((c) => c.kind === kind).length;
  }
}

/**
 * Per-case queues: work on one case runs in arrival order, one task at a time, so two
 * read-modify-writes of one case never interleave (the lost update); work on different cases does
 * not wait. A task may hold several cases (an import): it starts once each one's earlier work is
 * done and holds them all until it ends. A failed task does not stop the ones behind it.
 *
 * This runs in the one context that writes cases (the background worker, one instance at a time),
 * so an in-memory queue is enough; DEVELOPERS.md says why the Web Locks API is not used.
 */
export class KeyedQueue {
  private readonly tails = new Map<string, Promise<unknown>>();

  run<T>(id: string, task: () => Promise<T>): Promise<T> {
    return this.runMany([id], task);
  }

  runMany<T>(ids: readonly string[], task: () => Promise<T>): Promise<T> {
    const unique = [...new Set(ids)];
    const prev = Promise.all(unique.map((id) => this.tails.get(id) ?? Promise.resolve()));
    const next = prev.then(task, task);
    const settled: Promise<unknown> = next.then(
      () => this.release(unique, settled),
      () => this.release(unique, settled),
    );
    for (const id of unique) this.tails.set(id, settled);
    return next;
  }

  /** How many cases have work queued or running (a finished queue is forgotten). */
  get busy(): number {
    return this.tails.size;
  }

  private release(ids: readonly string[], settled: Promise<unknown>): void {
    // only the last task queued on a case forgets it: a later one still chains on its own tail
    for (const id of ids) if (this.tails.get(id) === settled) this.tails.delete(id);
  }
}

/**
 * The one thing the case store needs from a browser: a key-value area whose values survive as
 * JSON does. `chrome.storage.local` and `.session` fit it as they are (the background wires
 * them); the unit tests use an in-memory one. Every call is async and each `set` or `remove` is
 * whole or not at all, as the storage areas promise for one call.
 */
export interface KeyValueArea {
  /** The values of those keys that exist; a key that does not is left out. */
  get(keys: readonly string[]): Promise<Record<string, unknown>>;
  /** Every key and value in the area. */
  getAll(): Promise<Record<string, unknown>>;
  set(items: Readonly<Record<string, unknown>>): Promise<void>;
  remove(keys: readonly string[]): Promise<void>;
  /** Bytes the area counts against its quota; where absent the store weighs getAll() itself. */
  bytesInUse?(): Promise<number>;
  /** The area's own quota, where it states one; else DEFAULT_QUOTA_BYTES (store-policy.ts). */
  readonly quotaBytes?: number;
}

/** What a store is made of: the two areas, a clock and the version written into exports. */
export interface StorePorts {
  /** Survives restarts: cases and the quarantine. */
  local: KeyValueArea;
  /** Gone when the browser closes: deleted cases kept for undo, pending seeks. */
  session: KeyValueArea;
  now?: () => number;
  toolVersion: () => string;
}

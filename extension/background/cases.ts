import { createCaseStore } from '../../src/case';
import type { KeyValueArea } from '../../src/case';
import { browser } from '../shared/browser';

/*
 * The case store's rules live in src/case/store/ (tested there over an in-memory area); this file
 * only wires browser storage to its port: local for cases and the quarantine, session for deleted
 * copies and seeks. One store per worker instance: its queues and the log's index are in memory,
 * and a worker the browser stopped starts with fresh ones.
 */
type Area = typeof browser.storage.local;

function areaOf(area: Area): KeyValueArea {
  const extra = area as unknown as { QUOTA_BYTES?: unknown; getBytesInUse?: (keys: null) => Promise<number> };
  const getBytesInUse = extra.getBytesInUse;
  return {
    get: (keys) => area.get([...keys]),
    getAll: () => area.get(null),
    set: (items) => area.set({ ...items }),
    remove: (keys) => area.remove([...keys]),
    // the browser's own count and constant where it has them (the polyfill passes plain values through)
    ...(typeof getBytesInUse === 'function' ? { bytesInUse: () => getBytesInUse.call(area, null) } : {}),
    ...(typeof extra.QUOTA_BYTES === 'number' ? { quotaBytes: extra.QUOTA_BYTES } : {}),
  };
}

export const store = createCaseStore({
  local: areaOf(browser.storage.local),
  session: areaOf(browser.storage.session),
  toolVersion: () => browser.runtime.getManifest().version,
});

// every other writer (a page, another view) reaches the log's index here
browser.storage.onChanged.addListener((changes: Record<string, { newValue?: unknown }>, area: string) => {
  if (area !== 'local') return;
  for (const [k, change] of Object.entries(changes)) store.noteChange(k, change.newValue);
});

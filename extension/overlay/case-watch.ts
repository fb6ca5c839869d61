import { caseKey, type CaseRecord } from '../../src/case/schema';
import { nativeApis, send } from '../shared/native';

/** How a change of the stored case is heard and read back (the browser's own, unless a test gives others). */
export interface CaseWatchDeps {
  onChanged: {
    addListener(fn: (changes: Record<string, { newValue?: unknown }>, area: string) => void): void;
    removeListener(fn: (changes: Record<string, { newValue?: unknown }>, area: string) => void): void;
  };
  read(caseId: string): Promise<CaseRecord | null | undefined>;
}

function browserDeps(): CaseWatchDeps {
  return { onChanged: nativeApis().storage.onChanged, read: (caseId) => send('case/get', { caseId }) };
}

/**
 * Calls `onCase` with each newer stored version of the case `caseId` until `signal` aborts: the popup
 * edits assumptions, and another tab may add marks. The only place in the overlay that knows how
 * cases are stored. The stored value is read back through the background, which migrates and
 * validates every read (and quarantines a record that fails): the overlay need not carry the
 * validator.
 */
export function watchCase(caseId: string, onCase: (c: CaseRecord) => void, signal: AbortSignal, deps: CaseWatchDeps = browserDeps()): void {
  if (signal.aborted) return;
  const key = caseKey(caseId);
  let reads = 0;
  const onStored = (changes: Record<string, { newValue?: unknown }>, area: string) => {
    if (area !== 'local' || !changes[key]?.newValue) return;
    // replies may arrive out of order: only the latest read is taken
    const mine = ++reads;
    deps.read(caseId).then(
      (c) => {
        if (c && mine === reads && !signal.aborted) onCase(c);
      },
      () => undefined,
    );
  };
  deps.onChanged.addListener(onStored);
  signal.addEventListener('abort', () => deps.onChanged.removeListener(onStored), { once: true });
}

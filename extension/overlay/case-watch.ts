import type { CaseRecord } from '../../src/case';
import { subscribe } from '../shared/subscribe';

/** How the background's notices are heard (the browser's own, unless a test gives another). */
export interface CaseWatchDeps {
  subscribe: typeof subscribe;
}

/**
 * Calls `onCase` with each newer stored version of the case `caseId` until `signal` aborts: the popup
 * edits assumptions, and another tab may add marks. The background announces each change with the
 * record already migrated and validated (background/announce.ts, a `case/changed` notice; null when
 * removed or unreadable), in the order it was stored, so the overlay neither reads storage keys nor
 * carries the validator.
 */
export function watchCase(caseId: string, onCase: (c: CaseRecord) => void, signal: AbortSignal, deps: CaseWatchDeps = { subscribe }): void {
  deps.subscribe(
    'case/changed',
    ({ caseId: changed, record }) => {
      if (changed === caseId && record && !signal.aborted) onCase(record);
    },
    signal,
  );
}

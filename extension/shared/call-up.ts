/*
 * TEMPORARY, for the merge only: the call-up moved to extension/background/call-up.ts (the
 * background injects; shared/ must not reach the overlay). extension/popup/main.tsx, which another
 * helper is splitting, still imports it from here. At merge: point popup/main.tsx at
 * '../background/call-up', delete this file, and take it off the allow-list in
 * test/house/arrows.test.ts.
 */
export { firstStage, injectOverlay } from '../background/call-up';

import { DEFAULT_SETTINGS, readSettings, SETTINGS_KEY } from '../../src/case';
import type { Settings } from '../../src/case';
import { nativeApis } from './native';
import { subscribe } from './subscribe';

/** The settings through the browser seam: read with defaults, written whole, followed live. */
export async function loadSettings(): Promise<Settings> {
  const got = await nativeApis().storage.local.get(SETTINGS_KEY);
  return readSettings(got[SETTINGS_KEY]);
}

export async function saveSettings(s: Settings): Promise<void> {
  await nativeApis().storage.local.set({ [SETTINGS_KEY]: readSettings(s) });
}

/** Follows the settings as the background announces them (background/announce.ts); returns the way to stop. */
export function onSettingsChanged(fn: (s: Settings) => void): () => void {
  const stop = new AbortController();
  subscribe('settings/changed', ({ settings }) => fn(settings), stop.signal);
  return () => stop.abort();
}

export { DEFAULT_SETTINGS };

import { DEFAULT_SETTINGS, readSettings, SETTINGS_KEY, type Settings } from '../../src/case/settings';
import { nativeApis } from './native';

/** The settings through the browser seam: read with defaults, written whole, followed live. */
export async function loadSettings(): Promise<Settings> {
  const got = await nativeApis().storage.local.get(SETTINGS_KEY);
  return readSettings(got[SETTINGS_KEY]);
}

export async function saveSettings(s: Settings): Promise<void> {
  await nativeApis().storage.local.set({ [SETTINGS_KEY]: readSettings(s) });
}

export function onSettingsChanged(fn: (s: Settings) => void): () => void {
  const listener = (changes: Record<string, { newValue?: unknown }>, area: string) => {
    if (area === 'local' && changes[SETTINGS_KEY]) fn(readSettings(changes[SETTINGS_KEY].newValue));
  };
  const storage = nativeApis().storage;
  storage.onChanged.addListener(listener);
  return () => storage.onChanged.removeListener(listener);
}

export { DEFAULT_SETTINGS };

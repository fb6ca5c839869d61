/**
 * The message table, read without the WebExtension polyfill: part of the seam over browser APIs
 * (browser.ts re-exports it), kept apart so that the overlay's first stage can show its strings
 * without paying for the polyfill. Both Chromium and Firefox expose i18n.getMessage synchronously
 * on `chrome`; Firefox also on `browser`.
 */
type GetMessage = (key: string, substitutions?: string | string[]) => string;

export function message(key: string, substitutions?: string | string[]): string {
  const g = globalThis as unknown as { chrome?: { i18n?: { getMessage?: GetMessage } }; browser?: { i18n?: { getMessage?: GetMessage } } };
  const get = g.chrome?.i18n?.getMessage ?? g.browser?.i18n?.getMessage;
  // falls back to the key so that a missing string is visible rather than blank
  return (get ? get(key, substitutions) : '') || key;
}

/**
 * The one seam over browser APIs. Every other module reaches the browser through here, so that a
 * browser's quirks (promise vs callback APIs, Firefox's background scripts) are handled in one place.
 * Its polyfill-free part (native.ts, i18n.ts) is what the overlay imports: it is sent into the page
 * on every call-up, and messages and storage need no polyfill.
 */
import browser from 'webextension-polyfill';

export { browser };

export function extensionVersion(): string {
  return browser.runtime.getManifest().version;
}

// sending to the background and the message table need no polyfill (native.ts, i18n.ts)
export { message, send } from './native';

/**
 * The one seam over browser APIs. Every other module reaches the browser through here, so that a
 * browser's quirks (promise vs callback APIs, Firefox's background scripts) are handled in one place.
 */
import browser from 'webextension-polyfill';
import { envelope, type Reply, type RequestMap, type RequestType } from './messages';

export { browser };

export function extensionVersion(): string {
  return browser.runtime.getManifest().version;
}

export { message } from './i18n';

/** Sends a typed request to the background and unwraps its reply (throws the background's error). */
export async function send<K extends RequestType>(
  type: K,
  payload: RequestMap[K]['payload'],
): Promise<RequestMap[K]['reply']> {
  const reply = (await browser.runtime.sendMessage(envelope(type, payload))) as Reply<K> | undefined;
  if (!reply) throw new Error(`no reply to ${type}`);
  if (!reply.ok) throw new Error(reply.error);
  return reply.value;
}

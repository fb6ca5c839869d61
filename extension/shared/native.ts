import type { Browser } from 'webextension-polyfill';
import { envelope, type Reply, type RequestMap, type RequestType } from './messages';

/*
 * The part of the seam over browser APIs that needs no polyfill: messages to the background and
 * local storage return promises natively in Chromium's Manifest V3 and in Firefox. The overlay,
 * sent into the page on every call-up, reaches the browser only through here (and i18n.ts), which
 * keeps the polyfill's 9.7 KB (2.8 KB gzip) out of it; browser.ts re-exports all of this for the
 * extension's own pages and background.
 */
export type NativeApis = Pick<Browser, 'runtime' | 'storage'>;

/** runtime and storage as the browser provides them: `browser` in Firefox, `chrome` in Chromium. */
export function nativeApis(): NativeApis {
  const g = globalThis as unknown as { browser?: Partial<NativeApis>; chrome?: Partial<NativeApis> };
  const api = g.browser?.runtime ? g.browser : g.chrome;
  if (!api?.runtime || !api.storage) throw new Error('extension APIs are not available here');
  return api as NativeApis;
}

/** Sends a typed request to the background and unwraps its reply (throws the background's error). */
export async function send<K extends RequestType>(
  type: K,
  payload: RequestMap[K]['payload'],
): Promise<RequestMap[K]['reply']> {
  const reply = (await nativeApis().runtime.sendMessage(envelope(type, payload))) as Reply<K> | undefined;
  if (!reply) throw new Error(`no reply to ${type}`);
  if (!reply.ok) throw new Error(reply.error);
  return reply.value;
}

export { message } from './i18n';

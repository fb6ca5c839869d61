import { isNotice, type NoticeKind, type NoticeMap } from './messages';
import { nativeApis } from './native';

/*
 * How a view hears what the background announces (the notices of shared/messages.ts, sent by
 * background/announce.ts), instead of watching storage keys itself:
 *
 *   subscribe('case/changed', ({ caseId, record }) => ..., signal);
 *
 * The handler runs for each notice of that kind until `signal` aborts. Polyfill-free (native.ts),
 * so the overlay may use it in its isolated world as the extension's pages do. There the overlay
 * hears notices once it has sent the background a request from its frame (case/open, on mounting),
 * and only `case/changed` for cases of its own page and `settings/changed`; the extension's own
 * pages hear every kind (background/notices.ts, AUDIENCE).
 */

/** The sender facts a notice is judged by (runtime.onMessage's second argument). */
export interface NoticeSender {
  id?: string;
  url?: string;
  tab?: unknown;
}

/**
 * Whether a message came from the extension itself (its background or one of its pages) rather
 * than from a content script: a content script always has a tab, and a page may confuse the
 * overlay into sending anything, so a notice that names a tab is never believed.
 */
export function fromExtension(sender: NoticeSender, extensionId: string, extensionOrigin: string): boolean {
  if (sender.tab !== undefined || sender.id !== extensionId) return false;
  return sender.url === undefined || (extensionOrigin !== '' && sender.url.startsWith(extensionOrigin));
}

export function subscribe<K extends NoticeKind>(kind: K, handler: (payload: NoticeMap[K]) => void, signal: AbortSignal): void {
  if (signal.aborted) return;
  const runtime = nativeApis().runtime;
  const origin = runtime.getURL('');
  const listener = (message: unknown, sender: NoticeSender): undefined => {
    if (isNotice(message) && message.kind === kind && fromExtension(sender, runtime.id, origin)) handler(message.payload as NoticeMap[K]);
    // never a reply: notices are outbound only
    return undefined;
  };
  runtime.onMessage.addListener(listener);
  signal.addEventListener('abort', () => runtime.onMessage.removeListener(listener), { once: true });
}

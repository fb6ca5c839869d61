import type { Runtime } from 'webextension-polyfill';
import { isEnvelope, type Notice } from '../shared/messages';
import { browser } from '../shared/browser';
import { AUDIENCE, follow, followerOf, forFrame, noticesFor, readFollowers, unfollowTab, type Follower, type StorageChanges } from './notices';

/*
 * The announcer: the one place that turns storage changes into notices (background only; the
 * translation and who hears what are in notices.ts). Views listen with shared/subscribe.ts.
 *
 * - The extension's own pages (popup, log, options) hear every notice by runtime.sendMessage,
 *   which reaches extension pages only.
 * - The overlay runs in a page's frame, in the extension's isolated world. It has no address the
 *   background could send to until it speaks: every request it sends names its tab, frame and
 *   address (set by the browser), and that frame is followed from then on. It hears by
 *   tabs.sendMessage to that frame (to that very document in Chromium), which reaches the
 *   extension's content scripts there and never the page's own world; and only what forFrame lets
 *   through: its own page's cases and the settings.
 *
 * The followed frames are kept in storage.session (the extension's own pages and this worker can
 * read it; content scripts cannot), so a worker the browser stopped and woke still knows them.
 */

const FOLLOWERS_KEY = 'notice-followers';

let followers: Promise<readonly Follower[]> | null = null;

function current(): Promise<readonly Follower[]> {
  followers ??= browser.storage.session.get(FOLLOWERS_KEY).then(
    (got) => readFollowers(got[FOLLOWERS_KEY]),
    () => [],
  );
  return followers;
}

/** Applies a change to the followed frames, in order, and keeps the outcome when it differs. */
function update(change: (list: readonly Follower[]) => readonly Follower[]): void {
  followers = current().then((list) => {
    const next = change(list);
    if (next !== list) void browser.storage.session.set({ [FOLLOWERS_KEY]: next }).catch(() => undefined);
    return next;
  });
}

// a frame with no listener, or gone, refuses: that is no one's error
const ignore = () => undefined;

async function announce(notices: readonly Notice[]): Promise<void> {
  if (notices.length === 0) return;
  const frames = notices.some((n) => AUDIENCE[n.kind] === 'frames') ? await current() : [];
  for (const n of notices) {
    void browser.runtime.sendMessage(n).catch(ignore);
    for (const f of frames) {
      const m = forFrame(n, f.url);
      if (!m) continue;
      // by document where the browser names one (sender.documentId): a frame that navigated since is another document
      void browser.tabs.sendMessage(f.tabId, m, f.documentId ? { documentId: f.documentId } : { frameId: f.frameId }).catch(ignore);
    }
  }
}

/** Wires the announcer, once, at the top level of the worker (background/index.ts imports this module). */
function startAnnouncer(): void {
  const origin = browser.runtime.getURL('');
  browser.storage.onChanged.addListener((changes: StorageChanges, area: string) => {
    void announce(noticesFor(changes, area));
  });
  // only watches who speaks: the router answers (this listener returns nothing, so it never replies)
  browser.runtime.onMessage.addListener((message: unknown, sender: Runtime.MessageSender) => {
    if (!isEnvelope(message)) return undefined;
    const f = followerOf(sender, origin);
    if (f) update((list) => follow(list, f));
    return undefined;
  });
  browser.tabs.onRemoved.addListener((tabId) => update((list) => unfollowTab(list, tabId)));
  // a frame known only by its number (Firefox) may hold another page after a navigation
  browser.tabs.onUpdated.addListener((tabId, info) => {
    if (info.status === 'loading') update((list) => unfollowTab(list, tabId, true));
  });
}

startAnnouncer();

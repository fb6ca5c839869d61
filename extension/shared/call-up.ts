import overlayFile from '../overlay/index.ts?script&iife';
import { afterNextFrame, drawShell, preferVideo, shellText, type ShellText } from '../overlay/shell';
import { OVERLAY_CSS } from '../overlay/styles';
import { browser } from './browser';

/** The first stage as the scripting API sends it: the function and what it is called with. */
export function firstStage(videoSrc: string | null = null): { func: (video: null, text: ShellText, css: string, prefer: string | null) => boolean; args: [null, ShellText, string, string | null] } {
  return { func: drawShell, args: [null, shellText(), OVERLAY_CSS, videoSrc] };
}

export interface CallUpOptions {
  /** Only into this frame (a video in a frame from another origin, once its site is granted; the context menu's frame). */
  frameId?: number;
  /** The video to measure, by its source address (the context menu opened on it): no chooser when it is the only one with that source. */
  videoSrc?: string;
  /** The overlay proper's file; only the browser tests name another (one that is not there, to see the first stage's panel taken away again). */
  overlayFile?: string;
}

/**
 * Calls the overlay up in a tab: the only way it reaches a page (no content script runs on load).
 * activeTab grants the tab for the gesture that led here (toolbar popup, keyboard command, context
 * menu), so the popup calls this itself rather than through the background. With frameId the
 * script goes into that one frame (a video in a frame from another origin, once the user has
 * granted that site).
 *
 * Two stages. The first draws the host and panel in the page's own world at once (overlay/shell.ts)
 * and lets the page show them; the second, the overlay proper in the extension's isolated world,
 * adopts and wires them. The overlay guards itself against a second mount, so calling it up twice
 * is harmless.
 */
export async function injectOverlay(tabId: number, options: CallUpOptions = {}): Promise<boolean> {
  const { frameId, videoSrc } = options;
  const target = frameId === undefined ? { tabId } : { tabId, frameIds: [frameId] };
  try {
    const drawn = await browser.scripting.executeScript({ target, world: 'MAIN', ...firstStage(videoSrc ?? null) }).then(
      (results) => results.some((r) => r.result === true),
      // only a head start: if the page refuses it, the overlay proper draws the panel itself
      () => false,
    );
    // sent at once, the overlay proper often took the page's main thread before the panel's first
    // frame, which then came only after it: that frame began 30 ms after the call against 15 when
    // waiting for it; the overlay is wired later for it, 67 ms against 44 (npm run bench, one run)
    if (drawn) await browser.scripting.executeScript({ target, world: 'MAIN', func: afterNextFrame }).catch(() => undefined);
    // the overlay proper reads the chosen video from its own world, where this leaves it
    if (videoSrc) await browser.scripting.executeScript({ target, func: preferVideo, args: [videoSrc] });
    await browser.scripting.executeScript({ target, files: [options.overlayFile ?? overlayFile] });
  } catch (err) {
    // without the overlay proper, a panel the first stage drew would sit there dead: take it away
    await browser.scripting
      .executeScript({
        target,
        world: 'MAIN',
        func: () => document.querySelectorAll('clip-caliper-overlay[data-shell]').forEach((el) => el.remove()),
      })
      .catch(() => undefined);
    throw err;
  }
  return true;
}

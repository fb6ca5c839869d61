import overlayFile from '../overlay/index.ts?script&iife';
import { drawShell, shellText } from '../overlay/shell';
import { OVERLAY_CSS } from '../overlay/styles';
import { browser } from './browser';

/** The first stage as the scripting API sends it: the function and what it is called with. */
export function firstStage(): { func: typeof drawShell; args: Parameters<typeof drawShell> } {
  return { func: drawShell, args: [null, shellText(), OVERLAY_CSS] };
}

/**
 * Calls the overlay up in a tab: the only way it reaches a page (no content script runs on load).
 * activeTab grants the tab for the gesture that led here (toolbar popup, keyboard command, context
 * menu), so the popup calls this itself rather than through the background. With frameId the
 * script goes into that one frame (a video in a frame from another origin, once the user has
 * granted that site).
 *
 * Two stages, sent together. The first draws the host and panel in the page's own world at once
 * (overlay/shell.ts); the second, the overlay proper in the extension's isolated world, adopts and
 * wires them. Should the second arrive first, it draws the shell itself and the first stage, seeing
 * an overlay up, draws nothing. The overlay guards itself against a second mount, so calling it up
 * twice is harmless.
 */
export async function injectOverlay(tabId: number, frameId?: number): Promise<boolean> {
  const target = frameId === undefined ? { tabId } : { tabId, frameIds: [frameId] };
  const first = browser.scripting
    .executeScript({ target, world: 'MAIN', ...firstStage() })
    // only a head start: if the page refuses it, the overlay proper draws the panel itself
    .catch(() => undefined);
  try {
    await Promise.all([first, browser.scripting.executeScript({ target, files: [overlayFile] })]);
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

import overlayFile from '../overlay/index.ts?script&iife';
import { browser } from '../shared/browser';

/**
 * Calls the overlay up in a tab: the only way it reaches a page (no content script runs on load).
 * activeTab grants the tab for the gesture that led here (toolbar popup, keyboard command, context
 * menu). The overlay guards itself against a second mount, so injecting twice is harmless.
 * Same-origin frames are reached from the top document; with frameId the script goes into that
 * one frame (a video in a frame from another origin, once the user has granted that site).
 */
export async function injectOverlay(tabId: number, frameId?: number): Promise<boolean> {
  await browser.scripting.executeScript({
    target: frameId === undefined ? { tabId } : { tabId, frameIds: [frameId] },
    files: [overlayFile],
  });
  return true;
}

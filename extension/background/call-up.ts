import overlayFile from '../overlay/index.ts?script&iife';
import { drawShell, preferVideo, shellText, type CallUpStatus, type ShellText } from '../overlay/shell';
import { afterNextFrame } from '../shared/next-frame';
import { OVERLAY_CSS } from '../overlay/styles';
import { browser, message } from '../shared/browser';

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

/*
 * Every wait of a call-up has a bound: a page that blocks its main thread (or a frame that never
 * answers) would otherwise leave the call-up pending with nothing drawn and nothing said. The first
 * stage is only a head start, so it gets little; the overlay proper gets long enough to load on a
 * slow machine (it takes about 0.1 s here, npm run bench).
 */
export const FIRST_STAGE_MS = 1_500;
export const OVERLAY_MS = 8_000;

/** A call-up that failed, with the sentence the user sees (from the message table) and the reason's code. */
export class CallUpError extends Error {
  constructor(
    readonly code: 'timeout' | CallUpStatus,
    text: string,
  ) {
    super(text);
  }
}

/** Settles as `work` does, or rejects with a CallUpError('timeout') after `ms`. */
export function bounded<T>(work: Promise<T>, ms: number): Promise<T> {
  let timer: ReturnType<typeof setTimeout> | undefined;
  const late = new Promise<never>((_, fail) => {
    timer = setTimeout(() => fail(new CallUpError('timeout', message('callUpTimeout', String(Math.round(ms / 1000))))), ms);
  });
  return Promise.race([work, late]).finally(() => clearTimeout(timer));
}

/** Runs in the frame's isolated world after the overlay proper: what it left on screen (overlay/index.ts). */
function overlayStatus(): string {
  const reg = (globalThis as unknown as Record<symbol, { status?: () => string } | undefined>)[Symbol.for('clip-caliper.overlay')];
  return reg?.status ? reg.status() : 'none';
}

/**
 * Calls the overlay up in a tab: the only way it reaches a page (no content script runs on load).
 * activeTab grants the tab for the gesture that led here (toolbar popup, keyboard command, context
 * menu), so the popup calls this itself rather than through the background. With frameId the
 * script goes into that one frame (a video in a frame from another origin, once the user has
 * granted that site).
 *
 * Two stages, both in the extension's isolated world (never the page's own: the page under review
 * must not be able to patch what draws the overlay, nor its timers). The first draws the host and
 * panel at once (overlay/shell.ts) and lets the page show them; the second, the overlay proper,
 * takes and wires them. Then the call-up asks what is on screen, so that a page which removed or
 * hid the overlay gets a message rather than a silent success. The overlay guards itself against a
 * second mount, so calling it up twice is harmless; a failed call-up can simply be retried.
 */
export async function injectOverlay(tabId: number, options: CallUpOptions = {}): Promise<boolean> {
  const { frameId, videoSrc } = options;
  const target = frameId === undefined ? { tabId } : { tabId, frameIds: [frameId] };
  try {
    const drawn = await bounded(browser.scripting.executeScript({ target, ...firstStage(videoSrc ?? null) }), FIRST_STAGE_MS).then(
      (results) => results.some((r) => r.result === true),
      // only a head start: if the page refuses it, the overlay proper draws the panel itself
      () => false,
    );
    // sent at once, the overlay proper often took the page's main thread before the panel's first
    // frame, which then came only after it: that frame began 30 ms after the call against 15 when
    // waiting for it; the overlay is wired later for it, 67 ms against 44 (npm run bench, one run)
    if (drawn) await bounded(browser.scripting.executeScript({ target, func: afterNextFrame }), FIRST_STAGE_MS).catch(() => undefined);
    // the overlay proper reads the chosen video from its own world, where this leaves it
    if (videoSrc) await bounded(browser.scripting.executeScript({ target, func: preferVideo, args: [videoSrc] }), OVERLAY_MS);
    await bounded(browser.scripting.executeScript({ target, files: [options.overlayFile ?? overlayFile] }), OVERLAY_MS);
    const results = await bounded(browser.scripting.executeScript({ target, func: overlayStatus }), OVERLAY_MS);
    const states = results.map((r) => r.result as CallUpStatus);
    if (!states.some((st) => st === 'measuring' || st === 'choosing')) {
      const why = (['removed', 'hidden', 'none'] as const).find((st) => states.includes(st)) ?? 'none';
      throw new CallUpError(why, message(why === 'removed' ? 'callUpRemoved' : why === 'hidden' ? 'callUpHidden' : 'callUpNothing'));
    }
  } catch (err) {
    // without the overlay proper, a panel the first stage drew would sit there dead: take it away
    await bounded(browser.scripting.executeScript({ target, func: dropWaitingShells }), FIRST_STAGE_MS).catch(() => undefined);
    throw err;
  }
  return true;
}

/** Self-contained (it runs in the frame's isolated world): removes shells no session took. */
function dropWaitingShells(): void {
  const shells = (globalThis as unknown as Record<symbol, { host: HTMLElement; waiting: boolean }[] | undefined>)[Symbol.for('clip-caliper.shells')] ?? [];
  for (let i = shells.length - 1; i >= 0; i--) {
    if (shells[i]!.waiting) {
      shells[i]!.host.remove();
      shells.splice(i, 1);
    }
  }
}

import frameServerFile from '../overlay/frame-entry.ts?script&iife';
import type { Gray } from '../../src/case';
import { browser } from '../shared/browser';
import type { FrameReply, FrameRequest, PictureReply, RateReply } from '../shared/frames';

/*
 * Frames of the measured video, read from an extension page (the work of following the object runs
 * here and in its workers, never on the page under review's thread). Each frame is asked of the
 * overlay in the tab through the scripting API (overlay/frame-server.ts): the answer comes straight
 * back to the extension, so the page can neither read nor forge it.
 */

/** A frame as the engine takes it: luma of the region asked for, with where it lies in the video. */
export interface PageFrame {
  gray: Gray;
  /** The media time the video showed, s. */
  t: number;
  /** The region's top-left corner in the video's intrinsic pixels, and its block side. */
  x: number;
  y: number;
  step: number;
  /** 'video': the video's own pixels; 'capture': the tab's picture (a video from another site). */
  source: 'video' | 'capture';
}

export class FrameReadError extends Error {
  constructor(readonly reason: Exclude<FrameReply, { ok: true }>['reason'] | Exclude<PictureReply, { ok: true }>['reason'] | 'no-answer') {
    super(`frame not read: ${reason}`);
  }
}

/** Self-contained (it runs in the tab's isolated world): hands the request to the overlay there. */
function askOverlay(req: FrameRequest): Promise<FrameReply> | FrameReply {
  const reg = (globalThis as unknown as Record<symbol, { frame?: (r: unknown) => Promise<FrameReply> } | undefined>)[Symbol.for('clip-caliper.overlay')];
  return reg?.frame ? reg.frame(req) : { ok: false, reason: 'no-session' };
}

export function decodeFrame(r: Extract<FrameReply, { ok: true }>): PageFrame {
  const bin = atob(r.luma);
  const data = new Uint8ClampedArray(bin.length);
  for (let k = 0; k < bin.length; k++) data[k] = bin.charCodeAt(k);
  return { gray: { data, width: r.width, height: r.height, channels: 1 }, t: r.t, x: r.x, y: r.y, step: r.step, source: r.source };
}

/** Self-contained: whether the frame server is already hung on the overlay's registry there. */
function serverThere(): boolean {
  return !!(globalThis as unknown as Record<symbol, { frame?: unknown } | undefined>)[Symbol.for('clip-caliper.overlay')]?.frame;
}

/** The frame server hung on the overlay there: it comes with the first request (a page that navigated since loses it with the overlay). */
async function withServer(target: { tabId: number; frameIds: number[] }): Promise<void> {
  const [there] = await browser.scripting.executeScript({ target, func: serverThere });
  if (!there?.result) await browser.scripting.executeScript({ target, files: [frameServerFile] });
}

/** Self-contained (it runs in the tab's isolated world): asks the overlay there for the clip's frame rate. */
function askRate(): Promise<RateReply> | RateReply {
  const reg = (globalThis as unknown as Record<symbol, { rate?: () => Promise<RateReply> } | undefined>)[Symbol.for('clip-caliper.overlay')];
  return reg?.rate ? reg.rate() : { ok: false, reason: 'no-session' };
}

/** The measured video's frame rate as the browser's presented frames tell it, or why not. */
export async function readFrameRate(tabId: number, frameId: number): Promise<RateReply> {
  const target = { tabId, frameIds: [frameId] };
  await withServer(target);
  const [r] = await browser.scripting.executeScript({ target, func: askRate });
  return (r?.result as RateReply | undefined) ?? { ok: false, reason: 'not-told' };
}

/** The frame at req.t of the video measured in the tab (and frame) given. */
export async function readPageFrame(tabId: number, frameId: number, req: FrameRequest): Promise<PageFrame> {
  const target = { tabId, frameIds: [frameId] };
  const ask = async () => (await browser.scripting.executeScript({ target, func: askOverlay, args: [req] }))[0]?.result as FrameReply | undefined;
  // one round trip a frame: the server is looked for only when the overlay answers that it has none
  let reply = await ask();
  if (reply && !reply.ok && reply.reason === 'no-session') {
    await withServer(target);
    reply = await ask();
  }
  if (!reply) throw new FrameReadError('no-answer');
  if (!reply.ok) throw new FrameReadError(reply.reason);
  return decodeFrame(reply);
}

/** What the follow page needs to know of the measured video: its length and intrinsic size. */
export interface VideoFacts {
  duration: number;
  width: number;
  height: number;
}

/** Self-contained (it runs in the tab's isolated world): the measured video's facts, or null with no overlay there. */
function factsThere(): VideoFacts | null {
  const reg = (globalThis as unknown as Record<symbol, { sessions?: Map<HTMLVideoElement, unknown> } | undefined>)[Symbol.for('clip-caliper.overlay')];
  const v = reg?.sessions ? [...reg.sessions.keys()][0] : undefined;
  return v ? { duration: v.duration, width: v.videoWidth, height: v.videoHeight } : null;
}

export async function readVideoFacts(tabId: number, frameId: number): Promise<VideoFacts> {
  const [r] = await browser.scripting.executeScript({ target: { tabId, frameIds: [frameId] }, func: factsThere });
  const facts = r?.result as VideoFacts | null | undefined;
  if (!facts) throw new FrameReadError('no-session');
  return facts;
}

/** Self-contained (it runs in the tab's isolated world): the overlay's paused frame, whole. */
function askPicture(): Promise<PictureReply> | PictureReply {
  const reg = (globalThis as unknown as Record<symbol, { picture?: () => Promise<PictureReply> } | undefined>)[Symbol.for('clip-caliper.overlay')];
  return reg?.picture ? reg.picture() : { ok: false, reason: 'no-session' };
}

/**
 * The paused frame of the video measured in the tab, whole and in colour (the annotated frame), by
 * the same path as the follower's frames: the answer comes straight back to the extension.
 */
export async function readPagePicture(tabId: number, frameId: number): Promise<Extract<PictureReply, { ok: true }>> {
  const target = { tabId, frameIds: [frameId] };
  await withServer(target);
  const [r] = await browser.scripting.executeScript({ target, func: askPicture });
  const reply = r?.result as PictureReply | undefined;
  if (!reply) throw new FrameReadError('no-answer');
  if (!reply.ok) throw new FrameReadError(reply.reason);
  // what came back must be a PNG of the size it says; anything else is not drawn on
  if (!reply.png.startsWith('data:image/png;base64,') || !(reply.width > 0 && reply.height > 0)) throw new FrameReadError('no-pixels');
  return reply;
}

/*
 * The contract for frames an extension page reads from the measured video (issue 15): asked through
 * the scripting API, served by the overlay (overlay/frame-server.ts), read by the page
 * (follow/page-frames.ts). A frame is 8-bit luma in base64 for a region of the video's intrinsic
 * pixels, averaged over step x step blocks.
 */

export interface FrameRequest {
  /** Media time to show, s. */
  t: number;
  /** The region, intrinsic px (clamped to the picture). */
  x: number;
  y: number;
  width: number;
  height: number;
  /** Block side, 1 (full resolution) to MAX_STEP. */
  step: number;
}

export type FrameReply =
  | { ok: true; t: number; x: number; y: number; width: number; height: number; step: number; source: 'video' | 'capture'; luma: string }
  | { ok: false; reason: 'bad-request' | 'no-session' | 'no-pixels' | 'seek-timeout' };

/** The coarsest block side a page may ask for. */
export const MAX_STEP = 16;

/**
 * The paused frame whole and in colour, for the annotated frame (issue 15 point 7): a PNG (lossless,
 * so the marks are drawn over the very pixels measured) as a data URL, with the time it shows and
 * where its pixels came from.
 */
export type PictureReply =
  | { ok: true; t: number; width: number; height: number; source: 'video' | 'capture'; png: string }
  | { ok: false; reason: 'no-session' | 'no-pixels' };

/** The clip's frame rate as the browser's presented frames tell it (frame-period.ts), or why not. */
export type RateReply =
  | { ok: true; fps: number; periodS: number; frames: number }
  | { ok: false; reason: 'no-session' | 'not-told' };

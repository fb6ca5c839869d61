import type { FollowedFrame, FollowSeed } from '../../src/case';

/*
 * A correction on the follow page's strip, as plain arithmetic: which ends a chosen frame starts
 * from, the enlarged view of the picture round them and its mapping to the video's pixels, and the
 * keyboard's nudges. No browser here (test/extension/follow/corrections.test.ts).
 */

export interface Pt {
  x: number;
  y: number;
}

/** A region of the video (intrinsic px, whole pixels) drawn `scale` times enlarged. */
export interface Zoom {
  x: number;
  y: number;
  width: number;
  height: number;
  scale: number;
}

/** Largest and least enlargement of the view. */
export const MAX_SCALE = 8;

/**
 * The ends a chosen frame's correction starts from: its own, or for a lost frame the nearest
 * trusted frame's on the way back to the mark it was followed from (a starting place to move, not a
 * guess: nothing is kept until the user places both ends). Null when no frame of the run has ends.
 */
export function startEnds(frames: readonly (FollowedFrame | undefined)[], index: number): [Pt, Pt] | null {
  const own = frames[index];
  if (own?.ends) return [{ x: own.ends[0].x, y: own.ends[0].y }, { x: own.ends[1].x, y: own.ends[1].y }];
  const toward = own && own.from < index ? -1 : 1;
  for (const dir of [toward, -toward]) {
    for (let k = index + dir; k >= 0 && k < frames.length; k += dir) {
      const e = frames[k]?.ends;
      if (e) return [{ x: e[0].x, y: e[0].y }, { x: e[1].x, y: e[1].y }];
    }
  }
  return null;
}

/** The region round both ends (a margin of half the span, at least 16 px) enlarged to fit `fitPx`. */
export function zoomFor(ends: readonly [Pt, Pt], videoW: number, videoH: number, fitPx = 640): Zoom {
  const span = Math.hypot(ends[1].x - ends[0].x, ends[1].y - ends[0].y);
  const margin = Math.max(16, Math.ceil(span / 2));
  const x = Math.max(0, Math.floor(Math.min(ends[0].x, ends[1].x) - margin));
  const y = Math.max(0, Math.floor(Math.min(ends[0].y, ends[1].y) - margin));
  const width = Math.max(1, Math.min(videoW, Math.ceil(Math.max(ends[0].x, ends[1].x) + margin)) - x);
  const height = Math.max(1, Math.min(videoH, Math.ceil(Math.max(ends[0].y, ends[1].y) + margin)) - y);
  const scale = Math.max(1, Math.min(MAX_SCALE, Math.floor(fitPx / Math.max(width, height))));
  return { x, y, width, height, scale };
}

/**
 * A point of the enlarged view (CSS px from its top-left corner) in the video's intrinsic pixels.
 * Pixel k of the video covers [k, k + 1): its centre is k + 0.5, as the overlay's mapping has it.
 */
export const toVideo = (z: Zoom, px: number, py: number): Pt => ({ x: z.x + px / z.scale, y: z.y + py / z.scale });
export const toView = (z: Zoom, p: Pt): Pt => ({ x: (p.x - z.x) * z.scale, y: (p.y - z.y) * z.scale });

/** Arrow keys move the chosen end a tenth of a pixel, a whole one with Shift (keyboard placement). */
export function nudge(ends: readonly [Pt, Pt], which: 0 | 1, key: string, shift: boolean): [Pt, Pt] | null {
  const d = shift ? 1 : 0.1;
  const step: Record<string, Pt> = { ArrowLeft: { x: -d, y: 0 }, ArrowRight: { x: d, y: 0 }, ArrowUp: { x: 0, y: -d }, ArrowDown: { x: 0, y: d } };
  const s = step[key];
  if (!s) return null;
  const out: [Pt, Pt] = [{ ...ends[0] }, { ...ends[1] }];
  out[which] = { x: out[which].x + s.x, y: out[which].y + s.y };
  return out;
}

/** The correction as a seed for the engine's reseed: the user's ends with a hand mark's sigma. */
export function correctionSeed(index: number, ends: readonly [Pt, Pt], sigmaPx: number): FollowSeed {
  return { frame: index, ends: [{ x: ends[0].x, y: ends[0].y, sigmaPx }, { x: ends[1].x, y: ends[1].y, sigmaPx }] };
}

/*
 * The clip's frame period from the frames the browser presents (issue 15: the frame rate from the
 * video, not typed). No DOM here: `presented(t)` seeks to t and answers the media time of the frame
 * the browser then shows (requestVideoFrameCallback's mediaTime, frame-server.ts), or null when it
 * did not say in time. Seeking to t shows the frame whose presentation interval holds t.
 */

/** Rates in common use (film, PAL, NTSC and their doubles; common practice), snapped to within 0.1 %. */
export const COMMON_RATES = [23.976, 24, 25, 29.97, 30, 48, 50, 59.94, 60, 100, 119.88, 120] as const;

export interface MeasuredRate {
  fps: number;
  /** The period as measured (before any snap), s. */
  periodS: number;
  /** Frames the period was averaged over. */
  frames: number;
}

const EPS = 1e-4; // media times within 0.1 ms are the same frame (container clocks tick in 1 ms or finer)

/**
 * The period: from the frame shown at t0 (at m0), steps of 1/256 s (below the period of 240 fps, the most a plan takes) doubled until another frame
 * shows (at m1); the step before showed m0, so the next frame starts past half the step and m1 is
 * that next frame: P ~ m1 - m0. Then frames further on, to about `spanS`, are asked for, and P is
 * the distance over the whole number of frames between, which averages out a container clock's rounding (30 fps in
 * whole milliseconds is 33 and 34 ms by turns). Null when the browser did not say, the clip ended
 * first, or the frames are not evenly spaced (a frame not where the period foretells).
 */
export async function measurePeriod(presented: (t: number) => Promise<number | null>, t0: number, duration: number, spanS = 2): Promise<MeasuredRate | null> {
  const end = Number.isFinite(duration) && duration > 0 ? duration : Number.POSITIVE_INFINITY;
  const m0 = await presented(t0);
  if (m0 === null) return null;
  let m1: number | null = null;
  for (let d = 1 / 256; d <= 1.01; d *= 2) {
    if (m0 + d >= end) return null;
    const m = await presented(m0 + d);
    if (m === null) return null;
    if (m > m0 + EPS) {
      m1 = m;
      break;
    }
  }
  if (m1 === null) return null;
  let period = m1 - m0;
  let counted = 1;
  // ever further frames (4, 16, 64 ... on, to about spanS), each asked for mid-frame so that a clock's
  // rounding cannot tip it, each refining the period the next one is placed by
  for (let n = 4; ; n *= 4) {
    const k = Math.min(n, Math.max(2, Math.round(spanS / period)));
    if (k <= counted || m0 + (k + 1) * period >= end) break;
    const mk = await presented(m0 + (k + 0.5) * period);
    if (mk === null) return null;
    const frames = Math.round((mk - m0) / period);
    // not the frame the period foretells: the frames are not evenly spaced
    if (frames !== k || Math.abs(mk - m0 - k * period) > 0.25 * period) return null;
    period = (mk - m0) / k;
    counted = k;
  }
  if (counted < 2) return null;
  return { fps: snapRate(1 / period), periodS: period, frames: counted };
}

/** A measured rate put on the nearest common rate when within 0.1 % of it; else to 3 decimals. */
export function snapRate(fps: number): number {
  const near = [...COMMON_RATES].sort((a, b) => Math.abs(fps - a) - Math.abs(fps - b))[0]!;
  return Math.abs(fps - near) <= 0.001 * near ? near : Math.round(fps * 1000) / 1000;
}

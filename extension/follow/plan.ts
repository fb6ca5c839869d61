import type { FollowedFrame, FollowSettings, Mark } from '../../src/case';

/*
 * What a follow asks of the video and what it gives back to the case, as plain arithmetic: which
 * media time each frame index stands for, which region of the picture the follower may look at
 * round the object, and the marks an accepted run adds. No browser here (test/extension/follow).
 */

export interface FollowPlan {
  /** Media time of frame 0, s, and the step between frames (1 / frame rate). */
  t0: number;
  dt: number;
  /** Frames in the stretch followed, and the seed's index among them. */
  count: number;
  seedIndex: number;
}

export const MIN_FPS = 1;
export const MAX_FPS = 240;
/** The longest stretch a run follows: 2 minutes at 30 frames a second. */
export const MAX_FRAMES = 3_600;

/** A field the user set, refused with its name and the range it allows. */
export class PlanError extends Error {}

/**
 * Frame times across [from, to] at `fps`, placed so that the seed's own time is one of them: each
 * step then lands at the same place within its frame as the user's mark did.
 */
export function planFollow(seedT: number, from: number, to: number, fps: number, duration: number): FollowPlan {
  const end = Number.isFinite(duration) && duration > 0 ? duration : Number.POSITIVE_INFINITY;
  if (!(fps >= MIN_FPS && fps <= MAX_FPS)) throw new PlanError(`Frame rate: expected ${MIN_FPS} to ${MAX_FPS} frames a second, got ${fps}`);
  if (!(from >= 0 && from <= seedT)) throw new PlanError(`From: expected 0 s to the marked frame's ${seedT.toFixed(3)} s, got ${from}`);
  if (!(to >= seedT && to <= end)) throw new PlanError(`To: expected the marked frame's ${seedT.toFixed(3)} s to the clip's end${end < Infinity ? ` (${end.toFixed(3)} s)` : ''}, got ${to}`);
  const dt = 1 / fps;
  const before = Math.floor((seedT - from) / dt + 1e-9);
  const after = Math.floor((to - seedT) / dt + 1e-9);
  const count = before + after + 1;
  if (count > MAX_FRAMES) throw new PlanError(`From and To: at most ${MAX_FRAMES} frames at a time, got ${count} (${fps} a second)`);
  return { t0: seedT - before * dt, dt, count, seedIndex: before };
}

export const timeOf = (p: FollowPlan, index: number): number => p.t0 + index * p.dt;

export interface Region {
  x: number;
  y: number;
  width: number;
  height: number;
}

/**
 * Room the follower may use round the last ends it trusted: its widest search after a loss (4 times
 * the search radius), the largest patch (33 px) and the snap's window, with some to spare. What lies
 * outside reaches it as black, so this errs wide.
 */
export function regionAround(ends: readonly { x: number; y: number }[], width: number, height: number, searchPx: number): Region {
  const margin = Math.ceil(4 * searchPx + 33 + 24);
  const xs = ends.map((e) => e.x);
  const ys = ends.map((e) => e.y);
  const x = Math.max(0, Math.floor(Math.min(...xs) - margin));
  const y = Math.max(0, Math.floor(Math.min(...ys) - margin));
  const right = Math.min(width, Math.ceil(Math.max(...xs) + margin));
  const bottom = Math.min(height, Math.ceil(Math.max(...ys) + margin));
  return { x, y, width: Math.max(1, right - x), height: Math.max(1, bottom - y) };
}

/** The id of the hand mark a correction on frame `index` becomes when the run is accepted. */
export const correctionId = (runId: string, index: number) => `${runId}-hand-${index}`;

/**
 * The marks an accepted run adds: one object span per followed frame, and one hand mark per frame
 * the user corrected (`corrected`; the engine's seed there, its ends snapped as a hand mark's). The
 * first hand mark is the seed itself and adds nothing. A followed frame records the mark it was
 * followed from: the seed, or the correction it was re-run from.
 */
export function followedMarks(
  frames: readonly FollowedFrame[],
  plan: FollowPlan,
  seed: Mark,
  settings: FollowSettings,
  runId: string,
  now: number,
  corrected: ReadonlySet<number> = new Set(),
): Mark[] {
  const { first: _first, last: _last, ...kept } = settings;
  const hand = (f: FollowedFrame) => f.status === 'seed' && corrected.has(f.index);
  return frames
    .filter((f) => f.ends && (f.status === 'followed' || hand(f)))
    .map((f) => {
      const [a, b] = f.ends!;
      const from = corrected.has(f.from) ? correctionId(runId, f.from) : seed.id;
      return {
        id: hand(f) ? correctionId(runId, f.index) : `${runId}-${f.index}`,
        kind: 'object-span',
        t: timeOf(plan, f.index),
        points: [
          { x: a.x, y: a.y },
          { x: b.x, y: b.y },
        ],
        // one sigma for both ends (a mark carries one): their root mean square
        edgeSigmaPx: Math.sqrt((a.sigmaPx ** 2 + b.sigmaPx ** 2) / 2),
        ...(seed.dimension ? { dimension: seed.dimension } : {}),
        ...(hand(f) ? {} : { followed: { from, run: runId, confidence: f.confidence, match: Number.isFinite(f.match) ? f.match : 0, settings: kept } }),
        mapping: seed.mapping,
        createdAt: now,
      };
    });
}

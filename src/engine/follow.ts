import { InputError } from './errors';
import { checkGray, noiseSigma, type Gray } from './gray';
import { cutTemplate, matchTemplate, type Template } from './match';
import { centreAcross } from './span-across';
import { snapSpanEnds, SNAP_FLOOR_PX, type EndInput } from './span-ends';
import { inRange, integer } from './validate';

/*
 * Following the object through the clip from one marked frame (issue 15, point 1).
 *
 * Each end of the span is found in the next frame by template matching (match.ts: a patch around
 * the end, cut from the last frame the follow trusted, searched around the position its motion
 * predicts) and then refined to the edge along the span's line by the same snap as a hand mark
 * (span-ends.ts), which gives the end its sigma. Two small patches rather than one around the whole
 * object let the span grow, shrink and turn as the object approaches and banks.
 *
 * A patch is kept while it still matches well (a key frame) rather than cut again every frame: the
 * sub-pixel error of a match would otherwise add up across the line from frame to frame, where no
 * snap corrects it.
 *
 * A frame is reported lost, with the reason, whenever any step fails: the predicted or matched end
 * leaves the picture, a patch no longer matches, the edge is not where the match puts it, or the span
 * changed more than an object can between frames. A lost frame never carries a position. The follow
 * keeps trying for a bounded number of frames, in a widening window and with a stricter match, and
 * then gives up on the rest of that direction.
 */

export interface FrameSource {
  /** Number of frames in the clip. */
  count: number;
  /** Frame index as luminance; every frame must have the seed frame's size. */
  frame(index: number): Gray;
}

/** A hand mark to follow from: its frame and its two ends (intrinsic px) with their sigmas. */
export interface FollowSeed {
  frame: number;
  ends: readonly [EndInput, EndInput];
}

export interface FollowSettings {
  /** Search radius per frame since the last trusted one, px: how far the motion may stray from the prediction. */
  searchPx: number;
  /** Least NCC peak for a match (1 = identical up to brightness and contrast). */
  minMatch: number;
  /** Least NCC peak to pick the object up again after a lost frame. */
  reacquireMatch: number;
  /** Frames tried after the last trusted one before the rest of that direction is given up. */
  maxLostFrames: number;
  /** Largest change of the span per frame, as a share of its length (at least 1.5 px). */
  maxSpanChange: number;
  /** First and last frame to follow (default: the whole clip). */
  first: number;
  last: number;
}

export const DEFAULT_FOLLOW: Omit<FollowSettings, 'first' | 'last'> = {
  searchPx: 12,
  minMatch: 0.8,
  reacquireMatch: 0.9,
  maxLostFrames: 10,
  maxSpanChange: 0.04,
};

export type LostReason = 'left the picture' | 'no match' | 'edge not found' | 'span jumped' | 'not re-acquired';

export interface FollowedEnd {
  x: number;
  y: number;
  /** One-sigma error along the span, px (the snap's, as for a hand mark). */
  sigmaPx: number;
}

export interface FollowedFrame {
  index: number;
  /** seed: a hand mark (the first, or a correction); followed: found by the follow; lost: not found. */
  status: 'seed' | 'followed' | 'lost';
  reason: LostReason | null;
  /** The span's ends, end 1 as the seed's end 1; null when lost. */
  ends: readonly [FollowedEnd, FollowedEnd] | null;
  /** 0 to 1: the weaker end's match above the threshold times how close the ends' sigmas come to the snap's floor. */
  confidence: number;
  /** The weaker end's NCC peak over the most the picture's noise lets it reach (NaN where no match was made). */
  match: number;
  /** The hand-marked frame this frame was followed from (its own index for a seed). */
  from: number;
}

export interface FollowRun {
  settings: FollowSettings;
  /** One entry per frame from settings.first to settings.last. */
  frames: FollowedFrame[];
}

/** Margin the snap needs beyond an end inside the picture (its window and background sample), px. */
const EDGE_MARGIN_PX = 3;
/** A key patch is cut again when its match falls below this or the span changed by this share. */
const REFRESH_MATCH = 0.95;
const REFRESH_SPAN = 0.1;
/** Least share of a patch's variance that must be the picture's rather than the noise's. */
const MIN_CEILING = 0.5;
/** The wider window after a loss grows to at most this many times searchPx. */
const MAX_WIDEN = 4;

interface Pt {
  x: number;
  y: number;
}
interface Key {
  t: Template;
  /** The end the patch was cut around. */
  at: Pt;
  /**
   * The most NCC can reach against this patch in a frame as noisy as the one it was cut from:
   * S / (S + N) with S the patch's variance less the noise's N, both frames carrying noise N.
   */
  ceiling: number;
}
interface Track {
  index: number;
  ends: [Pt, Pt];
  /** The trusted frame before (for the velocity), or null. */
  before: { index: number; ends: [Pt, Pt] } | null;
  keys: [Key, Key] | null;
  keyLength: number;
}

function settle(source: FrameSource, options: Partial<FollowSettings>): FollowSettings {
  if (typeof source !== 'object' || source === null || typeof source.frame !== 'function') throw new InputError('frames', source, 'an object with count and frame(index)');
  integer('frame count', source.count, 1, 10_000_000);
  const s: FollowSettings = { ...DEFAULT_FOLLOW, first: 0, last: source.count - 1, ...options };
  inRange('search radius', s.searchPx, 1, 100, ' px');
  inRange('least match', s.minMatch, 0, 0.999);
  inRange('least match to re-acquire', s.reacquireMatch, s.minMatch, 0.999);
  integer('frames tried after a loss', s.maxLostFrames, 0, 1000);
  inRange('span change per frame', s.maxSpanChange, 0, 1);
  integer('first frame', s.first, 0, source.count - 1);
  integer('last frame', s.last, s.first, source.count - 1);
  return s;
}

/** A frame as given, checked and held to the size of the first one given. */
function sizeKeeper(): (img: Gray, index: number) => Gray {
  let size: { width: number; height: number } | null = null;
  return (img, index) => {
    checkGray(img);
    if (size && (img.width !== size.width || img.height !== size.height)) {
      throw new InputError(`frame ${index} size`, `${img.width} x ${img.height}`, `${size.width} x ${size.height} (the seed frame's)`);
    }
    size = { width: img.width, height: img.height };
    return img;
  };
}

/** Frames as an array (already decoded) made a source. */
export function framesOf(frames: readonly Gray[]): FrameSource {
  return { count: frames.length, frame: (i) => frames[i]! };
}

/**
 * Follows the object from the seed forward to settings.last and backward to settings.first. The
 * seed's ends are snapped as a hand mark's are (an end the snap does not improve stays as placed).
 */
export function follow(source: FrameSource, seed: FollowSeed, options: Partial<FollowSettings> = {}): FollowRun {
  const s = settle(source, options);
  const frames: FollowedFrame[] = new Array<FollowedFrame>(s.last - s.first + 1);
  followFrom(source, seed, s, s.first, s.last, frames);
  return { settings: s, frames };
}

/**
 * A correction on one frame re-seeds the follow from there: the frames that had been followed from
 * the same hand mark as the corrected one, on its far side from that mark, are followed again from
 * the correction; every other frame (the near side, other hand marks and what was followed from them)
 * stays as it was. Correcting a hand mark itself re-runs both of its sides.
 */
export function reseed(run: FollowRun, source: FrameSource, correction: FollowSeed): FollowRun {
  const r = reseedSteps(run, correction);
  for (let k = r.steps.next(); !k.done; ) k = r.steps.next(source.frame(k.value));
  return r.run;
}

/**
 * The frames a correction on frame c re-runs, [lo, hi]: those followed from the same hand mark as c,
 * on c's far side from that mark (both sides when c is a hand mark), up to the next hand mark.
 */
export function reseedRange(run: FollowRun, c: number): [number, number] {
  const s = run.settings;
  if (run.frames.length !== s.last - s.first + 1) throw new InputError('run frames', run.frames.length, `${s.last - s.first + 1} (first to last frame)`);
  integer('corrected frame', c, s.first, s.last);
  const origin = run.frames[c - s.first]!.from;
  // the stretch of frames followed from the same mark, on the correction's side of it
  const same = (k: number) => k >= s.first && k <= s.last && run.frames[k - s.first]!.from === origin && run.frames[k - s.first]!.status !== 'seed';
  let lo = c;
  let hi = c;
  if (c >= origin) while (same(hi + 1)) hi++;
  if (c <= origin) while (same(lo - 1)) lo--;
  return [lo, hi];
}

/**
 * reseed() one frame at a time, as followSteps is to follow(): yields the index of the frame it
 * needs next and takes it back through next(); `run` is a new run (the given one is not changed)
 * whose frames in reseedRange are replaced as they are known.
 */
export function reseedSteps(run: FollowRun, correction: FollowSeed): { run: FollowRun; steps: Generator<number, void, Gray> } {
  // the same settings as the run, so that every frame of it was followed alike
  const s = settle({ count: run.settings.last + 1, frame: () => ({ data: new Uint8ClampedArray(1), width: 1, height: 1, channels: 1 }) }, run.settings);
  const [lo, hi] = reseedRange(run, correction.frame);
  const frames = run.frames.slice();
  return { run: { settings: s, frames }, steps: stepsFrom(correction, s, lo, hi, frames, s.first) };
}

function checkSeed(seed: FollowSeed): void {
  if (typeof seed !== 'object' || seed === null || !Array.isArray(seed.ends) || seed.ends.length !== 2) {
    throw new InputError('seed', seed, 'an object with frame and two ends');
  }
  seed.ends.forEach((e: EndInput, k) => {
    if (typeof e !== 'object' || e === null) throw new InputError(`seed end ${k + 1}`, e, 'an object with x, y, sigmaPx');
    inRange(`seed end ${k + 1} x`, e.x, -1e6, 1e6, ' px');
    inRange(`seed end ${k + 1} y`, e.y, -1e6, 1e6, ' px');
    inRange(`seed end ${k + 1} sigma`, e.sigmaPx, 0, 50, ' px');
  });
}

/**
 * The follow one frame at a time, for a caller whose frames arrive one by one (an extension page
 * reading them from the video): yields the index of the frame it needs next and takes that frame
 * back through next(); `out` holds each frame's result as soon as it is known. follow() drives the
 * same steps from a source at hand, so both give the same run.
 */
export function followSteps(count: number, seed: FollowSeed, options: Partial<FollowSettings> = {}): { run: FollowRun; steps: Generator<number, void, Gray> } {
  const s = settle({ count, frame: () => ({ data: new Uint8ClampedArray(1), width: 1, height: 1, channels: 1 }) }, options);
  const frames: FollowedFrame[] = new Array<FollowedFrame>(s.last - s.first + 1);
  return { run: { settings: s, frames }, steps: stepsFrom(seed, s, s.first, s.last, frames, s.first) };
}

function followFrom(source: FrameSource, seed: FollowSeed, s: FollowSettings, lo: number, hi: number, out: FollowedFrame[], base = lo): void {
  const steps = stepsFrom(seed, s, lo, hi, out, base);
  for (let r = steps.next(); !r.done; ) r = steps.next(source.frame(r.value));
}

function* stepsFrom(seed: FollowSeed, s: FollowSettings, lo: number, hi: number, out: FollowedFrame[], base: number): Generator<number, void, Gray> {
  checkSeed(seed);
  integer('seed frame', seed.frame, lo, hi);
  const sized = sizeKeeper();
  const img = sized(yield seed.frame, seed.frame);
  // a hand mark refined as the followed ends are; if either end finds no edge, the mark stands as placed
  const ends = refine(img, seed.ends[0], seed.ends[1], seed.ends) ?? ([{ ...seed.ends[0] }, { ...seed.ends[1] }] as [FollowedEnd, FollowedEnd]);
  out[seed.frame - base] = { index: seed.frame, status: 'seed', reason: null, ends, confidence: 1, match: Number.NaN, from: seed.frame };
  for (const dir of [1, -1] as const) {
    const track: Track = { index: seed.frame, ends: [{ ...ends[0] }, { ...ends[1] }], before: null, keys: null, keyLength: 0 };
    cutKeys(img, track);
    let lost = 0;
    for (let k = seed.frame + dir; k >= lo && k <= hi; k += dir) {
      if (lost > s.maxLostFrames) {
        out[k - base] = lostFrame(k, 'not re-acquired', seed.frame);
        continue;
      }
      const f = step(sized(yield k, k), k, track, s, seed.frame, lost > 0);
      out[k - base] = f;
      lost = f.status === 'lost' ? lost + 1 : 0;
    }
  }
}

function lostFrame(index: number, reason: LostReason, from: number, match = Number.NaN): FollowedFrame {
  return { index, status: 'lost', reason, ends: null, confidence: 0, match, from };
}

function spanLength(e: readonly [Pt, Pt]): number {
  return Math.hypot(e[1].x - e[0].x, e[1].y - e[0].y);
}

/** Patches around both ends of the track's trusted frame (null when either has no structure). */
function cutKeys(img: Gray, track: Track): void {
  const len = spanLength(track.ends);
  // half the span, odd, 9 to 33 px: enough of the object and the sky beyond the end to lock on
  const side = Math.min(33, Math.max(9, 2 * Math.round(len / 4) + 1));
  const keys = track.ends.map((e) => {
    const t = cutTemplate(img, Math.round(e.x) - (side >> 1), Math.round(e.y) - (side >> 1), side, side);
    if (!t) return null;
    const noise = noiseSigma(img, e.x, e.y, 1, 0, side >> 1) ** 2;
    const ceiling = Math.max(0, t.variance - noise) / t.variance;
    // a patch that is mostly noise cannot be followed
    return ceiling >= MIN_CEILING ? { t, at: { x: e.x, y: e.y }, ceiling } : null;
  });
  track.keys = keys[0] && keys[1] ? [keys[0], keys[1]] : null;
  track.keyLength = len;
}

function inside(img: Gray, p: Pt): boolean {
  return p.x >= EDGE_MARGIN_PX && p.x <= img.width - EDGE_MARGIN_PX && p.y >= EDGE_MARGIN_PX && p.y <= img.height - EDGE_MARGIN_PX;
}

/**
 * Both ends centred across the line, snapped along it, and centred again on the snapped line; null
 * when either end's edge is not found. Without given sigmas the ends claim 50 px (the most an end
 * may), so that any edge the snap finds is taken.
 */
function refine(img: Gray, a: Pt, b: Pt, given?: readonly [EndInput, EndInput]): [FollowedEnd, FollowedEnd] | null {
  const [c1, c2] = centreAcross(img, a, b);
  const snapped = snapSpanEnds(img, [{ ...c1, sigmaPx: given?.[0].sigmaPx ?? 50 }, { ...c2, sigmaPx: given?.[1].sigmaPx ?? 50 }], 'both');
  if (snapped.some((r) => r.outcome !== 'snapped')) return null;
  const [d1, d2] = centreAcross(img, snapped[0], snapped[1]);
  return [
    { x: d1.x, y: d1.y, sigmaPx: snapped[0].sigmaPx },
    { x: d2.x, y: d2.y, sigmaPx: snapped[1].sigmaPx },
  ];
}

function step(img: Gray, k: number, track: Track, s: FollowSettings, from: number, afterLoss: boolean): FollowedFrame {
  if (!track.keys) return lostFrame(k, 'no match', from);
  const n = Math.abs(k - track.index);
  const b = track.before;
  // constant velocity from the last two trusted frames
  const pred = track.ends.map((e, i) => {
    if (!b) return { ...e };
    const d = (k - track.index) / (track.index - b.index);
    return { x: e.x + d * (e.x - b.ends[i]!.x), y: e.y + d * (e.y - b.ends[i]!.y) };
  });
  if (!pred.every((p) => inside(img, p))) return lostFrame(k, 'left the picture', from);
  const radius = s.searchPx * Math.min(n, MAX_WIDEN);
  const least = afterLoss ? s.reacquireMatch : s.minMatch;
  const found: Pt[] = [];
  let weakest = 1;
  for (let i = 0; i < 2; i++) {
    const key = track.keys[i]!;
    const m = matchTemplate(img, key.t, pred[i]!.x - key.at.x, pred[i]!.y - key.at.y, radius);
    // the thresholds hold for a clean picture; noise lowers every score by the patch's ceiling
    const score = m.score / key.ceiling;
    weakest = Math.min(weakest, score);
    if (m.atEdge || !(score >= least)) return lostFrame(k, 'no match', from, m.score);
    found.push({ x: key.at.x + m.dx, y: key.at.y + m.dy });
  }
  const [f1, f2] = found as [Pt, Pt];
  if (!inside(img, f1) || !inside(img, f2)) return lostFrame(k, 'left the picture', from, weakest);
  const len = spanLength(track.ends);
  const limit = Math.max(1.5, s.maxSpanChange * n * len);
  const jumped = (e: readonly [Pt, Pt]) =>
    Math.hypot(e[1].x - e[0].x - (track.ends[1].x - track.ends[0].x), e[1].y - e[0].y - (track.ends[1].y - track.ends[0].y)) > limit;
  if (jumped([f1, f2])) return lostFrame(k, 'span jumped', from, weakest);
  // the match only places the ends; the snap finds the edges along the line, after the ends are
  // centred across it, and its sigma is the end's (50 px: the largest sigma an end may claim, so
  // that any edge found is taken)
  const ends = refine(img, f1, f2);
  if (!ends) return lostFrame(k, 'edge not found', from, weakest);
  if (jumped(ends)) return lostFrame(k, 'span jumped', from, weakest);
  track.before = { index: track.index, ends: track.ends };
  track.index = k;
  track.ends = [{ x: ends[0].x, y: ends[0].y }, { x: ends[1].x, y: ends[1].y }];
  if (weakest < REFRESH_MATCH || Math.abs(spanLength(ends) - track.keyLength) > REFRESH_SPAN * track.keyLength) cutKeys(img, track);
  const matchTerm = Math.min(1, Math.max(0, (weakest - s.minMatch) / (1 - s.minMatch)));
  const edgeTerm = SNAP_FLOOR_PX / Math.max(ends[0].sigmaPx, ends[1].sigmaPx, SNAP_FLOOR_PX);
  return { index: k, status: 'followed', reason: null, ends, confidence: matchTerm * edgeTerm, match: weakest, from };
}

import { describe, expect, it } from 'vitest';
import type { FollowedFrame, Mark } from '../../../src/case';
import { DEFAULT_FOLLOW } from '../../../src/case';
import { correctionId, followedMarks, MAX_FRAMES, planFollow, regionAround, timeOf } from '../../../extension/follow/plan';
import { validateMark } from '../../../src/case/validate';

/*
 * The follow page's arithmetic: frame times, the region round the object, and the marks an
 * accepted run adds (checked by the case file's own validation). Invented numbers throughout.
 */
describe('planFollow', () => {
  it("places a frame exactly at the seed's time and steps 1 / fps either side, within [from, to]", () => {
    const p = planFollow(2.26, 1.0, 3.5, 25, 4.0);
    expect(p.seedIndex).toBe(31); // 1.26 s before the seed holds 31 whole steps of 0.04 s
    expect(timeOf(p, p.seedIndex)).toBeCloseTo(2.26, 12);
    expect(timeOf(p, 0)).toBeGreaterThanOrEqual(1.0);
    expect(timeOf(p, 0) - 0.04).toBeLessThan(1.0);
    expect(timeOf(p, p.count - 1)).toBeLessThanOrEqual(3.5);
    expect(timeOf(p, p.count - 1) + 0.04).toBeGreaterThan(3.5);
  });

  it('refuses a field out of range, naming it and the range', () => {
    expect(() => planFollow(2, 1, 3, 0, 10)).toThrow('Frame rate: expected 1 to 240 frames a second, got 0');
    expect(() => planFollow(2, 2.5, 3, 25, 10)).toThrow("From: expected 0 s to the marked frame's 2.000 s, got 2.5");
    expect(() => planFollow(2, 1, 11, 25, 10)).toThrow("To: expected the marked frame's 2.000 s to the clip's end (10.000 s), got 11");
    expect(() => planFollow(100, 0, 300, 30, 1000)).toThrow(`From and To: at most ${MAX_FRAMES} frames at a time, got 9001 (30 a second)`);
  });
});

describe('regionAround', () => {
  it('holds the ends with room for the widest search, clamped to the picture', () => {
    const r = regionAround([{ x: 600, y: 300 }, { x: 680, y: 310 }], 1280, 720, 12);
    const margin = 4 * 12 + 33 + 24;
    expect(r).toEqual({ x: 600 - margin, y: 300 - margin, width: 80 + 2 * margin, height: 10 + 2 * margin });
    expect(regionAround([{ x: 5, y: 5 }, { x: 20, y: 8 }], 640, 360, 12)).toEqual({ x: 0, y: 0, width: 20 + margin, height: 8 + margin });
  });
});

describe('followedMarks', () => {
  const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };
  const seed: Mark = { id: 'hand', kind: 'object-span', t: 1, points: [{ x: 300, y: 180 }, { x: 330, y: 180 }], edgeSigmaPx: 0.5, dimension: 'wingspan', mapping, createdAt: 1 };
  const end = (x: number, s: number) => ({ x, y: 180, sigmaPx: s });
  const frames: FollowedFrame[] = [
    { index: 0, status: 'followed', reason: null, ends: [end(299, 0.3), end(331, 0.4)], confidence: 0.9, match: 0.99, from: 1 },
    { index: 1, status: 'seed', reason: null, ends: [end(300, 0.5), end(330, 0.5)], confidence: 1, match: Number.NaN, from: 1 },
    { index: 2, status: 'lost', reason: 'no match', ends: null, confidence: 0, match: 0.4, from: 1 },
    { index: 3, status: 'followed', reason: null, ends: [end(301, 0.3), end(329, 0.4)], confidence: 0.7, match: 0.95, from: 1 },
  ];

  it('adds one valid object span per followed frame, at its time, saying how it was found; the seed and lost frames add none', () => {
    const plan = planFollow(1, 0.96, 1.08, 25, 4);
    const marks = followedMarks(frames, plan, seed, { ...DEFAULT_FOLLOW, first: 0, last: 3 }, 'run-x', 5);
    expect(marks.map((m) => [m.id, m.t.toFixed(2)])).toEqual([
      ['run-x-0', '0.96'],
      ['run-x-3', '1.08'],
    ]);
    expect(marks[0]!.edgeSigmaPx).toBeCloseTo(Math.sqrt((0.09 + 0.16) / 2), 12);
    expect(marks[0]!.followed).toEqual({ from: 'hand', run: 'run-x', confidence: 0.9, match: 0.99, settings: DEFAULT_FOLLOW });
    for (const [i, m] of marks.entries()) expect(validateMark(m, `marks[${i}]`, 640, 360)).toEqual(m);
  });

  it('makes a corrected frame a hand mark (not followed) and the frames re-run from it say so', () => {
    // invented: frame 3 corrected, frames 4 and 5 re-run from it; frame 6 lost stays lost and adds nothing
    const plan = planFollow(1, 0.96, 1.2, 25, 4);
    const run: FollowedFrame[] = [
      ...frames.slice(0, 3),
      { index: 3, status: 'seed', reason: null, ends: [end(301, 0.4), end(329, 0.3)], confidence: 1, match: Number.NaN, from: 3 },
      { index: 4, status: 'followed', reason: null, ends: [end(302, 0.3), end(328, 0.3)], confidence: 0.8, match: 0.97, from: 3 },
      { index: 5, status: 'followed', reason: null, ends: [end(303, 0.3), end(327, 0.3)], confidence: 0.8, match: 0.97, from: 3 },
      { index: 6, status: 'lost', reason: 'no match', ends: null, confidence: 0, match: 0.3, from: 3 },
    ];
    const marks = followedMarks(run, plan, seed, { ...DEFAULT_FOLLOW, first: 0, last: 6 }, 'run-y', 5, new Set([3]));
    expect(marks.map((m) => [m.id, m.followed?.from ?? 'hand'])).toEqual([
      ['run-y-0', 'hand'],
      [correctionId('run-y', 3), 'hand'],
      ['run-y-4', correctionId('run-y', 3)],
      ['run-y-5', correctionId('run-y', 3)],
    ]);
    const hand = marks[1]!;
    expect(hand.followed).toBeUndefined();
    expect(hand.t).toBeCloseTo(1.08, 12);
    expect(hand.points).toEqual([{ x: 301, y: 180 }, { x: 329, y: 180 }]);
    for (const [i, m] of marks.entries()) expect(validateMark(m, `marks[${i}]`, 640, 360)).toEqual(m);
  });
});

import { describe, expect, it } from 'vitest';
import type { FollowedFrame } from '../../../src/case';
import { correctionSeed, MAX_SCALE, nudge, startEnds, toVideo, toView, zoomFor } from '../../../extension/follow/corrections';

/*
 * A correction's arithmetic on the follow page: where a chosen frame starts, the enlarged view and its
 * mapping, the keyboard's nudges. Invented numbers throughout; the mapping's convention (pixel k
 * covers [k, k + 1)) is the overlay's (extension/overlay/mapping.ts; common practice in image APIs).
 */
const end = (x: number) => ({ x, y: 180, sigmaPx: 0.3 });
const followed = (index: number, x: number, from: number): FollowedFrame => ({ index, status: 'followed', reason: null, ends: [end(x), end(x + 30)], confidence: 0.9, match: 0.98, from });
const lost = (index: number, from: number): FollowedFrame => ({ index, status: 'lost', reason: 'no match', ends: null, confidence: 0, match: 0.5, from });

describe('startEnds', () => {
  it("takes a frame's own ends, and for a lost frame the nearest trusted ends toward its mark, never inventing any", () => {
    const frames = [followed(0, 100, 2), lost(1, 2), { ...followed(2, 110, 2), status: 'seed' as const }, followed(3, 120, 2), lost(4, 2), lost(5, 2)];
    expect(startEnds(frames, 3)).toEqual([{ x: 120, y: 180 }, { x: 150, y: 180 }]);
    expect(startEnds(frames, 5)![0].x).toBe(120); // back toward the seed at 2
    expect(startEnds(frames, 1)![0].x).toBe(110); // forward toward the seed at 2
    expect(startEnds([lost(0, 0), lost(1, 0)], 1)).toBeNull();
  });
});

describe('zoomFor, toVideo, toView', () => {
  it('holds both ends with a margin, enlarged to fit, clamped to the picture; the two mappings undo each other', () => {
    const z = zoomFor([{ x: 306, y: 180 }, { x: 334, y: 180 }], 640, 360, 640);
    expect(z).toEqual({ x: 290, y: 164, width: 60, height: 32, scale: MAX_SCALE });
    const p = { x: 305.976, y: 180 };
    const v = toView(z, p);
    expect(v.x).toBeCloseTo((305.976 - 290) * 8, 9);
    expect(toVideo(z, v.x, v.y).x).toBeCloseTo(p.x, 12);
    const edge = zoomFor([{ x: 2, y: 3 }, { x: 600, y: 3 }], 640, 360, 640);
    expect(edge.x).toBe(0);
    expect(edge.y).toBe(0);
    expect(edge.x + edge.width).toBeLessThanOrEqual(640);
    expect(edge.scale).toBe(1);
  });
});

describe('nudge and correctionSeed', () => {
  it('moves only the chosen end, a tenth of a pixel or one with Shift; other keys do nothing', () => {
    const e: [{ x: number; y: number }, { x: number; y: number }] = [{ x: 10, y: 10 }, { x: 40, y: 10 }];
    expect(nudge(e, 1, 'ArrowLeft', false)).toEqual([{ x: 10, y: 10 }, { x: 39.9, y: 10 }]);
    expect(nudge(e, 0, 'ArrowDown', true)).toEqual([{ x: 10, y: 11 }, { x: 40, y: 10 }]);
    expect(nudge(e, 0, 'a', false)).toBeNull();
    expect(correctionSeed(7, e, 0.4)).toEqual({ frame: 7, ends: [{ x: 10, y: 10, sigmaPx: 0.4 }, { x: 40, y: 10, sigmaPx: 0.4 }] });
  });
});

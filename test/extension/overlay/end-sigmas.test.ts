import { describe, expect, it } from 'vitest';
import { endSigma, oneSigma, sigmasOf } from '../../../extension/overlay/end-sigmas';
import { LANDMARK_SNAP_FLOOR_PX } from '../../../src/engine/span-ends';

/*
 * A mark stores one sigma for its two ends: their root mean square, sqrt((a^2 + b^2) / 2), the
 * quadratic mean (common practice for one figure standing for two independent errors). Each end's
 * own sigma is kept only while it still gives the stored one.
 */
describe('end sigmas', () => {
  it('one sigma is the quadratic mean of the two ends, and an end alone is its own', () => {
    expect(oneSigma([3, 4])).toBeCloseTo(Math.sqrt(12.5), 12);
    expect(oneSigma([0.5, 0.5])).toBeCloseTo(0.5, 12);
    expect(oneSigma([0.7])).toBe(0.7);
  });

  it("keeps each end's own sigma while it matches the mark, else takes the stored one for both", () => {
    const mark = { points: [{ x: 0, y: 0 }, { x: 10, y: 0 }], edgeSigmaPx: Math.sqrt(12.5) };
    const own = [3, 4];
    const kept = sigmasOf(mark, own);
    expect(kept).toEqual([3, 4]);
    // a copy: editing one end must not change what is stored for the mark
    kept[0] = 9;
    expect(own).toEqual([3, 4]);
    // edited elsewhere (another tab): its sigma no longer matches
    expect(sigmasOf({ ...mark, edgeSigmaPx: 1 }, own)).toEqual([1, 1]);
    expect(sigmasOf(mark, undefined)).toEqual([Math.sqrt(12.5), Math.sqrt(12.5)]);
    expect(sigmasOf(mark, [3])).toEqual([Math.sqrt(12.5), Math.sqrt(12.5)]);
  });

  it("a landmark's end placed by hand is never surer than the snap's floor for it (README: 0.5 px)", () => {
    expect(LANDMARK_SNAP_FLOOR_PX).toBe(0.5);
    expect(endSigma('landmark-span', 0.2)).toBe(0.5);
    expect(endSigma('landmark-span', 0.8)).toBe(0.8);
    expect(endSigma('object-span', 0.2)).toBe(0.2);
  });
});

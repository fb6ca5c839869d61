import { describe, expect, it } from 'vitest';
import { lineAcross } from '../../../extension/overlay/drawing';

/* A horizon is drawn as the whole line through its two points (two-point form of a line, y - ya = k (x - xa)). */
describe('lineAcross', () => {
  it('extends the line through two points to both sides of the box', () => {
    // y = 2x + 3 through (1, 5) and (3, 9), across a box 10 wide: y(0) = 3, y(10) = 23
    expect(lineAcross({ x: 1, y: 5 }, { x: 3, y: 9 }, 10)).toEqual({ y0: 3, y1: 23 });
    // the order of the points does not matter
    expect(lineAcross({ x: 3, y: 9 }, { x: 1, y: 5 }, 10)).toEqual({ y0: 3, y1: 23 });
    // a falling line: y = -0.5x + 100
    const r = lineAcross({ x: 40, y: 80 }, { x: 120, y: 40 }, 200);
    expect(r.y0).toBeCloseTo(100, 12);
    expect(r.y1).toBeCloseTo(0, 12);
  });

  it('draws two points at one x as a level line at the first (no division by zero)', () => {
    expect(lineAcross({ x: 5, y: 7 }, { x: 5, y: 30 }, 100)).toEqual({ y0: 7, y1: 7 });
  });
});

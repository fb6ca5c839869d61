import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  cameraFrameFromEdges,
  centredFrameForAspect,
  frameHeightPx,
  frameWidthPx,
  isInsideFrame,
  toFrameX,
  toFrameY,
  wholeVideoFrame,
  type CameraFrame,
} from '../../src/engine/frame';
import { angleBetweenColumns } from '../../src/engine/camera';
import { DEG, MAX_FRAME_PX } from '../../src/engine/constants';
import { InputError, UndeterminedError } from '../../src/engine/errors';
import { expectInputError } from './expect-error';


describe('wholeVideoFrame', () => {
  it('covers the whole video', () => {
    const f = wholeVideoFrame(1920, 1080);
    expect(f).toEqual({ left: 0, right: 1920, top: 0, bottom: 1080 });
    expect(frameWidthPx(f)).toBe(1920);
    expect(frameHeightPx(f)).toBe(1080);
  });
  it('rejects sizes outside 2 px .. MAX_FRAME_PX', () => {
    expectInputError(() => wholeVideoFrame(1, 1080), 'video width');
    expectInputError(() => wholeVideoFrame(1920, MAX_FRAME_PX + 1), 'video height');
    expectInputError(() => wholeVideoFrame(NaN, 1080), 'video width');
  });
});

describe('cameraFrameFromEdges', () => {
  it('keeps the marked edges; top and bottom default to the video edges', () => {
    expect(cameraFrameFromEdges(1920, 1080, 656, 1264)).toEqual({ left: 656, right: 1264, top: 0, bottom: 1080 });
    expect(cameraFrameFromEdges(1920, 1080, 0, 1920, 140, 940)).toEqual({ left: 0, right: 1920, top: 140, bottom: 940 });
  });

  it('allows 1 px of slack outside the video and no more', () => {
    expect(cameraFrameFromEdges(1920, 1080, -1, 1921).left).toBe(-1);
    expectInputError(() => cameraFrameFromEdges(1920, 1080, -1.5, 1920), 'camera frame left edge');
    expectInputError(() => cameraFrameFromEdges(1920, 1080, 0, 1921.5), 'camera frame right edge');
    expectInputError(() => cameraFrameFromEdges(1920, 1080, 0, 1920, -2), 'camera frame top edge');
    expectInputError(() => cameraFrameFromEdges(1920, 1080, 0, 1920, 0, 1082), 'camera frame bottom edge');
  });

  it('needs right > left and bottom > top by at least 2 px', () => {
    expectInputError(() => cameraFrameFromEdges(1920, 1080, 500, 501), 'camera frame width');
    expectInputError(() => cameraFrameFromEdges(1920, 1080, 900, 500), 'camera frame width');
    expectInputError(() => cameraFrameFromEdges(1920, 1080, 0, 1920, 600, 599), 'camera frame height');
    expect(frameWidthPx(cameraFrameFromEdges(1920, 1080, 500, 502))).toBe(2);
  });

  it('property: any edges either throw InputError or give a frame inside the video (1 px slack)', () => {
    const edge = fc.oneof(fc.double({ min: -5, max: 2000, noNaN: true }), fc.double());
    fc.assert(
      fc.property(edge, edge, edge, edge, (l, r, t, b) => {
        const inX = (v: number) => Number.isFinite(v) && v >= -1 && v <= 1921;
        const inY = (v: number) => Number.isFinite(v) && v >= -1 && v <= 1081;
        const ok = inX(l) && inX(r) && inY(t) && inY(b) && r - l >= 2 && b - t >= 2;
        if (!ok) {
          expect(() => cameraFrameFromEdges(1920, 1080, l, r, t, b)).toThrow(InputError);
          return;
        }
        const f = cameraFrameFromEdges(1920, 1080, l, r, t, b);
        expect(frameWidthPx(f)).toBeGreaterThanOrEqual(2);
        expect(frameHeightPx(f)).toBeGreaterThanOrEqual(2);
      }),
    );
  });
});

describe('centredFrameForAspect', () => {
  it('a 9:16 portrait recording inside a 16:9 video is a centred pillarbox 607.5 px wide', () => {
    const f = centredFrameForAspect(1920, 1080, 9 / 16);
    expect(frameHeightPx(f)).toBe(1080);
    expect(frameWidthPx(f)).toBeCloseTo(607.5, 9);
    expect(f.left).toBeCloseTo((1920 - 607.5) / 2, 9);
    expect(f.left + f.right).toBeCloseTo(1920, 9);
  });

  it('a 2.39:1 recording inside a 16:9 video is a centred letterbox', () => {
    const f = centredFrameForAspect(1920, 1080, 2.39);
    expect(frameWidthPx(f)).toBe(1920);
    expect(frameHeightPx(f)).toBeCloseTo(1920 / 2.39, 9);
    expect(f.top + f.bottom).toBeCloseTo(1080, 9);
  });

  it('the same shape as the video gives the whole video', () => {
    const f = centredFrameForAspect(1920, 1080, 16 / 9);
    expect(frameWidthPx(f)).toBeCloseTo(1920, 9);
    expect(frameHeightPx(f)).toBeCloseTo(1080, 9);
  });

  it('property: the frame is centred, inside the video and has the requested shape', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 100, max: 8000 }),
        fc.integer({ min: 100, max: 8000 }),
        fc.double({ min: 0.1, max: 10, noNaN: true }),
        (vw, vh, a) => {
          let f: CameraFrame;
          try {
            f = centredFrameForAspect(vw, vh, a);
          } catch (e) {
            // only a frame thinner than 2 px may be refused
            expect(e).toBeInstanceOf(UndeterminedError);
            expect(Math.min(vh * a, vw / a)).toBeLessThan(2);
            return;
          }
          expect(frameWidthPx(f) / frameHeightPx(f)).toBeCloseTo(a, 9);
          expect(f.left).toBeGreaterThanOrEqual(-1e-9);
          expect(f.right).toBeLessThanOrEqual(vw + 1e-9);
          expect(f.top).toBeGreaterThanOrEqual(-1e-9);
          expect(f.bottom).toBeLessThanOrEqual(vh + 1e-9);
          expect(f.left + f.right).toBeCloseTo(vw, 6);
          expect(f.top + f.bottom).toBeCloseTo(vh, 6);
          // one side always fills the video
          expect(Math.abs(frameWidthPx(f) - vw) < 1e-6 || Math.abs(frameHeightPx(f) - vh) < 1e-6).toBe(true);
        },
      ),
    );
  });

  it('rejects bad aspects and refuses a frame under 2 px', () => {
    expectInputError(() => centredFrameForAspect(1920, 1080, 0), 'recorded aspect');
    expectInputError(() => centredFrameForAspect(1920, 1080, 11), 'recorded aspect');
    expect(() => centredFrameForAspect(2, 20000, 10)).toThrow(UndeterminedError);
  });
});

describe('toFrameX, toFrameY, isInsideFrame', () => {
  const f = cameraFrameFromEdges(1920, 1080, 656.25, 1263.75);

  it('subtract the frame edge', () => {
    expect(toFrameX(656.25, f)).toBe(0);
    expect(toFrameX(1000, f)).toBeCloseTo(343.75, 12);
    expect(toFrameY(540, f)).toBe(540);
  });

  it('an angle measured in a pillarboxed frame equals the one in the original recording (uniform scale)', () => {
    // Invented scenario: a 1080 x 1920 portrait recording re-uploaded as 1920 x 1080 with pillarbox.
    const box = centredFrameForAspect(1920, 1080, 9 / 16);
    const scale = frameWidthPx(box) / 1080;
    const h = 40 * DEG;
    const inOriginal = angleBetweenColumns(300, 700, 1080, h);
    const inVideo = angleBetweenColumns(toFrameX(box.left + 300 * scale, box), toFrameX(box.left + 700 * scale, box), frameWidthPx(box), h);
    expect(inVideo).toBeCloseTo(inOriginal, 12);
  });

  it('isInsideFrame honours the slack', () => {
    expect(isInsideFrame(700, 10, f)).toBe(true);
    expect(isInsideFrame(655.5, 10, f)).toBe(true);
    expect(isInsideFrame(655, 10, f)).toBe(false);
    expect(isInsideFrame(655, 10, f, 2)).toBe(true);
    expect(isInsideFrame(700, 1081.5, f, 1)).toBe(false);
    expect(isInsideFrame(700, 1081.5, f, 0)).toBe(false);
    expect(isInsideFrame(1263.75, 1080, f, 0)).toBe(true);
  });

  it('reject bad points, slack and frames, naming the field', () => {
    expectInputError(() => toFrameX(NaN, f), 'x');
    expectInputError(() => toFrameY(Infinity, f), 'y');
    expectInputError(() => isInsideFrame(1, 1, f, -1), 'slack');
    expectInputError(() => frameWidthPx({ left: 5, right: 6, top: 0, bottom: 100 }), 'camera frame width');
    expectInputError(() => frameHeightPx({ left: 0, right: 100, top: 50, bottom: 10 }), 'camera frame height');
    expectInputError(() => frameWidthPx({ left: NaN, right: 6, top: 0, bottom: 100 }), 'camera frame left edge');
    expectInputError(() => frameWidthPx(null as unknown as CameraFrame), 'camera frame');
  });

  it('property: toFrameX/Y are shifts, never NaN for valid input, InputError otherwise', () => {
    fc.assert(
      fc.property(fc.oneof(fc.double({ min: -3000, max: 3000, noNaN: true }), fc.double()), (x) => {
        if (!Number.isFinite(x)) {
          expect(() => toFrameX(x, f)).toThrow(InputError);
          return;
        }
        expect(toFrameX(x, f)).toBe(x - 656.25);
        expect(toFrameY(x, f)).toBe(x);
        if (Math.abs(x) < 1e6) expect(toFrameX(x, f) + f.left).toBeCloseTo(x, 9);
      }),
    );
  });
});

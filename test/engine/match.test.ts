import { describe, expect, it } from 'vitest';
import type { Gray } from '../../src/engine/gray';
import { cutTemplate, matchTemplate } from '../../src/engine/match';
import { renderPolygons, type Pt } from './silhouette';

/*
 * The NCC template match against pictures whose content is known exactly: an invented tilted
 * quadrilateral rendered with the exact area each pixel covers (silhouette.ts), and the same shape
 * moved by a known sub-pixel shift. The match must find the shift (a parabola through the NCC
 * peak alone erred by up to 0.19 px here; the Lucas-Kanade steps bring it under 0.02 px); its peak
 * value is NCC's (1 for the same picture, whatever its gain and offset: the definition of
 * normalised cross-correlation). The same search on 1280 x 720 frames gave the same whole-pixel
 * peak and peak value as OpenCV's matchTemplate (TM_CCOEFF_NORMED) (test/bench/cv-compare.ts,
 * DEVELOPERS.md).
 */

const W = 64;
const H = 48;
const shape: Pt[] = [[20, 18], [40, 21], [38, 28], [22, 26]];
const moved = (dx: number, dy: number): Pt[] => shape.map(([x, y]) => [x + dx, y + dy] as const);
const render = (poly: Pt[], background = 200, object = 60): Gray => renderPolygons([poly], { width: W, height: H, background, object, blur: 0.7 });

describe('NCC template match', () => {
  const a = render(shape);
  const tpl = cutTemplate(a, 14, 12, 33, 21)!;

  it('finds a known sub-pixel shift within 0.05 px, with a peak near 1', () => {
    for (const [dx, dy] of [[0, 0], [3.3, -1.6], [-7.5, 2.25], [9.8, 4.1]] as const) {
      const m = matchTemplate(render(moved(dx, dy)), tpl, 0, 0, 12);
      expect(Math.abs(m.dx - dx)).toBeLessThan(0.05);
      expect(Math.abs(m.dy - dy)).toBeLessThan(0.05);
      expect(m.score).toBeGreaterThan(0.97);
      expect(m.atEdge).toBe(false);
    }
  });

  it('is blind to brightness and contrast: a darker, flatter copy matches as well', () => {
    const m = matchTemplate(render(moved(2.5, 1.5), 120, 80), tpl, 0, 0, 6);
    expect(Math.abs(m.dx - 2.5)).toBeLessThan(0.05);
    expect(Math.abs(m.dy - 1.5)).toBeLessThan(0.05);
    expect(m.score).toBeGreaterThan(0.97);
  });

  it('says when the best shift lies on the window edge, and scores a flat picture 0', () => {
    const far = matchTemplate(render(moved(9, 0)), tpl, 0, 0, 4);
    expect(far.atEdge).toBe(true);
    const flat: Gray = { data: new Float32Array(W * H).fill(90), width: W, height: H, channels: 1 };
    expect(matchTemplate(flat, tpl, 0, 0, 4).score).toBe(0);
    expect(cutTemplate(flat, 10, 10, 9, 9)).toBeNull();
  });
});

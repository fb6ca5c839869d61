import { describe, expect, it } from 'vitest';
import type { Gray } from '../../src/engine/gray';
import { landscapeFrame, thinLineMask } from '../../src/engine/landscape-frame';
import { selectPatches, trackPatches } from '../../src/engine/landscape-patches';

// Patches followed across a known shift of an analytic pattern (each pixel is the exact area mean of
// a smooth function, so the shifted picture is the same function moved: the truth is the shift).

function pattern(dx: number, dy: number, w = 320, h = 180): Gray {
  const data = new Float32Array(w * h);
  const f = (x: number, y: number) => 120 + 40 * Math.sin(x / 5.3) * Math.cos(y / 4.1) + 25 * Math.sin((x + 2 * y) / 9.7);
  for (let j = 0; j < h; j++) {
    for (let i = 0; i < w; i++) {
      // the mean over the pixel by a 4 x 4 midpoint rule: close to the area mean for this smooth pattern
      let s = 0;
      for (let b = 0; b < 4; b++) for (let a = 0; a < 4; a++) s += f(i + (a + 0.5) / 4 - dx, j + (b + 0.5) / 4 - dy);
      data[j * w + i] = s / 16;
    }
  }
  return { data, width: w, height: h, channels: 1 };
}

describe('landscape patches', () => {
  it('follows a shift of (2.3, -1.4) px: 0.02 px RMS, none off by 0.1 px', () => {
    const a = landscapeFrame(pattern(0, 0), { maxWidth: 320, minWidth: 40 });
    const b = landscapeFrame(pattern(2.3, -1.4), { maxWidth: 320, minWidth: 40 });
    const p = selectPatches(a.levels[0]!);
    expect(p.n).toBeGreaterThan(50);
    const t = trackPatches(a, b, p, p.x.slice(), p.y.slice());
    let ok = 0;
    let sq = 0;
    for (let k = 0; k < p.n; k++) {
      if (!Number.isFinite(t.xb[k]!)) continue;
      ok++;
      const ex = t.xb[k]! - p.x[k]! - 2.3;
      const ey = t.yb[k]! - p.y[k]! + 1.4;
      sq += ex * ex + ey * ey;
      expect(Math.hypot(ex, ey)).toBeLessThan(0.1);
    }
    expect(ok).toBeGreaterThan(0.8 * p.n);
    expect(Math.sqrt(sq / ok)).toBeLessThan(0.02);
  });

  it('chooses no patch on a straight edge, and marks a one-pixel line as thin', () => {
    const w = 120;
    const h = 80;
    const data = new Float32Array(w * h);
    for (let j = 0; j < h; j++) for (let i = 0; i < w; i++) data[j * w + i] = (j >= 40 ? 160 : 60) + (j === 20 ? 80 : 0);
    const f = landscapeFrame({ data, width: w, height: h, channels: 1 }, { maxWidth: 120, minWidth: 30 });
    expect(selectPatches(f.levels[0]!).n).toBe(0);
    const thin = thinLineMask(f.levels[0]!);
    expect(thin[20 * w + 60]).toBe(1);
    // the wide edge at row 40 is kept
    expect(thin[40 * w + 60]).toBe(0);
  });
});

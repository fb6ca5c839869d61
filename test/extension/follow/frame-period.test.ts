import { describe, expect, it } from 'vitest';
import { measurePeriod, snapRate } from '../../../extension/shared/frame-period';

/*
 * The frame period from presented frames, against invented clips whose frame times are known exactly:
 * a clip whose frame i starts at round(i * 1000 / fps) ms (a container clock in whole milliseconds,
 * as WebM's default time base of 1 ms; Matroska specification, TimestampScale 1000000 ns by default),
 * and a browser that shows, for a seek to t, the last frame starting at or before t (HTML's
 * "current playback position" holds the frame whose interval contains it; common practice in
 * Chromium's seek).
 */
function clip(fps: number, frames: number, clockMs = true) {
  const starts = Array.from({ length: frames }, (_, i) => (clockMs ? Math.round((i * 1000) / fps) / 1000 : i / fps));
  const asked: number[] = [];
  const presented = async (t: number) => {
    asked.push(t);
    let k = 0;
    while (k + 1 < starts.length && starts[k + 1]! <= t + 1e-12) k++;
    return starts[k]!;
  };
  return { presented, asked, duration: frames / fps };
}

describe('measurePeriod', () => {
  it.each([
    [25, 25],
    [30, 30],
    [29.97, 29.97],
    [24, 24],
    [60, 60],
    [12.5, 12.5],
    [2, 2],
  ])('finds %s frames a second (to %s) in a clip with a millisecond clock', async (fps, want) => {
    const c = clip(fps, Math.ceil(fps * 10));
    const r = await measurePeriod(c.presented, 1.53, c.duration);
    expect(r!.frames * r!.periodS).toBeGreaterThan(1.5); // averaged over about 2 s
    expect(r).not.toBeNull();
    expect(r!.fps).toBe(want);
    expect(Math.abs(1 / r!.periodS - fps) / fps).toBeLessThan(0.002);
    // bounded: a handful of seeks, not a frame-by-frame walk
    expect(c.asked.length).toBeLessThanOrEqual(16);
  });

  it('says nothing when the browser does not answer, or the clip ends first', async () => {
    expect(await measurePeriod(async () => null, 1, 10)).toBeNull();
    const c = clip(25, 40); // 1.6 s long, asked at 1.58 s: no second frame to find
    expect(await measurePeriod(c.presented, 1.58, c.duration)).toBeNull();
  });

  it('says nothing when the frames are not evenly spaced (a variable rate)', async () => {
    // invented: frames 40 ms apart for 1 s, then 100 ms apart
    const starts = [...Array.from({ length: 25 }, (_, i) => i * 0.04), ...Array.from({ length: 30 }, (_, i) => 1 + i * 0.1)];
    const presented = async (t: number) => starts.filter((s) => s <= t + 1e-12).at(-1)!;
    expect(await measurePeriod(presented, 0.9, 4)).toBeNull();
  });
});

describe('snapRate', () => {
  it('puts a rate within 0.1 % on the common rate, else keeps 3 decimals', () => {
    expect(snapRate(1 / 0.0333667)).toBe(29.97);
    expect(snapRate(25.02)).toBe(25);
    expect(snapRate(25.03)).toBe(25.03);
    expect(snapRate(17.1234)).toBe(17.123);
  });
});

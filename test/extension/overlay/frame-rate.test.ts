import { describe, expect, it } from 'vitest';
import { presentedAt, serveRate } from '../../../extension/overlay/frame-server';

/*
 * The frame server's rate, against a stand-in video (no DOM): an invented clip whose frame i starts
 * at i / 25 s, which after each seek fires a trusted 'seeked' and then reports the frame holding the
 * new time to the frame callbacks, as Chromium does (HTML's seek algorithm; the callback's mediaTime
 * is the presented frame's timestamp: WICG video-rvfc draft). A page's forged 'seeked' or a video that
 * never lands must not stall it past its bounds.
 */
type Cb = (now: number, meta: { mediaTime: number }) => void;
function fakeVideo(opts: { fps?: number; lands?: boolean; reports?: boolean; rvfc?: boolean } = {}) {
  const { fps = 25, lands = true, reports = true, rvfc = true } = opts;
  const listeners = new Set<(e: { isTrusted: boolean }) => void>();
  const callbacks = new Map<number, Cb>();
  let id = 0;
  let time = 1.54;
  const v = {
    duration: 3.2,
    seeking: false,
    paused: true,
    pause() {},
    ownerDocument: { defaultView: { setTimeout: (f: () => void, ms: number) => setTimeout(f, ms) as unknown as number, clearTimeout: (k: number) => clearTimeout(k) } },
    addEventListener: (_: string, f: (e: { isTrusted: boolean }) => void) => listeners.add(f),
    removeEventListener: (_: string, f: (e: { isTrusted: boolean }) => void) => listeners.delete(f),
    get currentTime() {
      return time;
    },
    set currentTime(t: number) {
      time = t;
      // a page's forged event first: it must be ignored
      setTimeout(() => [...listeners].forEach((f) => f({ isTrusted: false })), 0);
      if (!lands) return;
      setTimeout(() => [...listeners].forEach((f) => f({ isTrusted: true })), 2);
      if (reports)
        setTimeout(() => {
          const now = [...callbacks.values()];
          callbacks.clear();
          now.forEach((cb) => cb(0, { mediaTime: Math.floor(t * fps + 1e-9) / fps }));
        }, 4);
    },
    ...(rvfc
      ? {
          requestVideoFrameCallback: (cb: Cb) => {
            callbacks.set(++id, cb);
            return id;
          },
          cancelVideoFrameCallback: (k: number) => callbacks.delete(k),
        }
      : {}),
  };
  return v as unknown as HTMLVideoElement;
}

describe('presentedAt and serveRate', () => {
  it('reads the presented frame after a seek, the frame already shown included', async () => {
    const v = fakeVideo();
    expect(await presentedAt(v, 1.54)).toBeCloseTo(1.52, 12);
    expect(await presentedAt(v, 1.55)).toBeCloseTo(1.52, 12);
  });

  it("finds the clip's 25 frames a second and leaves the video where it was", async () => {
    const v = fakeVideo();
    expect(await serveRate(v)).toMatchObject({ ok: true, fps: 25 });
    expect(v.currentTime).toBe(1.54);
  });

  it('says "not told", within its bounds, for a video without frame callbacks, one that never reports, or one that never lands', async () => {
    expect(await serveRate(fakeVideo({ rvfc: false }))).toEqual({ ok: false, reason: 'not-told' });
    const t0 = Date.now();
    expect(await presentedAt(fakeVideo({ reports: false }), 1, 50)).toBeNull();
    expect(await presentedAt(fakeVideo({ lands: false }), 1, 50)).toBeNull();
    expect(await serveRate(fakeVideo({ reports: false }), 80)).toEqual({ ok: false, reason: 'not-told' });
    // bounded: four waits of 50 to 80 ms, not the seconds of the defaults (a guard, not a speed target)
    expect(Date.now() - t0).toBeLessThan(2_000);
  });
});

import { describe, expect, it } from 'vitest';
import { packLuma, pixelRegion, serveFrame } from '../../../extension/overlay/frame-server';
import type { FrameRequest } from '../../../extension/shared/frames';
import type { Gray } from '../../../src/case';

/*
 * The frame server reads only the region a request needs (a follow's window round the object) and
 * must pack exactly what it packed from the whole picture: the same blocks, the same luma bytes, the
 * same origin. Held here against packLuma over the whole picture, on a seeded random RGBA picture,
 * for regions inside, across the edges and outside it, at steps 1 to 4.
 */
function picture(width: number, height: number, seed: number): Gray {
  const data = new Uint8ClampedArray(width * height * 4);
  let s = seed;
  for (let k = 0; k < data.length; k++) {
    s = (s * 1103515245 + 12345) >>> 0; // the C standard's example rand (ISO C, 7.22.2)
    data[k] = (s >>> 16) & 255;
  }
  return { data, width, height, channels: 4 };
}

function crop(img: Gray, r: { x: number; y: number; width: number; height: number }): Gray {
  const data = new Uint8ClampedArray(r.width * r.height * 4);
  for (let j = 0; j < r.height; j++) data.set(img.data.subarray(((r.y + j) * img.width + r.x) * 4, ((r.y + j) * img.width + r.x + r.width) * 4), j * r.width * 4);
  return { data, width: r.width, height: r.height, channels: 4 };
}

const W = 97;
const H = 61;
const whole = picture(W, H, 7);
// a paused video already at the request's time: seekTo answers at once
const video = { pause() {}, currentTime: 1.25, seeking: false, videoWidth: W, videoHeight: H, ownerDocument: { defaultView: null } } as unknown as HTMLVideoElement;

const requests: FrameRequest[] = [
  { t: 1.25, x: 10.5, y: 7.25, width: 30, height: 20, step: 1 },
  { t: 1.25, x: 0, y: 0, width: W, height: H, step: 4 },
  { t: 1.25, x: -12.3, y: -4, width: 40, height: 33, step: 3 },
  { t: 1.25, x: 80.9, y: 50.2, width: 40, height: 40, step: 2 },
  { t: 1.25, x: 120, y: 70, width: 10, height: 10, step: 1 },
  { t: 1.25, x: 33, y: 12, width: 1, height: 1, step: 1 },
];

describe('the frame server reads only the region it packs', () => {
  for (const req of requests) {
    it(`packs the same bytes from the region as from the whole picture: ${JSON.stringify(req)}`, async () => {
      const expected = packLuma(whole, req);
      let asked: ReturnType<typeof pixelRegion> | undefined;
      const reply = await serveFrame(video, async (region) => {
        asked = region;
        return { img: crop(whole, region), x: region.x, y: region.y, direct: true };
      }, req);
      expect(reply.ok).toBe(true);
      if (!reply.ok) return;
      expect({ x: reply.x, y: reply.y, width: reply.width, height: reply.height, luma: reply.luma }).toEqual(expected);
      // the region read is inside the picture and no larger than the request (plus its fraction)
      expect(asked!.x).toBeGreaterThanOrEqual(0);
      expect(asked!.x + asked!.width).toBeLessThanOrEqual(W);
      expect(asked!.width).toBeLessThanOrEqual(Math.ceil(req.width) + 1);
    });
  }

  it('packs a capture (the whole picture, origin 0, 0) as before', async () => {
    const req = requests[0]!;
    const reply = await serveFrame(video, async () => ({ img: whole, x: 0, y: 0, direct: false }), req);
    expect(reply).toMatchObject({ ok: true, source: 'capture', ...packLuma(whole, req) });
  });
});

import type { Gray } from '../../src/engine/snap';

/**
 * The paused frame's pixels at intrinsic size, for snapping. Reading them fails for a video from
 * another origin served without CORS (the canvas is tainted) and shows nothing for an encrypted
 * one; the overlay then marks without snapping and says so. Grabbed once per frame time.
 */
export class FramePixels {
  private canvas: HTMLCanvasElement | null = null;
  private cachedAt = Number.NaN;
  private cached: Gray | null = null;
  readable = true;

  constructor(private readonly video: HTMLVideoElement) {}

  get(): Gray | null {
    const v = this.video;
    if (!this.readable || v.videoWidth === 0) return null;
    if (this.cached && this.cachedAt === v.currentTime) return this.cached;
    this.canvas ??= v.ownerDocument.createElement('canvas');
    const c = this.canvas;
    c.width = v.videoWidth;
    c.height = v.videoHeight;
    const ctx = c.getContext('2d', { willReadFrequently: true });
    if (!ctx) return null;
    try {
      ctx.drawImage(v, 0, 0);
      const img = ctx.getImageData(0, 0, c.width, c.height);
      this.cached = { data: img.data, width: img.width, height: img.height, channels: 4 };
      this.cachedAt = v.currentTime;
      return this.cached;
    } catch {
      this.readable = false;
      return null;
    }
  }
}

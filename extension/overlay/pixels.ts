import { intrinsicToCss } from '../../src/case';
import type { Gray, Mapping } from '../../src/case';
import { send } from '../shared/native';

/**
 * The paused frame's pixels at intrinsic size, for snapping. Read straight from the video when
 * the page allows it; a video from another origin served without CORS taints the canvas, and then
 * the visible tab is captured instead (activeTab allows it once the user called the overlay up),
 * with the overlay hidden for that moment, and the picture's region resampled to intrinsic pixels:
 * snapping then works at the screen's resolution. An encrypted video shows nothing either way.
 * Cached per frame time and layout.
 */
export class FramePixels {
  private canvas: HTMLCanvasElement | null = null;
  // captures get a canvas of their own: drawing the unreadable video tainted the first one for good
  private captureCanvas: HTMLCanvasElement | null = null;
  private cacheKey = '';
  private cached: Gray | null = null;
  /** False once the video's own pixels proved unreadable (then captures are used). */
  direct = true;

  constructor(
    private readonly video: HTMLVideoElement,
    private readonly mapping: () => Mapping | null,
    private readonly hideOverlay: (hidden: boolean) => void,
  ) {}

  async get(): Promise<Gray | null> {
    const v = this.video;
    if (v.videoWidth === 0 || v.mediaKeys) return null;
    const m = this.mapping();
    // a capture depends on where the picture is on screen; a direct read only on the frame
    const key = () => `${v.currentTime}|${this.direct ? '' : JSON.stringify(m)}`;
    if (this.cached && key() === this.cacheKey) return this.cached;
    const img = this.direct ? this.readDirect() : null;
    this.cached = img ?? (m ? await this.readCapture(m) : null);
    this.cacheKey = key(); // after the read: it may have found the video unreadable
    return this.cached;
  }

  private context(w: number, h: number, forCapture = false): CanvasRenderingContext2D | null {
    const doc = this.video.ownerDocument;
    const c = forCapture ? (this.captureCanvas ??= doc.createElement('canvas')) : (this.canvas ??= doc.createElement('canvas'));
    c.width = w;
    c.height = h;
    return c.getContext('2d', { willReadFrequently: true });
  }

  /**
   * The shown frame's pixels over a region only (intrinsic px, whole pixels, inside the picture),
   * for the frame server: a follow asks for a window round the object on every frame, and reading
   * the whole of a large picture for it cost more than the rest of the frame's work. Where the
   * video cannot be read directly, the whole picture (a capture) with its origin at 0, 0.
   */
  async region(x: number, y: number, width: number, height: number): Promise<{ img: Gray; x: number; y: number } | null> {
    const v = this.video;
    if (v.videoWidth === 0 || v.mediaKeys) return null;
    const img = this.direct ? this.readDirect(x, y, width, height) : null;
    if (img) return { img, x, y };
    const whole = await this.get();
    return whole ? { img: whole, x: 0, y: 0 } : null;
  }

  private readDirect(x = 0, y = 0, width = this.video.videoWidth, height = this.video.videoHeight): Gray | null {
    const v = this.video;
    const ctx = this.context(width, height);
    if (!ctx) return null;
    try {
      ctx.drawImage(v, x, y, width, height, 0, 0, width, height);
      const d = ctx.getImageData(0, 0, width, height);
      return { data: d.data, width: d.width, height: d.height, channels: 4 };
    } catch {
      this.direct = false;
      return null;
    }
  }

  private async readCapture(m: Mapping): Promise<Gray | null> {
    const v = this.video;
    const view = v.ownerDocument.defaultView ?? window;
    this.hideOverlay(true);
    let dataUrl: string;
    try {
      // two frames, so the hidden overlay is really off the screen before the capture (with a
      // timer beside them: a tab in the background paints no frames and must not hang the mark)
      await Promise.race([
        new Promise((ok) => view.requestAnimationFrame(() => view.requestAnimationFrame(ok))),
        new Promise((ok) => view.setTimeout(ok, 120)),
      ]);
      // a capture that does not come back in time must not hold up the mark: it is saved unsnapped
      ({ dataUrl } = await Promise.race([
        send('frame/capture', {}),
        new Promise<never>((_, fail) => view.setTimeout(() => fail(new Error('capture timed out')), 2000)),
      ]));
    } catch {
      return null;
    } finally {
      this.hideOverlay(false);
    }
    const shot = new Image();
    shot.src = dataUrl;
    await shot.decode();
    // the capture is of the top viewport; a same-origin frame's video sits at its frame's offset
    let ox = 0;
    let oy = 0;
    for (let w: Window | null = view; w && w !== w.parent && w.frameElement; w = w.parent) {
      const r = w.frameElement.getBoundingClientRect();
      ox += r.left + w.frameElement.clientLeft;
      oy += r.top + w.frameElement.clientTop;
    }
    // the capture is in device pixels from the viewport's top-left: CSS px times the pixel ratio
    // (which includes the browser's zoom); not the capture's width over innerWidth, which differs
    // when the window is wider than the viewport it shows
    const k = view.devicePixelRatio || 1;
    const a = intrinsicToCss(0, 0, m);
    const b = intrinsicToCss(v.videoWidth, v.videoHeight, m);
    const ctx = this.context(v.videoWidth, v.videoHeight, true);
    if (!ctx) return null;
    ctx.imageSmoothingEnabled = true;
    ctx.drawImage(shot, (a.x + ox) * k, (a.y + oy) * k, (b.x - a.x) * k, (b.y - a.y) * k, 0, 0, v.videoWidth, v.videoHeight);
    const d = ctx.getImageData(0, 0, v.videoWidth, v.videoHeight);
    return { data: d.data, width: d.width, height: d.height, channels: 4 };
  }
}

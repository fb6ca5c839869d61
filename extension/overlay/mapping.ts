import { cssToIntrinsic, handSigmaPx, intrinsicPerCssAlong, intrinsicToCss, mappingFromLayout } from '../../src/case';
import type { Mapping, Mark, Point } from '../../src/case';

/**
 * Between the page's CSS pixels and the video's own (intrinsic) pixels. The mapping is computed once
 * per layout rather than on every pointer move: the host calls `placed` whenever the video's box
 * moves (scroll, resize, transforms, fullscreen), and a new source brings new metadata; both drop it
 * (invalidate).
 */
export class VideoMapping {
  private mapping: Mapping | null = null;
  private valid = false;

  constructor(private readonly video: HTMLVideoElement) {}

  invalidate(): void {
    this.valid = false;
  }

  /** The mapping for the layout of the moment, or null before the video has a picture. */
  current(): Mapping | null {
    if (this.valid) return this.mapping;
    const v = this.video;
    if (v.videoWidth === 0) return null;
    this.valid = true;
    const cs = getComputedStyle(v);
    const px = (p: string) => parseFloat(cs.getPropertyValue(p)) || 0;
    try {
      this.mapping = mappingFromLayout({
        rect: v.getBoundingClientRect(),
        offsetWidth: v.offsetWidth,
        offsetHeight: v.offsetHeight,
        border: { left: px('border-left-width'), top: px('border-top-width'), right: px('border-right-width'), bottom: px('border-bottom-width') },
        padding: { left: px('padding-left'), top: px('padding-top'), right: px('padding-right'), bottom: px('padding-bottom') },
        videoWidth: v.videoWidth,
        videoHeight: v.videoHeight,
        objectFit: cs.objectFit,
        objectPosition: cs.objectPosition,
      });
    } catch {
      this.mapping = null;
    }
    return this.mapping;
  }

  /** The last mapping computed, without laying the page out again (the lens reads it on every move). */
  last(): Mapping | null {
    return this.mapping;
  }

  toIntrinsic(e: { clientX: number; clientY: number }): Point | null {
    const m = this.current();
    if (!m) return null;
    return cssToIntrinsic(e.clientX, e.clientY, m);
  }

  /** Intrinsic point to the host's local CSS coordinates (for drawing). */
  toLocal(p: Point, m: Mapping, hostRect: DOMRect): { x: number; y: number } {
    const c = intrinsicToCss(p.x, p.y, m);
    return { x: c.x - hostRect.left, y: c.y - hostRect.top };
  }

  /** How the picture was laid out when a mark was placed, stored with the mark. */
  record(): Mark['mapping'] {
    const m = this.mapping;
    const cs = getComputedStyle(this.video);
    return {
      objectFit: cs.objectFit,
      objectPosition: cs.objectPosition,
      picture: m ? { ...m.picture } : { x: 0, y: 0, width: 0, height: 0 },
      scale: m ? m.scaleX : 1,
      devicePixelRatio: window.devicePixelRatio,
    };
  }

  /** The hand's floor for an end of these points at the zoom of the moment (span-ends.ts). */
  handSigma(points: readonly Point[], lens: boolean): number {
    const [a, b] = points;
    // a single point, or two at one place: along x
    const along = a && b && (b.x !== a.x || b.y !== a.y);
    const dx = along ? b.x - a.x : 1;
    const dy = along ? b.y - a.y : 0;
    const m = this.current();
    // without a mapping (no picture yet) one video pixel per CSS pixel
    return handSigmaPx(m ? intrinsicPerCssAlong(m, dx, dy) : 1, lens);
  }
}

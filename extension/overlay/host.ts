import { forceStyle } from './dom';
import { containsAcrossShadows, fullscreenTarget } from './videos';

/**
 * One host element per measured video: a shadow root the page's CSS cannot reach, placed over the
 * video's box and kept there through scroll, resize, zoom, transforms and fullscreen. The element
 * and its root come drawn (shell.ts drawShell); this gives them their behaviour. Keyboard
 * events typed inside stop at the host, so the page's shortcuts do not fire. destroy() removes
 * the element and every listener (all registered with one AbortSignal).
 */
export class OverlayHost {
  readonly root: ShadowRoot;
  private readonly ac = new AbortController();
  private readonly resize: ResizeObserver;
  private readonly timer: number;
  private onPlace: (() => void) | null = null;
  private onKey: ((e: KeyboardEvent) => void) | null = null;

  constructor(
    readonly video: HTMLVideoElement,
    readonly el: HTMLElement,
  ) {
    const doc = video.ownerDocument;
    this.root = el.shadowRoot!;
    const signal = this.ac.signal;
    // Keys typed inside the overlay are handled here, at the window in the capture phase, and then
    // stopped: no page listener registered after this one (capturing or bubbling, at any element)
    // sees them. A page's window capture listener registered before the overlay came up runs
    // earlier than any extension can; that is the one case this cannot cover.
    const win = doc.defaultView ?? window;
    for (const type of ['keydown', 'keyup', 'keypress'] as const) {
      win.addEventListener(
        type,
        (e) => {
          if (!e.composedPath().includes(this.el)) return;
          if (type === 'keydown') this.onKey?.(e as KeyboardEvent);
          e.stopImmediatePropagation();
        },
        { capture: true, signal },
      );
    }
    const place = () => this.place();
    win.addEventListener('scroll', place, { capture: true, passive: true, signal });
    win.addEventListener('resize', place, { passive: true, signal });
    doc.addEventListener('fullscreenchange', () => this.attach(), { signal });
    this.resize = new ResizeObserver(place);
    this.resize.observe(video);
    // transforms and layout shifts fire no event: a slow safety net catches them
    this.timer = win.setInterval(place, 400);
    this.attach();
  }

  /** Receives every keydown typed inside the overlay (the real target is e.composedPath()[0]). */
  set keys(fn: (e: KeyboardEvent) => void) {
    this.onKey = fn;
  }

  /**
   * Called after each placement (the session redraws its marks for the new geometry), and once
   * when set: the host was first placed before anyone was listening.
   */
  set placed(fn: () => void) {
    this.onPlace = fn;
    fn();
  }

  private last = '';

  /**
   * Puts the host where the video is on screen (viewport coordinates, fixed positioning). The
   * safety-net timer calls this too, so it does nothing unless the video's box really moved.
   */
  place(force = false): void {
    const r = this.video.getBoundingClientRect();
    const key = `${r.left},${r.top},${r.width},${r.height}`;
    if (!force && key === this.last) return;
    this.last = key;
    forceStyle(this.el, { left: `${r.left}px`, top: `${r.top}px`, width: `${r.width}px`, height: `${r.height}px` });
    this.onPlace?.();
  }

  /**
   * Inside the fullscreen element when a container of the video is fullscreen; in the top layer (a
   * manual popover shown after the video went fullscreen, so above it) when the video itself is,
   * or a component around it.
   */
  private attach(): void {
    const doc = this.video.ownerDocument;
    const fs = fullscreenTarget(doc);
    // a fullscreen container shows the host as its child, unless the container is a component
    // (it shows only what its shadow root slots) or holds the video inside one: the top layer then
    const asChild = !!fs && fs !== this.video && !fs.shadowRoot && fs.contains(this.video);
    const parent = asChild ? fs : doc.documentElement;
    // read the video's box before adding anything: a read after would lay the page out again
    this.place(true);
    if (this.el.parentNode !== parent) parent.appendChild(this.el);
    const wantTop = !!fs && !asChild && containsAcrossShadows(fs, this.video);
    if (wantTop) {
      this.el.setAttribute('popover', 'manual');
      try {
        this.el.showPopover();
      } catch {
        // already shown
      }
    } else if (this.el.hasAttribute('popover')) {
      try {
        this.el.hidePopover();
      } catch {
        // not shown
      }
      this.el.removeAttribute('popover');
    }
  }

  get signal(): AbortSignal {
    return this.ac.signal;
  }

  destroy(): void {
    this.ac.abort();
    this.resize.disconnect();
    (this.video.ownerDocument.defaultView ?? window).clearInterval(this.timer);
    this.el.remove();
  }
}

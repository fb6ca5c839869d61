import { forceStyle, isUsersOwn } from './dom';
import { forgetShell, type Shell } from './shell';
import { containsAcrossShadows, fullscreenTarget } from './videos';

/**
 * One host element per measured video: a closed shadow root the page's CSS and scripts cannot
 * reach, placed over the video's box and kept there through scroll, resize, zoom, transforms and
 * fullscreen. The element and its root come drawn (shell.ts drawShell); this gives them their
 * behaviour. Keyboard events typed inside stop at the host, so the page's shortcuts do not fire.
 * Only events the browser made from the user's own input count (isTrusted): a page can dispatch
 * look-alike events at the host, never real ones. destroy() removes the element and every listener
 * (all registered with one AbortSignal).
 */
export class OverlayHost {
  readonly root: ShadowRoot;
  readonly video: HTMLVideoElement;
  readonly el: HTMLElement;
  /**
   * Whether the page takes key presses before the overlay can see them: a page's window capture
   * listener registered before the overlay came up runs earlier than any extension's, and may stop
   * them. Probed once at mount; the session then says so and offers buttons for every key.
   */
  readonly keysBlocked: boolean;
  private readonly ac = new AbortController();
  private readonly resize: ResizeObserver;
  private readonly timer: number;
  private onPlace: (() => void) | null = null;
  private onKey: ((e: KeyboardEvent) => void) | null = null;

  constructor(readonly shell: Shell) {
    this.video = shell.video;
    this.el = shell.host;
    this.root = shell.root;
    const video = this.video;
    const doc = video.ownerDocument;
    const signal = this.ac.signal;
    // Keys typed inside the overlay are handled here, at the window in the capture phase, and then
    // stopped: no page listener registered after this one (capturing or bubbling, at any element)
    // sees them.
    const win = doc.defaultView ?? window;
    let probe: Event | null = null;
    let probed = false;
    for (const type of ['keydown', 'keyup', 'keypress'] as const) {
      win.addEventListener(
        type,
        (e) => {
          if (e === probe) {
            probed = true;
            e.stopImmediatePropagation();
            return;
          }
          if (!e.composedPath().includes(this.el)) return;
          if (type === 'keydown' && isUsersOwn(e)) this.onKey?.(e as KeyboardEvent);
          e.stopImmediatePropagation();
        },
        { capture: true, signal },
      );
    }
    // the probe is an event of our own, recognised by identity, sent where a key typed in the
    // overlay would go: a page that stops it before it reaches us stops real keys as well
    probe = new KeyboardEvent('keydown', { key: 'Unidentified', bubbles: true, composed: true, cancelable: true });
    this.el.dispatchEvent(probe);
    this.keysBlocked = !probed;
    probe = null;
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

  /** Receives every trusted keydown typed inside the overlay (the focused element inside is root.activeElement). */
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
  place(force = false, parent: Element | null = this.el.parentElement): void {
    const r = this.video.getBoundingClientRect();
    const zoom = undoZoom(parent);
    const key = `${r.left},${r.top},${r.width},${r.height},${zoom}`;
    if (!force && key === this.last) return;
    this.last = key;
    forceStyle(this.el, { left: `${r.left}px`, top: `${r.top}px`, width: `${r.width}px`, height: `${r.height}px`, zoom });
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
    this.place(true, parent);
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
    forgetShell(this.shell);
  }
}

/**
 * The zoom that cancels the zoom the host inherits from where it hangs: a page may set CSS `zoom`
 * on its root element, which would scale the host's fixed position and size with it, while the
 * video's box (getBoundingClientRect) is already in the viewport's own pixels. currentCSSZoom is
 * the element's effective zoom (CSS Viewport module; Chromium 128, Firefox 126); without it, 1.
 */
export function undoZoom(parent: Element | null): string {
  const z = (parent as (Element & { currentCSSZoom?: number }) | null)?.currentCSSZoom;
  return typeof z === 'number' && Number.isFinite(z) && z > 0 && z !== 1 ? String(1 / z) : '1';
}

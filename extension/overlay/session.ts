import { assumedDimension } from '../../src/case';
import type { CaseRecord, Gray, UnitSystem } from '../../src/case';
import { message } from '../shared/native';
import { loadSettings, onSettingsChanged } from '../shared/settings';
import { forceStyle, trusted } from './dom';
import { drawMarks, frameCoalescer } from './drawing';
import { markEditor, type MarkEditor } from './editing';
import { CaseOpening } from './opening';
import { OverlayHost } from './host';
import { initKeys, type KeyAction } from './keys';
import { VideoMapping } from './mapping';
import { addMarkLayers, panelParts } from './panel';
import { FramePixels } from './pixels';
import { initPointer, Magnifier } from './pointer';
import { Readout } from './readout';
import { CaseSaver } from './saving';
import { drawShell, forgetShell, shellText, takeShell, type Shell } from './shell';
import { newState, type SessionContext } from './state';
import { OVERLAY_CSS } from './styles';
import { ToolChoice } from './tools';
import { shadowRootsAround } from './videos';

/**
 * One measuring session over one video: its host, its case, the marks, the tools. It ties the parts
 * (pointer.ts, keys.ts, editing.ts, drawing.ts, readout.ts, saving.ts, opening.ts), each wired
 * with the host's one AbortSignal, so that closing removes every listener at once.
 */
export class MeasureSession {
  private readonly host: OverlayHost;
  private readonly ctx: SessionContext;
  private readonly pixels: FramePixels;
  private readonly readout: Readout;
  private readonly saver: CaseSaver;
  private readonly tools: ToolChoice;
  private readonly editor: MarkEditor;
  private readonly lens: Magnifier;
  private readonly opening: CaseOpening;
  /** Wired, placed and focused (the browser tests wait for it through the test build's handle). */
  ready = false;
  /** When it became ready, on the document's clock (the bench reads it through the test build's handle). */
  readyAt = NaN;

  /** The host element and its closed root (for the call-up's check and the test build's handle). */
  get shell(): Pick<Shell, 'host' | 'root' | 'byFirstStage'> {
    return this.host.shell;
  }

  constructor(
    readonly video: HTMLVideoElement,
    index: number,
    private readonly onClosed: (s: MeasureSession) => void,
  ) {
    // the first stage may have drawn the host and panel already: this session wires those elements
    let shell = takeShell(video);
    let parts = shell ? panelParts(shell.root) : null;
    if (!shell || !parts) {
      if (shell) forgetShell(shell);
      shell = drawShell(video, shellText(), OVERLAY_CSS);
      parts = shell ? panelParts(shell.root) : null;
      if (!shell || !parts) throw new Error('the overlay could not draw its panel on this page');
    }
    const host = (this.host = new OverlayHost(shell));
    const mapping = new VideoMapping(video);
    const live = parts.live;
    this.ctx = {
      video,
      host,
      el: { ...parts, ...addMarkLayers(parts.surface) },
      state: newState(),
      mapping,
      say: (text) => {
        // re-set so that a repeated message is announced again
        live.textContent = '';
        live.textContent = text;
      },
      notice: (text) => (parts.notice.textContent = text),
      redraw: () => this.redraw(),
    };
    this.pixels = new FramePixels(video, () => mapping.current(), (hidden) => forceStyle(host.el, { visibility: hidden ? 'hidden' : 'visible' }));
    this.readout = new Readout(this.ctx);
    this.tools = new ToolChoice(this.ctx, (d) => this.readout.sizeMismatch(d));
    this.saver = new CaseSaver(this.ctx, (c) => this.adopted(c), (mark) => this.readout.announce(mark));
    this.editor = markEditor(this.ctx, this.saver, this.pixels, () => this.describeVideo());
    this.lens = new Magnifier(this.ctx);
    this.opening = new CaseOpening(this.ctx, index, this.saver, () => this.describeVideo());
    this.tools.init(host.signal);
    parts.close.addEventListener('click', trusted(() => void this.close()), { signal: host.signal });
    this.finishAfterFirstFrame();
  }

  /**
   * Calling the overlay up draws the panel first and finishes a frame later: placing the panel where
   * it does not cover the picture just before that first paint, then listeners, notices, the stored
   * case and focus just after it. Every layout read during the mount itself (panel height, the
   * video's box, focus) would force the page to lay out the half-built overlay again, which cost
   * more than the whole rest of the mount. The host carries `data-ready` once this is done.
   */
  private finishAfterFirstFrame(): void {
    const view = this.video.ownerDocument.defaultView ?? window;
    const signal = this.host.signal;
    let placed = false;
    const beforePaint = () => {
      if (placed || signal.aborted) return;
      placed = true;
      this.placePanel();
      // a timer after the frame: runs once the panel has been painted
      view.setTimeout(() => {
        if (!signal.aborted) this.finishMount();
      }, 0);
    };
    view.requestAnimationFrame(beforePaint);
    // a tab in the background draws no frames: finish anyway
    view.setTimeout(beforePaint, 100);
  }

  private finishMount(): void {
    this.host.placed = () => {
      this.ctx.mapping.invalidate();
      this.placePanel();
      this.redraw();
    };
    this.wire(this.host.signal);
    this.describeVideo();
    this.opening.init(this.host.signal);
    this.ctx.el.surface.focus();
    this.ready = true;
    this.readyAt = performance.now();
  }

  private wire(signal: AbortSignal): void {
    const ctx = this.ctx;
    initPointer(ctx, this.editor, this.lens, frameCoalescer(() => this.redraw(), signal), signal);
    initKeys(ctx, (a) => this.act(a), signal);
    const v = this.video;
    v.addEventListener('seeked', () => this.redraw(), { signal });
    const useSettings = (st: { system: UnitSystem; markerName?: string }) => {
      ctx.state.system = st.system;
      ctx.state.markerName = st.markerName ?? '';
      this.redraw();
    };
    void loadSettings().then(useSettings, () => undefined);
    signal.addEventListener('abort', onSettingsChanged(useSettings));
    // a video removed from the page ends its session; removed inside a component's shadow root,
    // only that root sees it
    const mo = new MutationObserver(() => {
      if (!v.isConnected) void this.close();
    });
    for (const root of [v.ownerDocument.documentElement, ...shadowRootsAround(v)]) mo.observe(root, { childList: true, subtree: true });
    signal.addEventListener('abort', () => mo.disconnect());
  }

  /** Does what a key (or its stand-in button) asks for (keys.ts). */
  private act(a: KeyAction): void {
    const { editor } = this;
    switch (a.do) {
      case 'tool':
        return this.tools.chooseTool(a.kind);
      case 'dimension':
        return this.tools.chooseDimension(a.value);
      case 'nudge':
        return editor.nudge(a.dx, a.dy);
      case 'cancel':
        if (!editor.cancel()) void this.close();
        return;
      case 'place':
        return editor.placeAtCursor();
      case 'cycle':
        return editor.cycleSelection(a.dir);
      case 'toggle-panel':
        return this.togglePanel();
      case 'snap':
        return void editor.snapSelected();
      case 'remove':
        return void editor.removeSelected();
    }
  }

  /** A stored version of the case was taken (saving.ts adopt). */
  private adopted(c: CaseRecord): void {
    this.readout.adopt(c);
    // a case whose size is a length (chosen in the popup) marks lengths, until the user says otherwise
    const assumed = assumedDimension(c.assumptions);
    const { state } = this.ctx;
    if (!state.dimensionPicked && assumed && assumed !== state.dimension) this.tools.showDimension(assumed);
    this.redraw();
  }

  /** The shown frame's pixels and whether they are the video's own (else the tab's picture): the frame server's source. */
  async readPixels(region?: { x: number; y: number; width: number; height: number }): Promise<{ img: Gray; x: number; y: number; direct: boolean } | null> {
    if (region) {
      const r = await this.pixels.region(region.x, region.y, region.width, region.height);
      return r ? { ...r, direct: this.pixels.direct } : null;
    }
    const img = await this.pixels.get();
    return img ? { img, x: 0, y: 0, direct: this.pixels.direct } : null;
  }

  private describeVideo(): void {
    const v = this.video;
    const notes: string[] = [];
    if (!Number.isFinite(v.duration)) notes.push(message('ovlLiveStream'));
    if (v.mediaKeys) notes.push(message('ovlEncrypted'));
    if (!this.pixels.direct) notes.push(message('ovlCrossOrigin'));
    if (this.host.keysBlocked) notes.push(message('ovlKeysBlocked'));
    this.ctx.notice(notes.join(' '));
  }

  /**
   * The panel must not cover the picture being measured: below the video when the viewport has
   * room, else above it, else inside its top-left corner.
   */
  private placePanel(): void {
    const panel = this.ctx.el.panel;
    const r = this.video.getBoundingClientRect();
    const need = panel.offsetHeight + 8;
    const view = this.video.ownerDocument.defaultView ?? window;
    const where = view.innerHeight - r.bottom >= need ? 'below' : r.top >= need ? 'above' : 'inside';
    if (panel.dataset.where !== where) panel.dataset.where = where;
  }

  /** Hides the panel (it may sit on the picture when the page leaves no room around the video). */
  private togglePanel(): void {
    const panel = this.ctx.el.panel;
    const hidden = panel.hidden;
    panel.hidden = !hidden;
    this.ctx.say(message(hidden ? 'ovlPanelShown' : 'ovlPanelHidden'));
  }

  private redraw(): void {
    const here = drawMarks(this.ctx);
    if (here) this.readout.update(here);
  }

  async close(): Promise<void> {
    this.saver.flush();
    this.host.destroy();
    this.onClosed(this);
  }

  /** For a second injection: bring the surface back into focus instead of mounting again. */
  focus(): void {
    this.ctx.el.surface.focus();
  }
}

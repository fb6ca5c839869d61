import { caseIdFor, stripFragment } from '../../src/case/ids';
import { POINTS_PER_KIND, type CaseRecord, type Mark, type MarkKind, type Point, type VideoInfo } from '../../src/case/schema';
import { cssToIntrinsic, intrinsicToCss, mappingFromLayout, type Mapping } from '../../src/engine/display';
import { handSigmaPx, intrinsicPerCssAlong, LANDMARK_SNAP_FLOOR_PX, markSigmaPx } from '../../src/engine/span-ends';
import { caseKey } from '../../src/case/schema';
import { message, nativeApis, send } from '../shared/native';
import { loadSettings, onSettingsChanged } from '../shared/settings';
import type { UnitSystem } from '../../src/engine/units';
import { engineAssumptions, type EngineAssumptions } from '../../src/case/assumptions';
import { cameraFrame, marksAt } from '../../src/case/frames';
import { landmarkDimensionOf } from '../../src/case/marks';
import { assumedDimension, disagreement, type SpanDimension } from '../../src/case/size-match';
import { forceStyle, h, svg, trusted } from './dom';
import { degreesEstimate, distanceEstimate, speedEstimate, timestamp } from './format';
import { OverlayHost } from './host';
import { snapSpan } from './snapping';
import { FramePixels } from './pixels';
import { liveFigures } from './readout';
import { addKeyButtons, addMarkLayers, DIMENSIONS, FIRST_DIMENSION, FIRST_TOOL, panelParts, TOOLS } from './panel';
import { drawShell, forgetShell, shellText, takeShell, type Shell } from './shell';
import { OVERLAY_CSS } from './styles';
import { shadowRootsAround } from './videos';

const COLOURS: Record<MarkKind, string> = {
  'object-span': 'var(--mark-object, #e8590c)',
  'landmark-span': 'var(--mark-landmark, #2b8a3e)',
  'frame-edges': 'var(--mark-frame, #7048e8)',
  'lane-dash': 'var(--mark-lane, #0b7285)',
  'object-centre': 'var(--mark-object, #e8590c)',
  'frame-top-bottom': 'var(--mark-frame, #7048e8)',
  horizon: 'var(--mark-frame, #7048e8)',
  'road-ahead': 'var(--mark-lane, #0b7285)',
};

interface Draft {
  kind: MarkKind;
  t: number;
  points: Point[];
  /** Whether the lens showed as each point was placed (the hand's floor depends on it). */
  lens: boolean[];
}

/**
 * One measuring session over one video: its host, its case, the marks, the tools. Every mark is
 * saved through the background at once; nudges are saved a moment after the last key, and any
 * pending save is flushed on close.
 */
export class MeasureSession {
  private readonly host: OverlayHost;
  private readonly pixels: FramePixels;
  private assumptions: EngineAssumptions = engineAssumptions(undefined);
  private readonly spanAssumptions = new Map<string, EngineAssumptions>();
  /** The units chosen in the settings, followed live. */
  private system: UnitSystem = 'metric';
  /** The name the settings give for whoever marks, '' when none. */
  private markerName = '';
  private caseId = '';
  private record: CaseRecord | null = null;
  /** How many marks the background has stored, by its last reply: the readout says "saved" of these only. */
  private savedCount = 0;
  private tool: MarkKind = FIRST_TOOL;
  private dimension: SpanDimension = FIRST_DIMENSION;
  /** Set once the user picks a dimension here; until then new spans follow the case's size. */
  private dimensionPicked = false;
  private draft: Draft | null = null;
  /**
   * Each end's own sigma, for the marks placed or edited here: a mark stores one, the ends' root mean
   * square, so an edit of one end needs the other's. A mark whose stored sigma no longer matches
   * (edited elsewhere) falls back to that one sigma for both ends.
   */
  private readonly endSigmas = new Map<string, number[]>();
  /** Why a snap left an end of a mark where the user put it, shown while the mark is in view. */
  private readonly snapNotes = new Map<string, string>();
  private selected: { markId: string; end: number } | null = null;
  private cursor: Point | null = null;
  private mapping: Mapping | null = null;
  /** The mapping holds until the video's box moves or its picture changes (see invalidateMapping). */
  private mappingValid = false;
  private pendingSave: number | undefined;
  /** The mark whose nudges wait for their debounced save. */
  private pendingId: string | null = null;
  private frameRequested = false;
  /** Wired, placed and focused (the browser tests wait for it through the test build's handle). */
  ready = false;
  /** When it became ready, on the document's clock (the bench reads it through the test build's handle). */
  readyAt = NaN;

  /** The host element and its closed root (for the call-up's check and the test build's handle). */
  get shell(): Pick<Shell, 'host' | 'root' | 'byFirstStage'> {
    return this.host.shell;
  }
  private src = '';

  // elements
  private readonly surface: HTMLDivElement;
  private readonly layer: SVGSVGElement;
  private readonly panel: HTMLDivElement;
  private readonly readoutEl: HTMLDivElement;
  private readonly noticeEl: HTMLDivElement;
  private readonly live: HTMLDivElement;
  private readonly magnifier: HTMLDivElement;
  private readonly magCanvas: HTMLCanvasElement;
  private readonly toolButtons = new Map<MarkKind, HTMLButtonElement>();
  private readonly dimensionButtons = new Map<SpanDimension, HTMLButtonElement>();

  constructor(
    readonly video: HTMLVideoElement,
    private readonly index: number,
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
    this.host = new OverlayHost(shell);
    this.pixels = new FramePixels(
      video,
      () => this.currentMapping(),
      (hidden) => forceStyle(this.host.el, { visibility: hidden ? 'hidden' : 'visible' }),
    );
    this.surface = parts.surface;
    const layers = addMarkLayers(parts.surface);
    this.layer = layers.layer;
    this.magCanvas = layers.magCanvas;
    this.magnifier = layers.magnifier;
    this.readoutEl = parts.readout;
    this.noticeEl = parts.notice;
    this.live = parts.live;
    this.panel = parts.panel;
    const signal = this.host.signal;
    for (const [kind, b] of parts.toolButtons) {
      b.addEventListener('click', trusted(() => this.chooseTool(kind)), { signal });
      this.toolButtons.set(kind, b);
    }
    for (const [value, b] of parts.dimensionButtons) {
      b.addEventListener('click', trusted(() => this.chooseDimension(value)), { signal });
      this.dimensionButtons.set(value, b);
    }
    parts.close.addEventListener('click', trusted(() => void this.close()), { signal });
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
      this.invalidateMapping();
      this.placePanel();
      this.redraw();
    };
    this.wire();
    if (this.host.keysBlocked) this.offerKeyButtons();
    this.describeVideo();
    void this.openCase();
    this.surface.focus();
    this.ready = true;
    this.readyAt = performance.now();
  }

  /* ----------------------------------------------------------------------------------------- */

  private wire(): void {
    const signal = this.host.signal;
    const s = this.surface;
    s.addEventListener('pointerdown', trusted((e: PointerEvent) => this.pointerDown(e)), { signal });
    s.addEventListener('pointermove', trusted((e: PointerEvent) => this.pointerMove(e)), { signal });
    s.addEventListener('pointerup', trusted((e: PointerEvent) => this.pointerUp(e)), { signal });
    s.addEventListener('pointerleave', trusted(() => (this.magnifier.style.display = 'none')), { signal });
    this.host.keys = (e) => this.key(e);
    const v = this.video;
    v.addEventListener('seeked', () => this.redraw(), { signal });
    v.addEventListener('loadedmetadata', () => {
      this.invalidateMapping();
      this.sourceChanged();
    }, { signal });
    v.addEventListener('emptied', () => {
      this.invalidateMapping();
      this.sourceChanged();
    }, { signal });
    // the popup edits assumptions (and another tab may add marks): follow the stored case
    let storedReads = 0;
    const onStored = (changes: Record<string, { newValue?: unknown }>, area: string) => {
      if (area !== 'local' || !this.caseId) return;
      const change = changes[caseKey(this.caseId)];
      if (!change?.newValue) return;
      // the stored value is read back through the background, which migrates and validates every
      // read (and quarantines a record that fails): the overlay need not carry the validator
      const id = this.caseId;
      // replies may arrive out of order: only the latest read is taken
      const mine = ++storedReads;
      send('case/get', { caseId: id }).then(
        (c) => {
          if (c && id === this.caseId && mine === storedReads) this.adopt(c);
        },
        () => undefined,
      );
    };
    const storage = nativeApis().storage;
    storage.onChanged.addListener(onStored);
    signal.addEventListener('abort', () => storage.onChanged.removeListener(onStored));
    const useSettings = (st: { system: UnitSystem; markerName?: string }) => {
      this.system = st.system;
      this.markerName = st.markerName ?? '';
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

  private videoInfo(): VideoInfo {
    const v = this.video;
    const doc = v.ownerDocument;
    return {
      pageUrl: stripFragment(doc.location.href),
      pageTitle: doc.title.slice(0, 2000),
      src: v.currentSrc.startsWith('blob:') ? '' : v.currentSrc,
      width: v.videoWidth,
      height: v.videoHeight,
      duration: Number.isFinite(v.duration) ? v.duration : null,
    };
  }

  private async openCase(): Promise<void> {
    const v = this.video;
    if (v.videoWidth === 0) {
      this.notice(message('ovlWaiting'));
      return;
    }
    this.src = v.currentSrc;
    this.caseId = caseIdFor(v.ownerDocument.location.href, v.currentSrc.startsWith('blob:') ? '' : v.currentSrc, this.index);
    try {
      this.adopt(await send('case/open', { caseId: this.caseId, video: this.videoInfo() }));
      this.describeVideo();
      this.redraw();
      const n = this.record!.marks.length;
      this.say(message(n === 1 ? 'ovlReadyOne' : 'ovlReadyMany', String(n)));
      // the case log opened this page at a mark: go to it once (taking the request clears it)
      const seek = await send('seek/take', { pageUrl: this.videoInfo().pageUrl }).catch(() => ({ t: null }));
      if (seek.t !== null && Number.isFinite(seek.t) && seek.t >= 0) {
        v.pause();
        v.currentTime = Number.isFinite(v.duration) ? Math.min(seek.t, v.duration) : seek.t;
      }
    } catch (err) {
      this.notice(message('ovlOpenFailed', (err as Error).message));
    }
  }

  /** Takes a stored version of the case, keeping a nudge that is not saved yet. */
  private adopt(c: CaseRecord): void {
    this.savedCount = c.marks.length;
    if (this.pendingId !== null && this.record) {
      const local = this.record.marks.find((m) => m.id === this.pendingId);
      if (local) c = { ...c, marks: c.marks.some((m) => m.id === local.id) ? c.marks.map((m) => (m.id === local.id ? local : m)) : [...c.marks, local] };
    }
    this.record = c;
    this.assumptions = engineAssumptions(c.assumptions, c.marks);
    this.spanAssumptions.clear();
    // a case whose size is a length (chosen in the popup) marks lengths, until the user says otherwise
    const assumed = assumedDimension(c.assumptions);
    if (!this.dimensionPicked && assumed && assumed !== this.dimension) this.showDimension(assumed);
    this.redraw();
  }

  private sourceChanged(): void {
    if (this.video.currentSrc === this.src) return;
    this.flush();
    this.record = null;
    this.savedCount = 0;
    this.draft = null;
    this.selected = null;
    this.say(message('ovlVideoChanged'));
    void this.openCase();
  }

  private describeVideo(): void {
    const v = this.video;
    const notes: string[] = [];
    if (!Number.isFinite(v.duration)) notes.push(message('ovlLiveStream'));
    if (v.mediaKeys) notes.push(message('ovlEncrypted'));
    if (!this.pixels.direct) notes.push(message('ovlCrossOrigin'));
    if (this.host.keysBlocked) notes.push(message('ovlKeysBlocked'));
    this.notice(notes.join(' '));
  }

  /**
   * The panel must not cover the picture being measured: below the video when the viewport has
   * room, else above it, else inside its top-left corner.
   */
  private placePanel(): void {
    const r = this.video.getBoundingClientRect();
    const need = this.panel.offsetHeight + 8;
    const view = this.video.ownerDocument.defaultView ?? window;
    const where = view.innerHeight - r.bottom >= need ? 'below' : r.top >= need ? 'above' : 'inside';
    if (this.panel.dataset.where !== where) this.panel.dataset.where = where;
  }

  /* ---------------------------------------------------------------------------------------- */
  /* Geometry                                                                                  */

  /**
   * The CSS-to-intrinsic mapping, computed once per layout rather than on every pointer move: the
   * host calls `placed` whenever the video's box moves (scroll, resize, transforms, fullscreen),
   * and a new source brings new metadata; both drop it.
   */
  private invalidateMapping(): void {
    this.mappingValid = false;
  }

  private currentMapping(): Mapping | null {
    if (this.mappingValid) return this.mapping;
    const v = this.video;
    if (v.videoWidth === 0) return null;
    this.mappingValid = true;
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

  private toIntrinsic(e: PointerEvent): Point | null {
    const m = this.currentMapping();
    if (!m) return null;
    return cssToIntrinsic(e.clientX, e.clientY, m);
  }

  /** Intrinsic point to the host's local CSS coordinates (for drawing). */
  private toLocal(p: Point, m: Mapping, hostRect: DOMRect): { x: number; y: number } {
    const c = intrinsicToCss(p.x, p.y, m);
    return { x: c.x - hostRect.left, y: c.y - hostRect.top };
  }

  private mappingRecord(): Mark['mapping'] {
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

  /* ---------------------------------------------------------------------------------------- */
  /* Pointer                                                                                   */

  private startDraft(p: Point, lens: boolean): void {
    const v = this.video;
    // marks are taken on a paused frame
    if (!v.paused) v.pause();
    this.draft = { kind: this.tool, t: v.currentTime, points: [p], lens: [lens] };
    if (POINTS_PER_KIND[this.tool] === 1) void this.commitDraft();
  }

  private pointerDown(e: PointerEvent): void {
    if (e.button !== 0 || !this.record) return;
    const p = this.toIntrinsic(e);
    if (!p) return;
    e.preventDefault();
    this.surface.focus();
    this.surface.setPointerCapture(e.pointerId);
    this.cursor = p;
    this.startDraft(p, this.lensShowing());
    this.redraw();
  }

  private pointerMove(e: PointerEvent): void {
    const p = this.toIntrinsic(e);
    if (!p) return;
    this.cursor = p;
    if (this.draft && this.draft.points.length >= 1 && POINTS_PER_KIND[this.draft.kind] === 2) {
      this.draft.points[1] = p;
    }
    this.showMagnifier(e);
    this.requestRedraw();
  }

  private pointerUp(e: PointerEvent): void {
    if (!this.draft || POINTS_PER_KIND[this.draft.kind] !== 2) return;
    const p = this.toIntrinsic(e);
    if (p) this.draft.points[1] = p;
    this.draft.lens[1] = this.lensShowing();
    const [a, b] = this.draft.points;
    if (!a || !b || Math.hypot(b.x - a.x, b.y - a.y) < 1) {
      // a click, not a drag: the next click or Enter places the second end
      this.draft.points = [a ?? p!];
      this.draft.lens.length = 1;
      this.say(message('ovlFirstEndPointer'));
      return;
    }
    void this.commitDraft();
  }

  /** Rendering is coalesced to one per display frame, however fast the pointer moves. */
  private requestRedraw(): void {
    if (this.frameRequested) return;
    this.frameRequested = true;
    requestAnimationFrame(() => {
      this.frameRequested = false;
      this.redraw();
    });
  }

  private showMagnifier(e: PointerEvent): void {
    const m = this.mapping;
    const v = this.video;
    if (!m || v.mediaKeys || !this.cursor) {
      this.magnifier.style.display = 'none';
      return;
    }
    // 16 intrinsic pixels across the 128 px lens: 8x, at the video's own resolution
    const size = 16;
    const ctx = this.magCanvas.getContext('2d');
    if (!ctx) return;
    ctx.imageSmoothingEnabled = false;
    ctx.clearRect(0, 0, 32, 32);
    ctx.drawImage(v, this.cursor.x - size / 2, this.cursor.y - size / 2, size, size, 0, 0, 32, 32);
    const r = this.host.el.getBoundingClientRect();
    this.magnifier.style.display = 'block';
    this.magnifier.style.left = `${e.clientX - r.left + 24}px`;
    this.magnifier.style.top = `${e.clientY - r.top + 24}px`;
  }

  /* ---------------------------------------------------------------------------------------- */
  /* Keyboard                                                                                  */

  private key(e: KeyboardEvent): void {
    // seen at the window, where a closed root hides the element inside (composedPath stops at the
    // host): the root itself says which of its elements has focus
    const onSurface = this.host.root.activeElement === this.surface;
    if (this.act(e.key, { ctrl: e.ctrlKey || e.metaKey, alt: e.altKey, shift: e.shiftKey }, onSurface)) e.preventDefault();
  }

  /**
   * What a key does, by its name: typed on the keyboard, or pressed as one of the panel's key-free
   * buttons when the page takes key presses first. Says whether it did anything.
   */
  private act(key: string, mods: { ctrl: boolean; alt: boolean; shift: boolean }, onSurface: boolean): boolean {
    const tool = TOOLS.find((t) => t.key === key);
    if (tool && !mods.ctrl && !mods.alt) {
      this.chooseTool(tool.kind);
      return true;
    }
    const dimension = DIMENSIONS.find((d) => d.key === key.toUpperCase());
    if (dimension && !mods.ctrl && !mods.alt) {
      this.chooseDimension(dimension.value);
      return true;
    }
    const step = mods.alt ? 0.1 : mods.shift ? 10 : 1;
    const arrows: Record<string, [number, number]> = { ArrowLeft: [-step, 0], ArrowRight: [step, 0], ArrowUp: [0, -step], ArrowDown: [0, step] };
    const d = arrows[key];
    if (d && onSurface) {
      this.nudge(d[0], d[1]);
      return true;
    }
    switch (key) {
      case 'Escape':
        if (this.draft) {
          this.draft = null;
          this.say(message('ovlCancelled'));
          this.redraw();
        } else if (this.selected) {
          this.selected = null;
          this.redraw();
        } else void this.close();
        return true;
      case 'Enter':
      case ' ':
        if (!onSurface) return false;
        this.placeAtCursor();
        return true;
      case 'Tab':
        if (!this.selected) return false;
        this.cycleSelection(mods.shift ? -1 : 1);
        return true;
      case 'h':
      case 'H':
        this.togglePanel();
        return true;
      case 's':
      case 'S':
        if (!onSurface) return false;
        void this.snapSelected();
        return true;
      case 'Delete':
      case 'Backspace':
        if (!onSurface) return false;
        void this.removeSelected();
        return true;
    }
    return false;
  }

  /**
   * A page that takes key presses before the overlay (host.ts keysBlocked) would leave the tools
   * without their keys: the panel says so and shows a button for each key that has no button yet.
   */
  private offerKeyButtons(): void {
    const row = addKeyButtons(this.panel, this.readoutEl);
    for (const [key, b] of row) {
      b.addEventListener(
        'click',
        trusted((e: MouseEvent) => {
          if (key === 'Tab') this.cycleSelection(e.shiftKey ? -1 : 1);
          else this.act(key, { ctrl: false, alt: false, shift: e.shiftKey }, true);
        }),
        { signal: this.host.signal },
      );
    }
  }

  /** Hides the panel (it may sit on the picture when the page leaves no room around the video). */
  private togglePanel(): void {
    const hidden = this.panel.hidden;
    this.panel.hidden = !hidden;
    this.say(message(hidden ? 'ovlPanelShown' : 'ovlPanelHidden'));
  }

  private chooseTool(kind: MarkKind): void {
    this.tool = kind;
    this.draft = null;
    for (const [k, b] of this.toolButtons) b.setAttribute('aria-pressed', k === kind ? 'true' : 'false');
    const t = TOOLS.find((x) => x.kind === kind)!;
    this.say(`${t.label}: ${t.hint}`);
    this.redraw();
  }

  private chooseDimension(value: SpanDimension): void {
    this.dimensionPicked = true;
    this.showDimension(value);
    const chosen = message('ovlDimensionChosen', [DIMENSIONS.find((d) => d.value === value)!.label]);
    const mismatch = this.sizeMismatch(value);
    this.say(mismatch ? `${chosen}. ${mismatch}` : chosen);
    this.redraw();
  }

  private showDimension(value: SpanDimension): void {
    this.dimension = value;
    for (const [k, b] of this.dimensionButtons) b.setAttribute('aria-pressed', k === value ? 'true' : 'false');
  }

  private placeAtCursor(): void {
    if (!this.record) return;
    const v = this.video;
    this.cursor ??= { x: v.videoWidth / 2, y: v.videoHeight / 2 };
    const p = { ...this.cursor };
    if (!this.draft) {
      this.startDraft(p, false);
      if (this.draft) this.say(message('ovlFirstEndKeys'));
    } else {
      this.draft.points[1] = p;
      this.draft.lens[1] = false;
      void this.commitDraft();
    }
    this.redraw();
  }

  private nudge(dx: number, dy: number): void {
    const m = this.selectedMark();
    if (m && this.selected) {
      const end = this.selected.end;
      const points = m.points.map((p, i) => (i === end ? { x: p.x + dx, y: p.y + dy } : p));
      // an end moved by hand is worth what the hand is, whatever a snap had claimed for it
      const sigmas = this.sigmasOf(m);
      sigmas[end] = this.endSigma(m.kind, points, false);
      this.endSigmas.set(m.id, sigmas);
      this.snapNotes.delete(m.id);
      this.replaceMark({ ...m, points, edgeSigmaPx: oneSigma(sigmas) }, true);
      const p = points[this.selected.end]!;
      this.say(message('ovlEndAt', [String(this.selected.end + 1), p.x.toFixed(1), p.y.toFixed(1)]));
      return;
    }
    const v = this.video;
    const c = this.cursor ?? { x: v.videoWidth / 2, y: v.videoHeight / 2 };
    this.cursor = { x: c.x + dx, y: c.y + dy };
    if (this.draft && POINTS_PER_KIND[this.draft.kind] === 2) {
      this.draft.points[1] = this.cursor;
      this.draft.lens[1] = false;
    }
    this.redraw();
  }

  private cycleSelection(dir: number): void {
    const here = this.record ? marksAt(this.record.marks, this.video.currentTime) : [];
    const ends = here.flatMap((m) => m.points.map((_, end) => ({ markId: m.id, end })));
    if (ends.length === 0) return;
    const i = ends.findIndex((x) => x.markId === this.selected?.markId && x.end === this.selected?.end);
    this.selected = ends[(i + dir + ends.length) % ends.length]!;
    this.say(message('ovlSelectedEnd', [String(this.selected.end + 1), String(this.selectedMark()?.kind.replace('-', ' '))]));
    this.redraw();
  }

  private selectedMark(): Mark | undefined {
    return this.record?.marks.find((m) => m.id === this.selected?.markId);
  }

  /* ---------------------------------------------------------------------------------------- */
  /* Marks                                                                                     */

  private async commitDraft(): Promise<void> {
    const d = this.draft;
    if (!d || !this.record) return;
    this.draft = null;
    let points = d.points.slice(0, POINTS_PER_KIND[d.kind]);
    let sigmas = points.map((_, i) => this.endSigma(d.kind, points, d.lens[i] ?? false));
    let note = '';
    if (points.length === 2 && (d.kind === 'object-span' || d.kind === 'landmark-span')) {
      // snapping is an aid: if reading pixels fails, the mark is kept as placed
      const img = await this.pixels.get().catch(() => null);
      this.describeVideo();
      if (img) ({ points, sigmas, note } = snapSpan(img, points as [Point, Point], sigmas as [number, number], 'both', d.kind === 'landmark-span' ? LANDMARK_SNAP_FLOOR_PX : undefined));
    }
    const mark: Mark = {
      id: `m${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}`,
      kind: d.kind,
      t: d.t,
      points,
      edgeSigmaPx: oneSigma(sigmas),
      ...(d.kind === 'object-span' ? { dimension: this.dimension } : {}),
      ...(d.kind === 'landmark-span' ? { landmarkDimension: landmarkDimensionOf(points) } : {}),
      mapping: this.mappingRecord(),
      // who marked it, when the user gave a name in the settings (no account: just the name)
      ...(this.markerName ? { by: this.markerName } : {}),
      createdAt: Date.now(),
    };
    this.endSigmas.set(mark.id, sigmas);
    if (note) this.snapNotes.set(mark.id, note);
    this.selected = { markId: mark.id, end: points.length - 1 };
    await this.replaceMark(mark, false);
  }

  /** The snap key: the selected end only, by the same rules as on release. */
  private async snapSelected(): Promise<void> {
    const m = this.selectedMark();
    const sel = this.selected;
    if (!m || m.points.length !== 2 || !sel) return;
    const img = await this.pixels.get().catch(() => null);
    if (!img) {
      this.say(message('ovlSnapOff'));
      return;
    }
    const sigmas = this.sigmasOf(m);
    const points = m.points as [Point, Point];
    // the snap must do better than a hand placement at this zoom, whatever the end claims now
    const offered: [number, number] = [sigmas[0]!, sigmas[1]!];
    offered[sel.end] = this.endSigma(m.kind, points, false);
    const s = snapSpan(img, points, offered, sel.end as 0 | 1, m.kind === 'landmark-span' ? LANDMARK_SNAP_FLOOR_PX : undefined);
    const r = s.results[sel.end as 0 | 1];
    if (r.outcome === 'no-edge') {
      this.say(message('ovlNoEdge'));
      return;
    }
    if (r.outcome !== 'snapped') {
      this.snapNotes.set(m.id, s.note);
      this.redraw();
      this.say(s.note);
      return;
    }
    sigmas[sel.end] = r.sigmaPx;
    this.endSigmas.set(m.id, sigmas);
    this.snapNotes.delete(m.id);
    await this.replaceMark({ ...m, points: s.points, edgeSigmaPx: oneSigma(sigmas) }, false);
    this.say(message('ovlSnapped', r.sigmaPx.toFixed(2)));
  }

  /** Each end's sigma: as placed or edited here, else the mark's one sigma for both. */
  private sigmasOf(m: Mark): number[] {
    const own = this.endSigmas.get(m.id);
    return own && own.length === m.points.length && Math.abs(oneSigma(own) - m.edgeSigmaPx) < 1e-9 ? own.slice() : m.points.map(() => m.edgeSigmaPx);
  }

  /**
   * The hand's floor for an end of these points at the zoom of the moment (span-ends.ts); a
   * landmark's end is no surer placed than snapped: its foot or top is itself a poor edge.
   */
  private endSigma(kind: MarkKind, points: readonly Point[], lens: boolean): number {
    const hand = this.handSigma(points, lens);
    return kind === 'landmark-span' ? Math.max(hand, LANDMARK_SNAP_FLOOR_PX) : hand;
  }

  /** The hand's floor for an end of these points at the zoom of the moment (span-ends.ts). */
  private handSigma(points: readonly Point[], lens: boolean): number {
    const [a, b] = points;
    // a single point, or two at one place: along x
    const along = a && b && (b.x !== a.x || b.y !== a.y);
    const dx = along ? b.x - a.x : 1;
    const dy = along ? b.y - a.y : 0;
    const m = this.currentMapping();
    // without a mapping (no picture yet) one video pixel per CSS pixel
    return handSigmaPx(m ? intrinsicPerCssAlong(m, dx, dy) : 1, lens);
  }

  private lensShowing(): boolean {
    return this.magnifier.style.display === 'block';
  }

  private async removeSelected(): Promise<void> {
    const m = this.selectedMark();
    if (!m) return;
    this.selected = null;
    this.snapNotes.delete(m.id);
    try {
      this.adopt(await send('mark/remove', { caseId: this.caseId, markId: m.id }));
      this.say(message('ovlRemoved'));
    } catch (err) {
      this.notice(message('ovlRemoveFailed', (err as Error).message));
    }
    this.redraw();
  }

  /** Shows the mark at once and saves it (debounced for a run of nudges). */
  private replaceMark(mark: Mark, debounce: boolean): Promise<void> {
    if (!this.record) return Promise.resolve();
    const i = this.record.marks.findIndex((m) => m.id === mark.id);
    const marks = i < 0 ? [...this.record.marks, mark] : this.record.marks.map((m) => (m.id === mark.id ? mark : m));
    this.record = { ...this.record, marks };
    this.redraw();
    // a nudge of another mark still waiting is written now, never dropped
    if (this.pendingId !== null && this.pendingId !== mark.id) this.flush();
    window.clearTimeout(this.pendingSave);
    this.pendingSave = undefined;
    this.pendingId = null;
    if (debounce) {
      this.pendingId = mark.id;
      this.pendingSave = window.setTimeout(() => {
        this.pendingSave = undefined;
        this.pendingId = null;
        void this.save(mark.id);
      }, 250);
      return Promise.resolve();
    }
    return this.save(mark.id);
  }

  private async save(markId: string): Promise<void> {
    const mark = this.record?.marks.find((m) => m.id === markId);
    if (!mark) return;
    try {
      this.adopt(await send('mark/put', { caseId: this.caseId, mark }));
      this.announceFigures(mark);
    } catch (err) {
      this.notice(message('ovlNotSaved', (err as Error).message));
    }
    this.redraw();
  }

  /** Writes a pending nudge now (closing, the video changing, or another mark being saved). */
  private flush(): void {
    if (this.pendingId === null) return;
    window.clearTimeout(this.pendingSave);
    const id = this.pendingId;
    this.pendingSave = undefined;
    this.pendingId = null;
    void this.save(id);
  }

  /* ---------------------------------------------------------------------------------------- */
  /* Drawing and readout                                                                       */

  private redraw(): void {
    const m = this.currentMapping();
    const layer = this.layer;
    layer.replaceChildren();
    if (!m || !this.record) return;
    const r = this.host.el.getBoundingClientRect();
    const t = this.video.currentTime;
    const here = marksAt(this.record.marks, t);
    const frame = cameraFrame(this.record.marks, this.video.videoWidth, this.video.videoHeight);
    for (const mark of this.record.marks) {
      const current = here.includes(mark) || mark.kind === 'frame-edges' || mark.kind === 'frame-top-bottom';
      this.drawMark(mark.kind, mark.points, m, r, current ? 1 : 0.25, mark.id);
    }
    if (this.draft) this.drawMark(this.draft.kind, this.draft.points, m, r, 1, 'draft');
    if (this.cursor && !this.draft) {
      const c = this.toLocal(this.cursor, m, r);
      layer.append(svg('circle', { cx: c.x, cy: c.y, r: 3, fill: 'none', stroke: '#fff', 'stroke-width': 1, 'data-testid': 'cursor' }));
    }
    this.updateReadout(here, frame);
  }

  private drawMark(kind: MarkKind, points: Point[], m: Mapping, r: DOMRect, opacity: number, id: string): void {
    const colour = COLOURS[kind];
    const g = svg('g', { opacity, 'data-mark': id, 'data-kind': kind });
    const local = points.map((p) => this.toLocal(p, m, r));
    if (kind === 'frame-edges') {
      for (const p of local) g.append(svg('line', { x1: p.x, y1: 0, x2: p.x, y2: r.height, stroke: colour, 'stroke-width': 2, 'stroke-dasharray': '6 4' }));
    } else if (kind === 'frame-top-bottom') {
      for (const p of local) g.append(svg('line', { x1: 0, y1: p.y, x2: r.width, y2: p.y, stroke: colour, 'stroke-width': 2, 'stroke-dasharray': '6 4' }));
    } else if (kind === 'horizon' && local.length === 2) {
      // drawn across the whole picture: a horizon is a line, not a span
      const [a, b] = local as [{ x: number; y: number }, { x: number; y: number }];
      const k = b.x !== a.x ? (b.y - a.y) / (b.x - a.x) : 0;
      g.append(svg('line', { x1: 0, y1: a.y - k * a.x, x2: r.width, y2: a.y + k * (r.width - a.x), stroke: colour, 'stroke-width': 2, 'stroke-dasharray': '10 4' }));
    } else if (local.length === 2) {
      const [a, b] = local as [{ x: number; y: number }, { x: number; y: number }];
      g.append(svg('line', { x1: a.x, y1: a.y, x2: b.x, y2: b.y, stroke: '#000', 'stroke-width': 4, 'stroke-opacity': 0.5 }));
      g.append(svg('line', { x1: a.x, y1: a.y, x2: b.x, y2: b.y, stroke: colour, 'stroke-width': 2 }));
    }
    local.forEach((p, end) => {
      const sel = this.selected?.markId === id && this.selected.end === end;
      g.append(svg('circle', { cx: p.x, cy: p.y, r: sel ? 5 : 3.5, fill: sel ? '#fff' : colour, stroke: '#000', 'stroke-width': 1 }));
    });
    this.layer.append(g);
  }

  /**
   * The assumptions for a span marked as `dimension`, made once per stored case: the live readout
   * keeps its last solve while they are the same object, and a redraw runs on every pointer move.
   */
  private assumptionsFor(dimension: NonNullable<Mark['dimension']>): EngineAssumptions {
    let a = this.spanAssumptions.get(dimension);
    if (!a) {
      a = engineAssumptions(this.record?.assumptions, [{ kind: 'object-span', dimension } as Mark]);
      this.spanAssumptions.set(dimension, a);
    }
    return a;
  }

  private updateReadout(here: Mark[], frame: ReturnType<typeof cameraFrame>): void {
    const draftSpan = this.draft && this.draft.kind === 'object-span' && this.draft.points.length === 2 ? this.draft : null;
    const obj = draftSpan ? { points: draftSpan.points, edgeSigmaPx: this.handSigma(draftSpan.points, false) } : here.find((x) => x.kind === 'object-span');
    // the default size follows the dimension this span is marked as (assumptions.ts sizeForMarks)
    const spanDimension = draftSpan ? this.dimension : (obj as Mark | undefined)?.dimension;
    const a = spanDimension ? this.assumptionsFor(spanDimension) : this.assumptions;
    const noteText = here.map((x) => this.snapNotes.get(x.id)).find((x) => x);
    const note = noteText ? [h('div', { class: 'notice', 'data-testid': 'snap-note' }, noteText)] : [];
    const lm = here.find((x) => x.kind === 'landmark-span') ?? null;
    const t = this.video.currentTime;
    const head = h('div', { class: 'muted' }, message(this.savedCount === 1 ? 'ovlFrameHeadOne' : 'ovlFrameHead', [timestamp(t), String(this.savedCount)]));
    if (!obj) {
      this.readoutEl.replaceChildren(head, h('div', {}, TOOLS.find((x) => x.kind === this.tool)!.hint), ...note);
      return;
    }
    const f = liveFigures(obj, lm, frame, a);
    if (!f) {
      this.readoutEl.replaceChildren(head, h('div', {}, message('ovlOutsidePicture')));
      return;
    }
    const lines: (HTMLElement | string)[] = [
      head,
      h('div', { class: 'big', 'data-testid': 'range' }, message('ovlRange', distanceEstimate(f.result.range, this.system))),
      h('div', {}, message('ovlSpan', [f.spanPx.toFixed(1), degreesEstimate(f.result.angularSize)])),
    ];
    const lr = f.result.landmarkHorizontalRange ?? f.result.landmarkRange;
    if (lr) lines.push(h('div', {}, message('ovlLandmarkRange', distanceEstimate(lr, this.system))));
    if (f.result.impliedSpeed) lines.push(h('div', {}, message('ovlImpliedSpeed', speedEstimate(f.result.impliedSpeed, this.system))));
    const mismatch = this.sizeMismatch(spanDimension);
    if (mismatch) lines.push(h('div', { class: 'notice', 'data-testid': 'dimension-mismatch' }, mismatch));
    lines.push(...note);
    const broadside = a.aspect.lo === a.aspect.hi && Math.abs(a.aspect.lo - Math.PI / 2) < 1e-9;
    // the labels are stored in the case (data); only the sentence around them is ours
    lines.push(h('div', { class: 'muted' }, message(broadside ? 'ovlAssumingBroadside' : 'ovlAssumingAspect', [a.sizeLabel, a.cameraLabel.toLowerCase()])));
    this.readoutEl.replaceChildren(...lines);
  }

  /** When a span marked as `marked` disagrees with the dimension the case's size is: what to tell the user. */
  private sizeMismatch(marked: Mark['dimension']): string | null {
    const d = disagreement(marked, this.record?.assumptions);
    if (!d) return null;
    const word = (x: SpanDimension) => DIMENSIONS.find((y) => y.value === x)!.label;
    return message('ovlDimensionMismatch', [word(d.marked), word(d.assumed)]);
  }

  private announceFigures(mark: Mark): void {
    const note = this.snapNotes.get(mark.id);
    const speak = (text: string) => this.say(note ? `${text} ${note}` : text);
    if (mark.kind !== 'object-span' || !this.record) {
      if (note) this.say(note);
      return;
    }
    const frame = cameraFrame(this.record.marks, this.video.videoWidth, this.video.videoHeight);
    const f = liveFigures(mark, null, frame, this.assumptions);
    if (f) speak(message('ovlSavedSpan', [f.spanPx.toFixed(1), degreesEstimate(f.result.angularSize), distanceEstimate(f.result.range, this.system)]));
    else speak(message('ovlSaved'));
  }

  private say(text: string): void {
    // re-set so that a repeated message is announced again
    this.live.textContent = '';
    this.live.textContent = text;
  }

  private notice(text: string): void {
    this.noticeEl.textContent = text;
  }

  /* ---------------------------------------------------------------------------------------- */

  async close(): Promise<void> {
    this.flush();
    this.host.destroy();
    this.onClosed(this);
  }

  /** For a second injection: bring the surface back into focus instead of mounting again. */
  focus(): void {
    this.surface.focus();
  }
}

/** A mark's one sigma from its ends' (markSigmaPx: root mean square; one end: its own). */
function oneSigma(sigmas: readonly number[]): number {
  return sigmas.length === 2 ? markSigmaPx(sigmas[0]!, sigmas[1]!) : sigmas[0]!;
}

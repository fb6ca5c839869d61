import { Chooser } from './chooser';
import { inputPolicy } from './dom';
import type { FrameReply, PictureReply, RateReply } from '../shared/frames';
import { MeasureSession } from './session';
import { dropShell, takePreferredSrc, type CallUpStatus } from './shell';
import { findVideos, foreignFrameOrigins, videoContainers } from './videos';

/*
 * The overlay's entry, injected on demand. Content scripts share one isolated world per page, so a
 * second injection finds the registry the first one left and does not mount again: it focuses the
 * open session, or offers the chooser when no session is open.
 */
export interface Registry {
  sessions: Map<HTMLVideoElement, MeasureSession>;
  chooser: Chooser | null;
  run(): void;
  /** What this frame shows after a call-up (the call-up asks, so that drawing nothing is said). */
  status(): CallUpStatus;
  /** A frame of the measured video for an extension page: set by frame-server.ts, injected only when a page asks. */
  frame?: (req: unknown) => Promise<FrameReply>;
  /** The paused frame whole, for the annotated frame: set beside `frame`, by the same lazily injected file. */
  picture?: () => Promise<PictureReply>;
  /** The clip's frame rate as the browser's presented frames tell it: set by frame-server.ts too. */
  rate?: () => Promise<RateReply>;
}



const KEY = Symbol.for('clip-caliper.overlay');
const g = globalThis as unknown as Record<symbol, Registry | undefined>;

function mount(reg: Registry, video: HTMLVideoElement, index: number): void {
  if (reg.sessions.has(video)) {
    reg.sessions.get(video)!.focus();
    return;
  }
  reg.sessions.set(video, new MeasureSession(video, index, (s) => reg.sessions.delete(s.video)));
}

function run(this: Registry): void {
  // the context menu names the video it was opened on: measure that one, even beside others
  const prefer = takePreferredSrc();
  if (prefer) {
    const all = findVideos();
    const chosen = all.filter((v) => v.currentSrc === prefer || v.src === prefer);
    if (chosen.length === 1) {
      this.chooser?.destroy();
      this.chooser = null;
      mount(this, chosen[0]!, all.indexOf(chosen[0]!));
      return;
    }
  }
  const open = [...this.sessions.values()];
  if (open.length > 0) {
    open[0]!.focus();
    return;
  }
  if (this.chooser?.alive) return;
  const videos = findVideos();
  const foreign = foreignFrameOrigins();
  if (videos.length === 1 && foreign.length === 0) {
    mount(this, videos[0]!, 0);
    return;
  }
  this.chooser = new Chooser(videos, foreign, (v) => mount(this, v, videos.indexOf(v)));
  followWhileChoosing(this, videos);
}

/** While the chooser is open, a video added or removed (a single-page site) rebuilds it. */
function followWhileChoosing(reg: Registry, shown: HTMLVideoElement[]): void {
  const mo = new MutationObserver(() => {
    if (!reg.chooser?.alive) {
      mo.disconnect();
      return;
    }
    const now = findVideos();
    if (now.length === shown.length && now.every((v, i) => v === shown[i])) return;
    mo.disconnect();
    reg.chooser.destroy();
    reg.chooser = null;
    reg.run();
  });
  // a component adding a video to its shadow root changes nothing the document itself sees
  for (const root of videoContainers()) mo.observe(root, { childList: true, subtree: true });
}

/** Whether the page left a host of ours where the user can see it. */
function shown(host: HTMLElement): CallUpStatus {
  if (!host.isConnected) return 'removed';
  const r = host.getBoundingClientRect();
  const visible = typeof host.checkVisibility === 'function' ? host.checkVisibility({ opacityProperty: true, visibilityProperty: true }) : true;
  return visible && r.width > 0 && r.height > 0 ? 'measuring' : 'hidden';
}

function status(this: Registry): CallUpStatus {
  const open = [...this.sessions.values()];
  if (open.length > 0) {
    const states = open.map((s) => shown(s.shell.host));
    return states.includes('measuring') ? 'measuring' : states[0]!;
  }
  if (this.chooser?.alive) {
    const s = shown(this.chooser.el);
    return s === 'measuring' ? 'choosing' : s;
  }
  return 'none';
}

const reg: Registry = g[KEY] ?? { sessions: new Map(), chooser: null, run, status };
// a registry left by an earlier build of the overlay in this world lacks what this one added
reg.status ??= status;
g[KEY] = reg;
reg.run();
// a shell the first stage drew for a video this run did not mount (the page changed meanwhile)
dropShell();

// The browser tests reach the overlay through this handle, which only the test build sets, in the
// extension's isolated world: the page has its own globals and cannot see it, and the roots stay
// closed in every build.
if (import.meta.env.MODE === 'e2e') {
  (g as unknown as Record<symbol, unknown>)[Symbol.for('clip-caliper.e2e')] = {
    overlays: () => [...reg.sessions.values()].map((s) => ({ host: s.shell.host, root: s.shell.root, byFirstStage: s.shell.byFirstStage, ready: s.ready, readyAt: s.readyAt })),
    chooser: () => (reg.chooser?.alive ? { host: reg.chooser.el, root: reg.chooser.root } : null),
    status: () => reg.status(),
    // the bench's own dispatched moves count as input (dom.ts inputPolicy); nothing else sets it
    benchSynthetic: (on: boolean) => (inputPolicy.benchSynthetic = on),
  };
}

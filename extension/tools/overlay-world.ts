import type { CDPSession, Frame, Page } from 'playwright-core';

/*
 * The browser tests' way to the overlay. Its shadow roots are closed and its host is a plain div,
 * so nothing in the page's world (and no Playwright locator) can reach inside. The test build
 * alone sets a handle in the extension's isolated world (extension/overlay/index.ts, the
 * `clip-caliper.e2e` symbol); these helpers evaluate there through the DevTools protocol, in the
 * execution context that the browser reports as the extension's isolated world of that frame
 * (Runtime.executionContextCreated, auxData.type "isolated", origin chrome-extension://).
 * Clicks and keys still go through Playwright's mouse and keyboard, so they are the user's own
 * (trusted) input, exactly as the overlay requires.
 */

type Target = Page | Frame;

interface ContextInfo {
  id: number;
  origin: string;
  auxData?: { frameId?: string; type?: string; isDefault?: boolean };
}

interface World {
  cdp: CDPSession;
  contexts: Map<number, ContextInfo>;
}

const worlds = new WeakMap<object, Promise<World>>();
/** Where a frame's overlay lives, once found (OverlayView.world). */
const homes = new WeakMap<Frame, Target>();

function isPage(t: Target): t is Page {
  return typeof (t as Page).mainFrame === 'function';
}

function frameOf(t: Target): Frame {
  return isPage(t) ? t.mainFrame() : t;
}

async function openWorld(owner: Page | Frame, page: Page): Promise<World> {
  const cdp = await page.context().newCDPSession(owner);
  const contexts = new Map<number, ContextInfo>();
  cdp.on('Runtime.executionContextCreated', (e) => contexts.set(e.context.id, e.context as ContextInfo));
  cdp.on('Runtime.executionContextDestroyed', (e) => contexts.delete(e.executionContextId));
  cdp.on('Runtime.executionContextsCleared', () => contexts.clear());
  await cdp.send('Runtime.enable');
  return { cdp, contexts };
}

/** The protocol session that holds this frame: its own when it runs out of process, else its page's. */
async function worldFor(t: Target): Promise<World> {
  const frame = frameOf(t);
  const page = frame.page();
  if (frame !== page.mainFrame()) {
    let w = worlds.get(frame);
    if (!w) {
      w = openWorld(frame, page).catch(() => worldFor(page));
      worlds.set(frame, w);
    }
    return w;
  }
  let w = worlds.get(page);
  if (!w) {
    w = openWorld(page, page);
    worlds.set(page, w);
  }
  return w;
}

interface TreeNode {
  frame: { id: string; url: string; name?: string; parentId?: string };
  childFrames?: TreeNode[];
}

/** The protocol's id of a Playwright frame, found in its session's frame tree by address and name. */
async function protocolFrameId(world: World, frame: Frame): Promise<string> {
  const { frameTree } = (await world.cdp.send('Page.getFrameTree')) as { frameTree: TreeNode };
  if (frame === frame.page().mainFrame()) return frameTree.frame.id;
  const all: TreeNode[] = [];
  const walk = (n: TreeNode) => {
    all.push(n);
    for (const c of n.childFrames ?? []) walk(c);
  };
  walk(frameTree);
  // out of process, the frame is the root of its own session's tree
  const byUrl = all.filter((n) => n.frame.url === frame.url() && (n.frame.name ?? '') === frame.name());
  const found = byUrl.find((n) => n.frame.parentId !== undefined) ?? byUrl[0] ?? (all.length === 1 ? all[0] : undefined);
  if (!found) throw new Error(`no protocol frame for ${frame.url()}`);
  return found.frame.id;
}

/** The extension's isolated world in this frame, waited for (it exists once the overlay was called up). */
async function isolatedContext(t: Target, timeout = 10_000): Promise<{ world: World; contextId: number }> {
  const world = await worldFor(t);
  const frameId = await protocolFrameId(world, frameOf(t));
  const until = Date.now() + timeout;
  for (;;) {
    const ctx = [...world.contexts.values()].find((c) => c.auxData?.frameId === frameId && c.auxData?.type === 'isolated' && c.origin.startsWith('chrome-extension://'));
    if (ctx) return { world, contextId: ctx.id };
    if (Date.now() > until) throw new Error('the extension has no isolated world in this frame (was the overlay called up?)');
    await new Promise((ok) => setTimeout(ok, 50));
  }
}

/** What the test build's handle offers (extension/overlay/index.ts). */
export interface Handle {
  overlays(): { host: HTMLElement; root: ShadowRoot; byFirstStage: boolean; ready: boolean; readyAt: number }[];
  chooser(): { host: HTMLElement; root: ShadowRoot } | null;
  status(): string;
  /** The bench's dispatched pointer moves count as input (extension/overlay/dom.ts inputPolicy). */
  benchSynthetic(on: boolean): boolean;
}

/**
 * Runs `fn` in the frame's extension world with the handle (null before the overlay was ever
 * called up there) and `arg`; `fn` must be self-contained, as with page.evaluate.
 */
export async function inOverlayWorld<R, A = undefined>(t: Target, fn: (h: Handle | null, arg: A) => R | Promise<R>, arg?: A, timeout = 10_000): Promise<R> {
  const { world, contextId } = await isolatedContext(t, timeout);
  // run from tsx (npm start), esbuild wraps named functions in __name(): give it one there
  const expression = `(() => { const __name = (f) => f; return (${fn.toString()})(globalThis[Symbol.for('clip-caliper.e2e')] ?? null, ${JSON.stringify(arg ?? null)}); })()`;
  const reply = (await world.cdp.send('Runtime.evaluate', { expression, contextId, awaitPromise: true, returnByValue: true })) as {
    result: { value?: R };
    exceptionDetails?: { text: string; exception?: { description?: string } };
  };
  if (reply.exceptionDetails) throw new Error(`in the overlay's world: ${reply.exceptionDetails.exception?.description ?? reply.exceptionDetails.text}`);
  return reply.result.value as R;
}

/** The top-left of a frame's viewport in the page's viewport (for the mouse), through every parent frame. */
async function frameOffset(frame: Frame): Promise<{ x: number; y: number }> {
  let x = 0;
  let y = 0;
  for (let f: Frame | null = frame; f?.parentFrame(); f = f.parentFrame()) {
    const el = await f.frameElement();
    const o = await el.evaluate((e: Element) => {
      const r = e.getBoundingClientRect();
      const cs = getComputedStyle(e);
      return { x: r.left + parseFloat(cs.borderLeftWidth) + parseFloat(cs.paddingLeft), y: r.top + parseFloat(cs.borderTopWidth) + parseFloat(cs.paddingTop) };
    });
    x += o.x;
    y += o.y;
  }
  return { x, y };
}

export interface Box {
  x: number;
  y: number;
  width: number;
  height: number;
}

type Part = 'overlay' | 'chooser';

/**
 * The overlay (or the chooser) of one page or frame, seen from the extension's world: text,
 * attributes, boxes, focus; clicks go through the real mouse at the element's centre.
 */
export class OverlayView {
  constructor(
    private readonly t: Target,
    private readonly part: Part = 'overlay',
    private readonly index = 0,
  ) {}

  /**
   * The world that holds this frame's overlay: the frame's own when the overlay was called up into
   * it, else the top frame's (called up from the top, the overlay measures a video in a same-origin
   * frame from there); remembered per frame once found.
   */
  private async world(): Promise<{ where: Target; doc: string | null }> {
    const frame = frameOf(this.t);
    if (frame === frame.page().mainFrame()) return { where: this.t, doc: null };
    const known = homes.get(frame);
    if (known) return { where: known, doc: frame.url() };
    const here = await inOverlayWorld(frame, (h) => (h ? h.overlays().length + (h.chooser() ? 1 : 0) : 0), undefined, 1_500).catch(() => 0);
    const where = here > 0 ? frame : frame.page();
    if (here > 0 || (await inOverlayWorld(frame.page(), (h, u: string) => !!h?.overlays().some((o) => o.host.ownerDocument.URL === u), frame.url(), 1_500).catch(() => false))) homes.set(frame, where);
    return { where, doc: frame.url() };
  }

  /** Runs `op` on the first element matching `sel` in the root (or on the host when sel is null). */
  private async on<R>(sel: string | null, op: string, extra?: unknown): Promise<R> {
    const { where, doc } = await this.world();
    return inOverlayWorld<unknown, { part: Part; index: number; sel: string | null; op: string; extra: unknown; doc: string | null }>(
      where,
      (h, a) => {
        const mine = <S extends { host: HTMLElement }>(x: S | null | undefined): S | null => (x && (a.doc === null || x.host.ownerDocument.URL === a.doc) ? x : null);
        const shell = a.part === 'chooser' ? mine(h?.chooser()) : (h?.overlays().filter((o) => mine(o)) ?? [])[a.index];
        if (!shell) return a.op === 'count' ? 0 : null;
        const el = (a.sel === null ? shell.host : shell.root.querySelector(a.sel)) as HTMLElement | null;
        switch (a.op) {
          case 'count':
            return a.sel === null ? 1 : shell.root.querySelectorAll(a.sel).length;
          case 'text':
            return el ? el.textContent : null;
          case 'attr':
            return el ? el.getAttribute(a.extra as string) : null;
          case 'box': {
            if (!el) return null;
            const r = el.getBoundingClientRect();
            return { x: r.left, y: r.top, width: r.width, height: r.height };
          }
          case 'focus':
            if (!el) throw new Error(`no ${a.sel} to focus`);
            el.focus();
            return true;
          case 'visible':
            return !!el && el.checkVisibility() && el.getBoundingClientRect().width > 0;
          case 'style':
            return el ? getComputedStyle(el).getPropertyValue(a.extra as string) : null;
          case 'prop':
            if (a.extra === '__ready') return 'ready' in shell ? shell.ready : null;
            return el ? (el as unknown as Record<string, unknown>)[a.extra as string] : null;
          default:
            throw new Error(`unknown op ${a.op}`);
        }
      },
      { part: this.part, index: this.index, sel, op, extra: extra ?? null, doc },
    ) as Promise<R>;
  }

  /** How many overlays are up in this frame (for the chooser: 0 or 1). */
  async count(sel?: string): Promise<number> {
    if (sel !== undefined) return this.on<number>(sel, 'count');
    // a frame where the overlay was never called up has no extension world: none, said quickly
    const { where, doc } = await this.world();
    return inOverlayWorld(
      where,
      (h, a: { part: Part; doc: string | null }) => {
        const mine = (x: { host: HTMLElement } | null | undefined) => !!x && (a.doc === null || x.host.ownerDocument.URL === a.doc);
        return a.part === 'chooser' ? (mine(h?.chooser()) ? 1 : 0) : (h?.overlays().filter(mine).length ?? 0);
      },
      { part: this.part, doc },
      1_500,
    ).catch(() => 0);
  }

  text(sel: string): Promise<string | null> {
    return this.on(sel, 'text');
  }

  attr(sel: string | null, name: string): Promise<string | null> {
    return this.on(sel, 'attr', name);
  }

  visible(sel: string | null): Promise<boolean> {
    return this.on<boolean | null>(sel, 'visible').then((v) => !!v);
  }

  style(sel: string | null, prop: string): Promise<string | null> {
    return this.on(sel, 'style', prop);
  }

  prop<R>(sel: string | null, name: string): Promise<R | null> {
    return this.on(sel, 'prop', name);
  }

  focus(sel: string): Promise<void> {
    return this.on<boolean>(sel, 'focus').then(() => undefined);
  }

  /** The element's box (the host's with no selector) in the page's viewport, as Playwright's boundingBox gives it. */
  async box(sel: string | null = null): Promise<Box | null> {
    const b = await this.on<Box | null>(sel, 'box');
    if (!b) return null;
    const o = await frameOffset(frameOf(this.t));
    return { ...b, x: b.x + o.x, y: b.y + o.y };
  }

  /** Clicks the element's centre with the real mouse (trusted input, as a user's click). */
  async click(sel: string, options: { modifiers?: ('Shift' | 'Alt')[] } = {}): Promise<void> {
    const b = await this.box(sel);
    if (!b) throw new Error(`no ${sel} to click`);
    const page = frameOf(this.t).page();
    for (const m of options.modifiers ?? []) await page.keyboard.down(m);
    await page.mouse.click(b.x + b.width / 2, b.y + b.height / 2);
    for (const m of options.modifiers ?? []) await page.keyboard.up(m);
  }

  /** Waits until the element's text matches `re` (as a locator's filter and waitFor would); returns it. */
  async until(sel: string, re: RegExp, timeout = 10_000): Promise<string> {
    const end = Date.now() + timeout;
    for (;;) {
      const text = await this.text(sel).catch(() => null);
      if (text !== null && re.test(text)) return text;
      if (Date.now() > end) throw new Error(`${sel} did not come to match ${re} (last: ${text})`);
      await new Promise((ok) => setTimeout(ok, 50));
    }
  }

  /** Whether the session finished mounting (wired, placed, focused). */
  async ready(): Promise<boolean> {
    return (await this.prop<boolean>(null, '__ready').catch(() => null)) === true;
  }
}

/** The overlay of a page or frame (the index-th one when several videos are measured). */
export function ovl(t: Target, index = 0): OverlayView {
  return new OverlayView(t, 'overlay', index);
}

/** The chooser of a page or frame. */
export function chooser(t: Target): OverlayView {
  return new OverlayView(t, 'chooser');
}

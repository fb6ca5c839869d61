import { message } from '../shared/i18n';
import { DIMENSIONS, FIRST_DIMENSION, FIRST_TOOL, TOOLS } from './panel';

/*
 * The overlay's shell: the host element over a video and the panel inside its shadow root, drawn
 * without behaviour. Calling the overlay up runs drawShell at once, before the rest of the overlay
 * has even been read (extension/background/call-up.ts); the session then takes these same elements and
 * wires them (session.ts). With several videos, frames, fullscreen or an overlay already up, the
 * first stage draws nothing and the session draws the shell itself, with this same function.
 *
 * The page under review is treated as an adversary, so the shell is drawn from the extension's
 * isolated world, never the page's: the page's patched DOM methods (attachShadow, createElement)
 * and its timers do not reach this world. The host is a plain div (a custom element's tag could be
 * defined by the page first and receive the host's callbacks), its shadow root is closed, and the
 * root is handed to the session through this world's own globals (SHELLS), never found by a query
 * the page could answer with a look-alike. What the page can still see is the host's box and its
 * inline style: no case data.
 */

/**
 * What a call-up left on screen in a frame: a session's panel, the chooser, or nothing, and when
 * nothing, why: the host was taken off the page or hidden (by the page: nothing of ours does
 * either while a session is open).
 */
export type CallUpStatus = 'measuring' | 'choosing' | 'removed' | 'hidden' | 'none';

/** Where drawn shells wait for their session, in the isolated world's globals (the page has its own). */
export const SHELLS = 'clip-caliper.shells';

/** A drawn shell: the host, its closed root and the video it covers. */
export interface Shell {
  host: HTMLElement;
  root: ShadowRoot;
  video: HTMLVideoElement;
  /** Drawn by a first stage, not yet taken by a session. */
  waiting: boolean;
  /** Drawn by a first stage (ahead of the overlay proper), not by the session itself. */
  byFirstStage: boolean;
}

/** Everything the shell shows, read from the message table by whoever calls drawShell. */
export interface ShellText {
  surface: string;
  toolbar: string;
  tools: { kind: string; key: string; label: string; title: string; first: boolean }[];
  dimension: string;
  dimensions: { value: string; key: string; label: string; title: string; first: boolean }[];
  close: string;
  closeTitle: string;
  panel: string;
  caution: string;
}

export function shellText(): ShellText {
  return {
    surface: message('ovlSurfaceLabel'),
    toolbar: message('ovlToolsLabel'),
    tools: TOOLS.map((t) => ({ kind: t.kind, key: t.key, label: t.label, title: message('ovlToolTitle', [t.hint, t.key]), first: t.kind === FIRST_TOOL })),
    dimension: message('ovlDimensionLabel'),
    dimensions: DIMENSIONS.map((d) => ({ value: d.value, key: d.key, label: d.label, title: message('ovlDimensionTitle', [d.label, d.key]), first: d.value === FIRST_DIMENSION })),
    close: message('ovlClose'),
    closeTitle: message('ovlCloseTitle'),
    panel: message('ovlPanelLabel'),
    caution: message('ovlCaution'),
  };
}

/**
 * Draws the shell over `video` and returns it, or with `video` null (the first stage) over the only
 * video of a page without frames, fullscreen or an overlay already up, and says whether it drew.
 *
 * It must stay self-contained, using nothing but its arguments and the frame's globals: the
 * scripting API sends its source text into the extension's isolated world of the frame ahead of
 * the overlay proper, so that the panel shows in a few milliseconds. It builds with createElement,
 * never HTML strings, which pages enforcing Trusted Types refuse.
 */
export function drawShell(video: null, text: ShellText, css: string, prefer?: string | null): boolean;
export function drawShell(video: HTMLVideoElement, text: ShellText, css: string): Shell | null;
export function drawShell(video: HTMLVideoElement | null, text: ShellText, css: string, prefer: string | null = null): Shell | boolean | null {
  // the key spelled out, not SHELLS: a serialized function sees nothing of this module
  const g = globalThis as unknown as Record<symbol, Shell[] | undefined>;
  const shells = (g[Symbol.for('clip-caliper.shells')] ??= []);
  try {
    let target = video;
    if (!target) {
      // an overlay already up in this frame (its shell is connected): the session focuses it
      if (document.fullscreenElement || shells.some((s) => s.host.isConnected)) return false;
      const videos = document.getElementsByTagName('video');
      // the video the user asked for (by its source), when no other has that source
      const chosen = prefer ? [...videos].filter((v) => v.currentSrc === prefer || v.src === prefer) : [];
      if (chosen.length === 1) target = chosen[0]!;
      else if (videos.length === 1 && !document.querySelector('iframe, frame')) target = videos[0]!;
      else return false;
    }
    const doc = target.ownerDocument;
    const make = (name: string, attrs: Record<string, string>, ...children: (Node | string)[]): HTMLElement => {
      const el = doc.createElement(name);
      for (const k in attrs) el.setAttribute(k, attrs[k]!);
      el.append(...children);
      return el;
    };
    const r = target.getBoundingClientRect();
    // a page's zoom on its root element would scale the host's box too (host.ts undoZoom)
    const z = (doc.documentElement as HTMLElement & { currentCSSZoom?: number }).currentCSSZoom;
    const zoom = typeof z === 'number' && z > 0 ? z : 1;
    const host = doc.createElement('div');
    // inline and important: a page rule like `* { all: unset !important }` cannot beat them
    host.setAttribute(
      'style',
      'all:initial!important;position:fixed!important;z-index:2147483647!important;display:block!important;' +
        'margin:0!important;padding:0!important;border:0!important;inset:auto!important;overflow:visible!important;' +
        `background:transparent!important;left:${r.left}px!important;top:${r.top}px!important;width:${r.width}px!important;height:${r.height}px!important;zoom:${1 / zoom}!important`,
    );
    const root = host.attachShadow({ mode: 'closed' });
    const style = doc.createElement('style');
    style.textContent = css;
    // the mark layer and the magnifier show nothing until the session draws: it adds them (panel.ts)
    const surface = make('div', { class: 'surface', tabindex: '0', role: 'application', 'aria-label': text.surface });
    const tools = make('div', { class: 'row tools', role: 'toolbar', 'aria-label': text.toolbar });
    for (const t of text.tools) {
      tools.append(make('button', { type: 'button', 'aria-pressed': String(t.first), title: t.title, 'data-kind': t.kind }, `${t.key} ${t.label}`));
    }
    // two buttons rather than a select: a select's first layout in a page cost 0.8 ms of the 4.6 the
    // whole shell took (fresh pages, headless Chromium)
    const dims = make('div', { class: 'dims', role: 'group', 'aria-label': text.dimension });
    for (const d of text.dimensions) {
      dims.append(make('button', { type: 'button', 'aria-pressed': String(d.first), title: d.title, 'data-dimension': d.value }, `${d.key} ${d.label}`));
    }
    tools.append(dims, make('button', { type: 'button', class: 'close', title: text.closeTitle }, text.close));
    const panel = make(
      'div',
      { class: 'panel', role: 'dialog', 'aria-label': text.panel },
      tools,
      make('div', { class: 'readout', 'data-testid': 'readout' }),
      make('div', { class: 'notice', 'data-testid': 'notice' }),
      make('div', { class: 'caution' }, text.caution),
      make('div', { class: 'sr', 'aria-live': 'polite', 'data-testid': 'live' }),
    );
    root.append(style, surface, panel);
    doc.documentElement.appendChild(host);
    const shell = { host, root, video: target, waiting: !video, byFirstStage: !video };
    shells.push(shell);
    // the first stage answers whether it drew (its result leaves the frame; an element cannot)
    return video ? shell : true;
  } catch {
    // a page that broke the DOM's own methods: the session draws the shell after all
    return video ? null : false;
  }
}

const PREFER_KEY = 'clip-caliper.prefer';

/**
 * Leaves the chosen video's source for the overlay proper, in the extension's world (run there just
 * before it by the call-up; self-contained, as drawShell).
 */
export function preferVideo(src: string): void {
  // the key spelled out, not PREFER_KEY: a serialized function sees nothing of this module
  (globalThis as unknown as Record<symbol, string | undefined>)[Symbol.for('clip-caliper.prefer')] = src;
}

/** The source preferVideo left, taken once. */
export function takePreferredSrc(): string | null {
  const g = globalThis as unknown as Record<symbol, string | undefined>;
  const key = Symbol.for(PREFER_KEY);
  const src = g[key] ?? null;
  delete g[key];
  return src;
}

function shells(): Shell[] {
  const g = globalThis as unknown as Record<symbol, Shell[] | undefined>;
  return (g[Symbol.for(SHELLS)] ??= []);
}

/** The shell the first stage drew over this video, taken once by the session. */
export function takeShell(video: HTMLVideoElement): Shell | null {
  const s = shells().find((x) => x.waiting && x.video === video && x.host.isConnected) ?? null;
  if (s) s.waiting = false;
  return s;
}

/** Forgets a shell whose session ended (or that nobody took), and takes it off the page. */
export function forgetShell(shell: Shell): void {
  const all = shells();
  const i = all.indexOf(shell);
  if (i >= 0) all.splice(i, 1);
  shell.host.remove();
}

/** Removes the shells nobody took (the page changed between the two stages). */
export function dropShell(): void {
  for (const s of shells().filter((x) => x.waiting)) forgetShell(s);
}

/** Every shell drawn in this frame's isolated world that is still on the page. */
export function liveShells(): readonly Shell[] {
  return shells().filter((s) => s.host.isConnected);
}

import { message } from '../shared/i18n';
import { DIMENSIONS, FIRST_DIMENSION, FIRST_TOOL, TOOLS } from './panel';

/*
 * The overlay's shell: the host element over a video and the panel inside its shadow root, drawn
 * without behaviour. Calling the overlay up runs drawShell in the page at once, before the rest
 * of the overlay has even been read (extension/shared/inject.ts); the session then adopts these
 * same elements and wires them (session.ts). With several videos, frames, fullscreen or an overlay
 * already up, the first stage draws nothing and the session draws the shell itself, with this
 * same function.
 */

export const HOST_TAG = 'clip-caliper-overlay';

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
 * Draws the shell over `video` and returns its host, or with `video` null (the first stage) over
 * the only video of a page without frames, fullscreen or an overlay already up, and says whether
 * it drew.
 *
 * It must stay self-contained, using nothing but its arguments and the page's globals: the
 * scripting API sends its source text into the page's own world, where calling the overlay up
 * costs the least (no extension world to create, no message table to load, so the panel is drawn
 * in a few milliseconds). It carries nothing private, only the panel's strings and stylesheet, and
 * builds with createElement, never HTML strings, which pages enforcing Trusted Types refuse. The
 * session that adopts the elements checks them again (panel.ts panelParts), so a page that
 * interfered gets a fresh shell rather than its own.
 */
export function drawShell(video: null, text: ShellText, css: string, prefer?: string | null): boolean;
export function drawShell(video: HTMLVideoElement, text: ShellText, css: string): HTMLElement | null;
export function drawShell(video: HTMLVideoElement | null, text: ShellText, css: string, prefer: string | null = null): HTMLElement | boolean | null {
  const tag = 'clip-caliper-overlay';
  try {
    let target = video;
    if (!target) {
      if (document.fullscreenElement || document.querySelector(tag)) return false;
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
    const host = doc.createElement(tag);
    // inline and important: a page rule like `* { all: unset !important }` cannot beat them
    host.setAttribute(
      'style',
      'all:initial!important;position:fixed!important;z-index:2147483647!important;display:block!important;' +
        'margin:0!important;padding:0!important;border:0!important;inset:auto!important;overflow:visible!important;' +
        `background:transparent!important;left:${r.left}px!important;top:${r.top}px!important;width:${r.width}px!important;height:${r.height}px!important`,
    );
    // marks a first stage's shell for the session to take (takeShell), or to drop when none does
    if (!video) host.setAttribute('data-shell', '');
    const root = host.attachShadow({ mode: 'open' });
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
    // the first stage answers whether it drew (its result leaves the page; an element cannot)
    return video ? host : true;
  } catch {
    // a page that broke the DOM's own methods: the session draws the shell after all
    return video ? null : false;
  }
}

/**
 * Settles once the page has shown its next frame, or after 100 ms (a tab in the background shows
 * none). Self-contained, as drawShell: it runs in the page, after the first stage, so that the
 * panel reaches the screen before the overlay proper takes the page's main thread to load.
 */
export function afterNextFrame(): Promise<void> {
  return new Promise((done) => {
    requestAnimationFrame(() => setTimeout(done, 0));
    setTimeout(done, 100);
  });
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

/** The shell the first stage drew in this video's document, taken once by the session. */
export function takeShell(video: HTMLVideoElement): HTMLElement | null {
  const el = video.ownerDocument.querySelector<HTMLElement>(`${HOST_TAG}[data-shell]`);
  el?.removeAttribute('data-shell');
  return el;
}

/** Removes a shell nobody took (the page changed between the two stages). */
export function dropShell(doc: Document = document): void {
  for (const el of doc.querySelectorAll(`${HOST_TAG}[data-shell]`)) el.remove();
}

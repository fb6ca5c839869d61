/** A small element builder: the overlay uses plain DOM so a pointer move touches only what it must. */
export function h<K extends keyof HTMLElementTagNameMap>(
  tag: K,
  attrs: Record<string, string | number | boolean | undefined> = {},
  ...children: (Node | string)[]
): HTMLElementTagNameMap[K] {
  const el = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) {
    if (v === undefined || v === false) continue;
    el.setAttribute(k, v === true ? '' : String(v));
  }
  el.append(...children);
  return el;
}

const SVG_NS = 'http://www.w3.org/2000/svg';
export function svg<K extends keyof SVGElementTagNameMap>(tag: K, attrs: Record<string, string | number> = {}): SVGElementTagNameMap[K] {
  const el = document.createElementNS(SVG_NS, tag);
  for (const [k, v] of Object.entries(attrs)) el.setAttribute(k, String(v));
  return el;
}

/** Inline, important styles: a page rule like `* { all: unset !important }` cannot beat them. */
export function forceStyle(el: HTMLElement, styles: Record<string, string>): void {
  for (const [k, v] of Object.entries(styles)) el.style.setProperty(k, v, 'important');
}

/**
 * Which input counts. Only events the browser made from the user's own input, always, in every
 * build but for one case: the bench (npm run bench) times the pointer handlers with moves it
 * dispatches itself, and only the test build lets it say so, from the extension's isolated world
 * (overlay/index.ts), which the page cannot reach.
 */
export const inputPolicy = { benchSynthetic: false };

/** Whether an event is the user's own input (see inputPolicy). */
export function isUsersOwn(e: Event): boolean {
  return e.isTrusted || inputPolicy.benchSynthetic;
}

/**
 * Wraps a handler so that it runs only for events the browser made from the user's own input. The
 * page under review can dispatch look-alike events (composed, at the host) but never trusted ones.
 */
export function trusted<E extends Event>(fn: (e: E) => void): (e: E) => void {
  return (e) => {
    if (isUsersOwn(e)) fn(e);
  };
}

import type { MarkKind, SpanDimension } from '../../src/case';
import { trusted } from './dom';
import { addKeyButtons, DIMENSIONS, TOOLS } from './panel';
import type { SessionContext } from './state';

/** What a key asks for. */
export type KeyAction =
  | { do: 'tool'; kind: MarkKind }
  | { do: 'dimension'; value: SpanDimension }
  | { do: 'nudge'; dx: number; dy: number }
  | { do: 'cancel' }
  | { do: 'place' }
  | { do: 'cycle'; dir: 1 | -1 }
  | { do: 'toggle-panel' }
  | { do: 'snap' }
  | { do: 'remove' };

export interface KeyMods {
  ctrl: boolean;
  alt: boolean;
  shift: boolean;
}

/**
 * What a key does, by its name: typed on the keyboard, or pressed as one of the panel's key-free
 * buttons. The keys that act on the picture (arrows, Enter, Space, S, Delete) count only with the
 * surface focused, so they keep their usual meaning on the panel's buttons; Tab moves between ends
 * only while one is selected, and otherwise moves focus as usual. Null: not ours. Pure.
 */
export function keyAction(key: string, mods: KeyMods, onSurface: boolean, hasSelection: boolean): KeyAction | null {
  const tool = TOOLS.find((t) => t.key === key);
  if (tool && !mods.ctrl && !mods.alt) return { do: 'tool', kind: tool.kind };
  const dimension = DIMENSIONS.find((d) => d.key === key.toUpperCase());
  if (dimension && !mods.ctrl && !mods.alt) return { do: 'dimension', value: dimension.value };
  const step = mods.alt ? 0.1 : mods.shift ? 10 : 1;
  const arrows: Record<string, [number, number]> = { ArrowLeft: [-step, 0], ArrowRight: [step, 0], ArrowUp: [0, -step], ArrowDown: [0, step] };
  const d = arrows[key];
  if (d) return onSurface ? { do: 'nudge', dx: d[0], dy: d[1] } : null;
  switch (key) {
    case 'Escape':
      return { do: 'cancel' };
    case 'Enter':
    case ' ':
      return onSurface ? { do: 'place' } : null;
    case 'Tab':
      return hasSelection ? { do: 'cycle', dir: mods.shift ? -1 : 1 } : null;
    case 'h':
    case 'H':
      return { do: 'toggle-panel' };
    case 's':
    case 'S':
      return onSurface ? { do: 'snap' } : null;
    case 'Delete':
    case 'Backspace':
      return onSurface ? { do: 'remove' } : null;
  }
  return null;
}

/**
 * Listens for the keys until `signal` aborts: those typed in the overlay (the host hands over only
 * the user's own, host.ts), and, when the page takes key presses first (host.ts keysBlocked), the
 * panel's row of buttons standing in for them, which the panel then shows.
 */
export function initKeys(ctx: SessionContext, run: (a: KeyAction) => void, signal: AbortSignal): void {
  const surface = ctx.el.surface;
  ctx.host.keys = (e) => {
    // seen at the window, where a closed root hides the element inside (composedPath stops at the
    // host): the root itself says which of its elements has focus
    const onSurface = ctx.host.root.activeElement === surface;
    const a = keyAction(e.key, { ctrl: e.ctrlKey || e.metaKey, alt: e.altKey, shift: e.shiftKey }, onSurface, !!ctx.state.selected);
    if (!a) return;
    e.preventDefault();
    run(a);
  };
  if (!ctx.host.keysBlocked) return;
  const row = addKeyButtons(ctx.el.panel, ctx.el.readout);
  for (const [key, b] of row) {
    b.addEventListener(
      'click',
      trusted((e: MouseEvent) => {
        // a button stands in for a key pressed on the picture
        const a = key === 'Tab' ? ({ do: 'cycle', dir: e.shiftKey ? -1 : 1 } as const) : keyAction(key, { ctrl: false, alt: false, shift: e.shiftKey }, true, !!ctx.state.selected);
        if (a) run(a);
      }),
      { signal },
    );
  }
}

import { POINTS_PER_KIND } from '../../src/case';
import { message } from '../shared/native';
import { trusted } from './dom';
import type { MarkEditor } from './editing';
import type { SessionContext } from './state';

/**
 * The lens beside the pointer: 16 intrinsic pixels across its 128 px, 8x at the video's own
 * resolution. Hidden for encrypted video, whose pixels cannot be drawn.
 */
export class Magnifier {
  constructor(private readonly ctx: SessionContext) {}

  showing(): boolean {
    return this.ctx.el.magnifier.style.display === 'block';
  }

  hide(): void {
    this.ctx.el.magnifier.style.display = 'none';
  }

  show(e: PointerEvent): void {
    const { el, video: v, state } = this.ctx;
    const m = this.ctx.mapping.last();
    if (!m || v.mediaKeys || !state.cursor) {
      this.hide();
      return;
    }
    const size = 16;
    const c = el.magCanvas.getContext('2d');
    if (!c) return;
    c.imageSmoothingEnabled = false;
    c.clearRect(0, 0, 32, 32);
    c.drawImage(v, state.cursor.x - size / 2, state.cursor.y - size / 2, size, size, 0, 0, 32, 32);
    const r = this.ctx.host.el.getBoundingClientRect();
    el.magnifier.style.display = 'block';
    el.magnifier.style.left = `${e.clientX - r.left + 24}px`;
    el.magnifier.style.top = `${e.clientY - r.top + 24}px`;
  }
}

/**
 * Marking with the pointer on the surface: press for the first end, drag or click again for the
 * second. Only the user's own input counts (dom.ts trusted); every listener ends with `signal`.
 */
export function initPointer(ctx: SessionContext, editor: MarkEditor, lens: Magnifier, requestRedraw: () => void, signal: AbortSignal): void {
  const s = ctx.el.surface;
  const { state } = ctx;
  s.addEventListener(
    'pointerdown',
    trusted((e: PointerEvent) => {
      if (e.button !== 0 || !state.record) return;
      const p = ctx.mapping.toIntrinsic(e);
      if (!p) return;
      e.preventDefault();
      s.focus();
      s.setPointerCapture(e.pointerId);
      state.cursor = p;
      editor.startDraft(p, lens.showing());
      ctx.redraw();
    }),
    { signal },
  );
  s.addEventListener(
    'pointermove',
    trusted((e: PointerEvent) => {
      const p = ctx.mapping.toIntrinsic(e);
      if (!p) return;
      state.cursor = p;
      const d = state.draft;
      if (d && d.points.length >= 1 && POINTS_PER_KIND[d.kind] === 2) d.points[1] = p;
      lens.show(e);
      requestRedraw();
    }),
    { signal },
  );
  s.addEventListener(
    'pointerup',
    trusted((e: PointerEvent) => {
      const d = state.draft;
      if (!d || POINTS_PER_KIND[d.kind] !== 2) return;
      const p = ctx.mapping.toIntrinsic(e);
      if (p) d.points[1] = p;
      d.lens[1] = lens.showing();
      const [a, b] = d.points;
      if (!a || !b || Math.hypot(b.x - a.x, b.y - a.y) < 1) {
        // a click, not a drag: the next click or Enter places the second end
        d.points = [a ?? p!];
        d.lens.length = 1;
        ctx.say(message('ovlFirstEndPointer'));
        return;
      }
      void editor.commitDraft();
    }),
    { signal },
  );
  s.addEventListener('pointerleave', trusted(() => lens.hide()), { signal });
}

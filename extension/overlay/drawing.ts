import { marksAt } from '../../src/case';
import type { Mapping, Mark, MarkKind, Point } from '../../src/case';
import { svg } from './dom';
import type { SessionContext } from './state';

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

type Xy = { x: number; y: number };

/**
 * The line through a and b across a box `width` wide, as its ends at x = 0 and x = width: a horizon
 * is drawn across the whole picture, it is a line, not a span. A vertical pair gives a level line.
 */
export function lineAcross(a: Xy, b: Xy, width: number): { y0: number; y1: number } {
  const k = b.x !== a.x ? (b.y - a.y) / (b.x - a.x) : 0;
  return { y0: a.y - k * a.x, y1: a.y + k * (width - a.x) };
}

/**
 * Draws the marks over the video: those of the frame shown at full strength (the picture's edges
 * always, they hold for the whole clip), the others faint, the mark being placed and the cursor.
 * Returns the marks of the frame shown.
 */
export function drawMarks(ctx: SessionContext): Mark[] | null {
  const { state, el, video } = ctx;
  const m = ctx.mapping.current();
  el.layer.replaceChildren();
  if (!m || !state.record) return null;
  const r = ctx.host.el.getBoundingClientRect();
  const here = marksAt(state.record.marks, video.currentTime);
  for (const mark of state.record.marks) {
    const current = here.includes(mark) || mark.kind === 'frame-edges' || mark.kind === 'frame-top-bottom';
    drawMark(ctx, mark.kind, mark.points, m, r, current ? 1 : 0.25, mark.id);
  }
  if (state.draft) drawMark(ctx, state.draft.kind, state.draft.points, m, r, 1, 'draft');
  if (state.cursor && !state.draft) {
    const c = ctx.mapping.toLocal(state.cursor, m, r);
    el.layer.append(svg('circle', { cx: c.x, cy: c.y, r: 3, fill: 'none', stroke: '#fff', 'stroke-width': 1, 'data-testid': 'cursor' }));
  }
  return here;
}

function drawMark(ctx: SessionContext, kind: MarkKind, points: Point[], m: Mapping, r: DOMRect, opacity: number, id: string): void {
  const colour = COLOURS[kind];
  const g = svg('g', { opacity, 'data-mark': id, 'data-kind': kind });
  const local = points.map((p) => ctx.mapping.toLocal(p, m, r));
  if (kind === 'frame-edges') {
    for (const p of local) g.append(svg('line', { x1: p.x, y1: 0, x2: p.x, y2: r.height, stroke: colour, 'stroke-width': 2, 'stroke-dasharray': '6 4' }));
  } else if (kind === 'frame-top-bottom') {
    for (const p of local) g.append(svg('line', { x1: 0, y1: p.y, x2: r.width, y2: p.y, stroke: colour, 'stroke-width': 2, 'stroke-dasharray': '6 4' }));
  } else if (kind === 'horizon' && local.length === 2) {
    const { y0, y1 } = lineAcross(local[0]!, local[1]!, r.width);
    g.append(svg('line', { x1: 0, y1: y0, x2: r.width, y2: y1, stroke: colour, 'stroke-width': 2, 'stroke-dasharray': '10 4' }));
  } else if (local.length === 2) {
    const [a, b] = local as [Xy, Xy];
    g.append(svg('line', { x1: a.x, y1: a.y, x2: b.x, y2: b.y, stroke: '#000', 'stroke-width': 4, 'stroke-opacity': 0.5 }));
    g.append(svg('line', { x1: a.x, y1: a.y, x2: b.x, y2: b.y, stroke: colour, 'stroke-width': 2 }));
  }
  const sel = ctx.state.selected;
  local.forEach((p, end) => {
    const on = sel?.markId === id && sel.end === end;
    g.append(svg('circle', { cx: p.x, cy: p.y, r: on ? 5 : 3.5, fill: on ? '#fff' : colour, stroke: '#000', 'stroke-width': 1 }));
  });
  ctx.el.layer.append(g);
}

/** Rendering coalesced to one per display frame, however fast the pointer moves. */
export function frameCoalescer(draw: () => void, signal: AbortSignal): () => void {
  let requested = false;
  return () => {
    if (requested) return;
    requested = true;
    requestAnimationFrame(() => {
      requested = false;
      if (!signal.aborted) draw();
    });
  };
}

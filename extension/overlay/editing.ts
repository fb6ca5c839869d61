import { LANDMARK_SNAP_FLOOR_PX, landmarkDimensionOf, marksAt, POINTS_PER_KIND } from '../../src/case';
import type { Mark, MarkKind, Point } from '../../src/case';
import { message } from '../shared/native';
import { endSigma, oneSigma, sigmasOf } from './end-sigmas';
import type { FramePixels } from './pixels';
import type { CaseSaver } from './saving';
import { snapSpan } from './snapping';
import type { SessionContext } from './state';

export interface MarkEditor {
  /** Puts a mark's first end at `p` (a one-point mark is placed at once). */
  startDraft(p: Point, lens: boolean): void;
  /** Enter or Space: the first end at the cursor, or the second (which places the mark). */
  placeAtCursor(): void;
  /** Escape: drops the mark being placed, else the selection. Says whether there was either. */
  cancel(): boolean;
  /** The arrows: moves the selected end, else the cursor (and the second end being placed). */
  nudge(dx: number, dy: number): void;
  /** Tab: the next end of the marks on this frame (Shift: the one before). */
  cycleSelection(dir: number): void;
  /** Makes the mark being placed a mark: its ends snapped to the picture's edges when a span, and saved. */
  commitDraft(): Promise<void>;
  /** The snap key: the selected end only, by the same rules as on release. */
  snapSelected(): Promise<void>;
  removeSelected(): Promise<void>;
}

/**
 * Placing, snapping, nudging, selecting and removing marks: what the pointer and the keys ask for,
 * on the session's state, each change shown at once and saved (saving.ts). `describeVideo`
 * refreshes the panel's notes about the video (reading its pixels may have found it cross-origin).
 * A closure rather than a class: the injected overlay's minifier can shorten its inner names.
 */
export function markEditor(ctx: SessionContext, saver: CaseSaver, pixels: FramePixels, describeVideo: () => void): MarkEditor {
  const { state, video: v } = ctx;
  /** The sigma of an end placed by hand among these points, at the zoom of the moment. */
  const handEnd = (kind: MarkKind, points: readonly Point[], lens: boolean): number => endSigma(kind, ctx.mapping.handSigma(points, lens));
  const selectedMark = (): Mark | undefined => state.record?.marks.find((m) => m.id === state.selected?.markId);

  function startDraft(p: Point, lens: boolean): void {
    // marks are taken on a paused frame
    if (!v.paused) v.pause();
    state.draft = { kind: state.tool, t: v.currentTime, points: [p], lens: [lens] };
    if (POINTS_PER_KIND[state.tool] === 1) void commitDraft();
  }

  function placeAtCursor(): void {
    if (!state.record) return;
    state.cursor ??= { x: v.videoWidth / 2, y: v.videoHeight / 2 };
    const p = { ...state.cursor };
    if (!state.draft) {
      startDraft(p, false);
      if (state.draft) ctx.say(message('ovlFirstEndKeys'));
    } else {
      state.draft.points[1] = p;
      state.draft.lens[1] = false;
      void commitDraft();
    }
    ctx.redraw();
  }

  function cancel(): boolean {
    if (state.draft) {
      state.draft = null;
      ctx.say(message('ovlCancelled'));
    } else if (state.selected) state.selected = null;
    else return false;
    ctx.redraw();
    return true;
  }

  function nudge(dx: number, dy: number): void {
    const m = selectedMark();
    if (m && state.selected) {
      const end = state.selected.end;
      const points = m.points.map((p, i) => (i === end ? { x: p.x + dx, y: p.y + dy } : p));
      // an end moved by hand is worth what the hand is, whatever a snap had claimed for it
      const sigmas = sigmasOf(m, state.endSigmas.get(m.id));
      sigmas[end] = handEnd(m.kind, points, false);
      state.endSigmas.set(m.id, sigmas);
      state.snapNotes.delete(m.id);
      void saver.replaceMark({ ...m, points, edgeSigmaPx: oneSigma(sigmas) }, true);
      const p = points[end]!;
      ctx.say(message('ovlEndAt', [String(end + 1), p.x.toFixed(1), p.y.toFixed(1)]));
      return;
    }
    const c = state.cursor ?? { x: v.videoWidth / 2, y: v.videoHeight / 2 };
    state.cursor = { x: c.x + dx, y: c.y + dy };
    if (state.draft && POINTS_PER_KIND[state.draft.kind] === 2) {
      state.draft.points[1] = state.cursor;
      state.draft.lens[1] = false;
    }
    ctx.redraw();
  }

  function cycleSelection(dir: number): void {
    const here = state.record ? marksAt(state.record.marks, v.currentTime) : [];
    const ends = here.flatMap((m) => m.points.map((_, end) => ({ markId: m.id, end })));
    if (ends.length === 0) return;
    const i = ends.findIndex((x) => x.markId === state.selected?.markId && x.end === state.selected?.end);
    state.selected = ends[(i + dir + ends.length) % ends.length]!;
    ctx.say(message('ovlSelectedEnd', [String(state.selected.end + 1), String(selectedMark()?.kind.replace('-', ' '))]));
    ctx.redraw();
  }

  async function commitDraft(): Promise<void> {
    const d = state.draft;
    if (!d || !state.record) return;
    state.draft = null;
    let points = d.points.slice(0, POINTS_PER_KIND[d.kind]);
    let sigmas = points.map((_, i) => handEnd(d.kind, points, d.lens[i] ?? false));
    let note = '';
    if (points.length === 2 && (d.kind === 'object-span' || d.kind === 'landmark-span')) {
      // snapping is an aid: if reading pixels fails, the mark is kept as placed
      const img = await pixels.get().catch(() => null);
      describeVideo();
      if (img) ({ points, sigmas, note } = snapSpan(img, points as [Point, Point], sigmas as [number, number], 'both', d.kind === 'landmark-span' ? LANDMARK_SNAP_FLOOR_PX : undefined));
    }
    const mark: Mark = {
      id: `m${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}`,
      kind: d.kind,
      t: d.t,
      points,
      edgeSigmaPx: oneSigma(sigmas),
      ...(d.kind === 'object-span' ? { dimension: state.dimension } : {}),
      ...(d.kind === 'landmark-span' ? { landmarkDimension: landmarkDimensionOf(points) } : {}),
      mapping: ctx.mapping.record(),
      // who marked it, when the user gave a name in the settings (no account: just the name)
      ...(state.markerName ? { by: state.markerName } : {}),
      createdAt: Date.now(),
    };
    state.endSigmas.set(mark.id, sigmas);
    if (note) state.snapNotes.set(mark.id, note);
    state.selected = { markId: mark.id, end: points.length - 1 };
    await saver.replaceMark(mark, false);
  }

  async function snapSelected(): Promise<void> {
    const m = selectedMark();
    const sel = state.selected;
    if (!m || m.points.length !== 2 || !sel) return;
    const img = await pixels.get().catch(() => null);
    if (!img) {
      ctx.say(message('ovlSnapOff'));
      return;
    }
    const sigmas = sigmasOf(m, state.endSigmas.get(m.id));
    const points = m.points as [Point, Point];
    // the snap must do better than a hand placement at this zoom, whatever the end claims now
    const offered: [number, number] = [sigmas[0]!, sigmas[1]!];
    offered[sel.end] = handEnd(m.kind, points, false);
    const s = snapSpan(img, points, offered, sel.end as 0 | 1, m.kind === 'landmark-span' ? LANDMARK_SNAP_FLOOR_PX : undefined);
    const r = s.results[sel.end as 0 | 1];
    if (r.outcome === 'no-edge') {
      ctx.say(message('ovlNoEdge'));
      return;
    }
    if (r.outcome !== 'snapped') {
      state.snapNotes.set(m.id, s.note);
      ctx.redraw();
      ctx.say(s.note);
      return;
    }
    sigmas[sel.end] = r.sigmaPx;
    state.endSigmas.set(m.id, sigmas);
    state.snapNotes.delete(m.id);
    await saver.replaceMark({ ...m, points: s.points, edgeSigmaPx: oneSigma(sigmas) }, false);
    ctx.say(message('ovlSnapped', r.sigmaPx.toFixed(2)));
  }

  async function removeSelected(): Promise<void> {
    const m = selectedMark();
    if (!m) return;
    state.selected = null;
    state.snapNotes.delete(m.id);
    await saver.remove(m.id);
  }

  return { startDraft, placeAtCursor, cancel, nudge, cycleSelection, commitDraft, snapSelected, removeSelected };
}

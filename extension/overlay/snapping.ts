import { MAX_MOVE_PX, MAX_SPAN_CHANGE, snapSpanEnds } from '../../src/case';
import type { EndResult, Gray, Point } from '../../src/case';
import { message } from '../shared/native';

/** A span's ends after snapping: where they are, each end's sigma, what to tell the user. */
export interface SnappedSpan {
  points: [Point, Point];
  sigmas: [number, number];
  /** Why an end asked to snap stayed where the user put it; '' when nothing needs saying. */
  note: string;
  results: [EndResult, EndResult];
}

/**
 * Snaps the ends of a span that `which` names; each end arrives with the sigma it keeps if the snap
 * leaves it (the hand's floor for a new end).
 */
export function snapSpan(img: Gray, points: readonly [Point, Point], sigmas: readonly [number, number], which: 0 | 1 | 'both', floorPx?: number): SnappedSpan {
  const [a, b] = points;
  const results = snapSpanEnds(img, [{ ...a, sigmaPx: sigmas[0] }, { ...b, sigmaPx: sigmas[1] }], which, floorPx);
  const len = Math.hypot(b.x - a.x, b.y - a.y);
  const note = results
    .map((r, end) => keptNote(end, r, len))
    .filter((t) => t !== '')
    .join(' ');
  const [ra, rb] = results;
  return {
    points: [{ x: ra.x, y: ra.y }, { x: rb.x, y: rb.y }],
    sigmas: [ra.sigmaPx, rb.sigmaPx],
    note,
    results,
  };
}

/** What to tell the user about an end the snap left where they put it ('' when nothing). */
function keptNote(end: number, r: EndResult, spanPx: number): string {
  const n = String(end + 1);
  switch (r.outcome) {
    case 'too-far':
      return message('ovlSnapKeptFar', [n, Math.abs(r.movePx).toFixed(1), Math.min(MAX_MOVE_PX, MAX_SPAN_CHANGE * spanPx).toFixed(1)]);
    case 'span-change':
      return message('ovlSnapKeptSpan', [n, String(Math.round(MAX_SPAN_CHANGE * 100))]);
    case 'not-better':
      return message('ovlSnapKeptSure', n);
    default:
      return '';
  }
}

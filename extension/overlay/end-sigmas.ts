import { LANDMARK_SNAP_FLOOR_PX, markSigmaPx } from '../../src/case';
import type { Mark, MarkKind } from '../../src/case';

/*
 * Each end of a mark has its own sigma while it is edited here; the stored mark keeps one, the ends'
 * root mean square. Pure.
 */

/** A mark's one sigma from its ends' (markSigmaPx: root mean square; one end: its own). */
export function oneSigma(sigmas: readonly number[]): number {
  return sigmas.length === 2 ? markSigmaPx(sigmas[0]!, sigmas[1]!) : sigmas[0]!;
}

/**
 * Each end's sigma: as placed or edited here (`own`), else the mark's one sigma for both. Own sigmas
 * whose root mean square no longer matches the stored one (the mark was edited elsewhere) are stale.
 */
export function sigmasOf(m: Pick<Mark, 'points' | 'edgeSigmaPx'>, own: readonly number[] | undefined): number[] {
  return own && own.length === m.points.length && Math.abs(oneSigma(own) - m.edgeSigmaPx) < 1e-9 ? own.slice() : m.points.map(() => m.edgeSigmaPx);
}

/**
 * The sigma of an end placed by hand whose floor is `handPx`; a landmark's end is no surer placed
 * than snapped: its foot or top is itself a poor edge.
 */
export function endSigma(kind: MarkKind, handPx: number): number {
  return kind === 'landmark-span' ? Math.max(handPx, LANDMARK_SNAP_FLOOR_PX) : handPx;
}

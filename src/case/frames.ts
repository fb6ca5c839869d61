import type { Mark, Point } from './schema';

/** Camera frame in intrinsic pixels: the whole video unless picture edges were marked. */
export interface FrameRect {
  left: number;
  right: number;
  top: number;
  bottom: number;
}

export function cameraFrame(marks: readonly Mark[], videoWidth: number, videoHeight: number): FrameRect {
  // the latest mark of each wins: the presentation does not change within a clip
  const edges = latest(marks, 'frame-edges');
  const rows = latest(marks, 'frame-top-bottom');
  const frame = { left: 0, right: videoWidth, top: 0, bottom: videoHeight };
  if (edges) {
    const [a, b] = edges.points as [Point, Point];
    frame.left = Math.min(a.x, b.x);
    frame.right = Math.max(a.x, b.x);
  }
  if (rows) {
    const [a, b] = rows.points as [Point, Point];
    frame.top = Math.min(a.y, b.y);
    frame.bottom = Math.max(a.y, b.y);
  }
  return frame;
}

/** The last mark of a kind, without copying the list (the overlay asks on every pointer move). */
function latest(marks: readonly Mark[], kind: Mark['kind']): Mark | undefined {
  for (let i = marks.length - 1; i >= 0; i--) if (marks[i]!.kind === kind) return marks[i];
  return undefined;
}

/** Marks that belong to the frame at time t (the same paused frame: within half a frame at 24 fps). */
export function marksAt(marks: readonly Mark[], t: number): Mark[] {
  return marks.filter((m) => Math.abs(m.t - t) < 1 / 48);
}

/**
 * marksAt for many times over the same marks: sorted once, each look-up a binary search, so a case
 * of thousands of frames is not searched whole for each of them. The same marks in the same order.
 */
export function marksIndex(marks: readonly Mark[]): (t: number) => Mark[] {
  const order = marks.map((m, i) => i).sort((a, b) => marks[a]!.t - marks[b]!.t || a - b);
  const ts = Float64Array.from(order, (i) => marks[i]!.t);
  return (t) => {
    let lo = 0;
    let hi = ts.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (ts[mid]! < t - 1 / 24) lo = mid + 1;
      else hi = mid;
    }
    const found: number[] = [];
    for (let j = lo; j < ts.length && ts[j]! <= t + 1 / 24; j++) if (Math.abs(ts[j]! - t) < 1 / 48) found.push(order[j]!);
    return found.sort((a, b) => a - b).map((i) => marks[i]!);
  };
}

/** A span mark's ends relative to the camera frame, as the engine takes them. */
export function spanInFrame(m: Pick<Mark, 'edgeSigmaPx'> & { points: readonly Point[] }, frame: FrameRect) {
  const [u, v] = m.points as [Point, Point];
  return { x1: u.x - frame.left, y1: u.y - frame.top, x2: v.x - frame.left, y2: v.y - frame.top, edgeSigmaPx: m.edgeSigmaPx };
}

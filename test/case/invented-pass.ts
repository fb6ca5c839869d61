import { defaultAssumptions } from '../../src/case/assumptions';
import { newCase, upsertMark, withAssumptions } from '../../src/case/marks';
import type { CaseAssumptions, CaseRecord, Mark } from '../../src/case/schema';
import { dirOf, pinhole } from '../engine/pinhole';

/*
 * An invented pass filmed by a hand-held camera that keeps the object near the middle of the
 * picture, marked by its length at the true pixels, with the horizon marked on every frame: a case
 * built the long way (pinhole.ts projects points placed in space), for tests of what the case layer
 * does with a pass. Ground frame of DESIGN.md; the object flies level on a track parallel to the road.
 */
export interface InventedPass {
  u: number;
  w: number;
  /** perpendicular distance of the track from the road, m, and height above the camera */
  D: number;
  h: number;
  tAbeam: number;
  L: number;
  hfovDeg: number;
  times: number[];
}

const W = 1280;
const H = 720;
const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: W, height: H }, scale: 1, devicePixelRatio: 1 };

export function inventedPassCase(p: InventedPass, over: Partial<CaseAssumptions> = {}): CaseRecord {
  const f = W / 2 / Math.tan((p.hfovDeg * Math.PI) / 360);
  let c = newCase('invented-pass', { pageUrl: 'http://127.0.0.1/invented-pass', pageTitle: 'invented', src: '', width: W, height: H, duration: 30 }, '0.1.0', 1);
  p.times.forEach((t, i) => {
    const d = { x: (p.w - p.u) * (t - p.tAbeam), y: p.D, z: p.h };
    const yaw = Math.atan2(d.y, d.x);
    // aimed a little below the object, so the horizon is in the picture
    const cam = pinhole(yaw, Math.atan2(d.z, Math.hypot(d.x, d.y)) - 0.05, 0, f, W, H);
    const a = cam.project({ x: d.x + p.L / 2, y: d.y, z: d.z });
    const b = cam.project({ x: d.x - p.L / 2, y: d.y, z: d.z });
    const l = cam.project(dirOf(yaw + 0.1, 0));
    const r = cam.project(dirOf(yaw - 0.1, 0));
    const mark = (id: string, kind: Mark['kind'], pts: { x: number; y: number }[], extra: Partial<Mark> = {}): Mark => ({ id, kind, t, points: pts, edgeSigmaPx: 0.3, mapping, createdAt: 1, ...extra });
    c = upsertMark(c, mark(`o${i}`, 'object-span', [a, b], { dimension: 'length' }), 2);
    c = upsertMark(c, mark(`h${i}`, 'horizon', [l, r]), 2);
  });
  const exact = (v: number) => ({ lo: v, hi: v });
  return withAssumptions(
    c,
    { ...defaultAssumptions(), cameraLabel: 'given', hfovDeg: exact(p.hfovDeg), sizeLabel: 'given', objectSizeM: exact(p.L), sizeDimension: 'length', observerSpeedMs: exact(p.u), cameraHeightM: exact(1.5), ...over },
    3,
  );
}

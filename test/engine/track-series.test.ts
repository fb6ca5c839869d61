import { describe, it, expect } from 'vitest';
import { DEG } from '../../src/engine/constants';
import { solveTrack, type TrackScene } from '../../src/engine/track-series';
import { expectInputError } from './expect-error';

/*
 * Every scene here is invented. Marks are made by projecting the scene forward through a pinhole
 * camera (the object's ends at the bearings either side of its centre that its angular size
 * 2 atan(L / 2R) gives, on the horizon row), which is the inverse of what solveTrack does: the
 * checks are that the inverse recovers the scene's own ground speed and heading.
 */
const W = 1920;
const H = 1080;
const HFOV = 66 * DEG;
const K = (2 * Math.tan(HFOV / 2)) / W;
const SPAN_M = 30;

interface Scene {
  /** camera speed along +x (travel), m/s */
  u: number;
  /** optical axis from +x toward +y (right), rad */
  aim: number;
  /** object start position (m) and velocity (m/s) in the ground frame, camera at the origin at t = 0 */
  p0: { x: number; y: number };
  v: { x: number; y: number };
}

function marksFor(s: Scene, times: number[]): TrackScene['marks'] {
  return times.map((t) => {
    const ox = s.p0.x + s.v.x * t - s.u * t;
    const oy = s.p0.y + s.v.y * t;
    const R = Math.hypot(ox, oy);
    const bearing = Math.atan2(oy, ox) - s.aim;
    const half = Math.atan(SPAN_M / (2 * R));
    const x1 = W / 2 + Math.tan(bearing - half) / K;
    const x2 = W / 2 + Math.tan(bearing + half) / K;
    return { t, span: { x1, y1: H / 2, x2, y2: H / 2, edgeSigmaPx: 0.02 } };
  });
}

function scene(s: Scene, times: number[], over: Partial<TrackScene> = {}): TrackScene {
  return {
    frame: { widthPx: W, heightPx: H },
    hfov: { lo: HFOV, hi: HFOV },
    object: { size: { lo: SPAN_M, hi: SPAN_M }, aspect: { lo: 90 * DEG, hi: 90 * DEG } },
    marks: marksFor(s, times),
    axisHeading: { lo: s.aim, hi: s.aim },
    cameraSpeed: { lo: s.u, hi: s.u },
    ...over,
  };
}

const times = [0, 1, 2, 3, 4];

describe('solveTrack: recovers invented straight tracks', () => {
  it('a tripod looking right at an object crossing at 60 m/s, heading 150 degrees', () => {
    const s: Scene = { u: 0, aim: 90 * DEG, p0: { x: 300, y: 1500 }, v: { x: 60 * Math.cos(150 * DEG), y: 60 * Math.sin(150 * DEG) } };
    const r = solveTrack(scene(s, times), { draws: 400, seed: 3 });
    expect(r.speed.median).toBeCloseTo(60, 0);
    expect(Math.abs(r.heading.median / DEG - 150)).toBeLessThan(0.5);
    expect(r.speed.p05).toBeLessThanOrEqual(r.speed.median);
    expect(r.speed.p95).toBeGreaterThanOrEqual(r.speed.median);
  });

  it('a camera fixed to a car at 25 m/s looking right: the ground speed, not the relative one', () => {
    // the object flies the same way as the car at 70 m/s: relative to the car it does 45 m/s
    const s: Scene = { u: 25, aim: 90 * DEG, p0: { x: -200, y: 1200 }, v: { x: 70, y: 0 } };
    const r = solveTrack(scene(s, times), { draws: 400, seed: 4 });
    expect(Math.abs(r.speed.median - 70)).toBeLessThan(0.7);
    expect(Math.abs(r.heading.median / DEG)).toBeLessThan(0.5);
    expect(Math.abs(r.closestApproach.median - 1200)).toBeLessThan(15);
  });

  it('a heading near 180 degrees keeps one interval across the wrap (no split into +179 and -179)', () => {
    const s: Scene = { u: 0, aim: 60 * DEG, p0: { x: 1500, y: 900 }, v: { x: -50, y: 0 } };
    const r = solveTrack(scene(s, times, { axisHeading: { lo: 55 * DEG, hi: 65 * DEG } }), { draws: 600, seed: 5 });
    expect(Math.abs(Math.abs(r.heading.median / DEG) - 180)).toBeLessThan(3);
    expect(r.heading.p95 - r.heading.p05).toBeLessThan(20 * DEG);
  });

  it('the 5-95 % interval holds the true speed when the size is known only to +/-15 %', () => {
    const s: Scene = { u: 0, aim: 90 * DEG, p0: { x: 300, y: 1500 }, v: { x: -40, y: -20 } };
    const r = solveTrack(scene(s, times, { object: { size: { lo: 0.85 * SPAN_M, hi: 1.15 * SPAN_M }, aspect: { lo: 90 * DEG, hi: 90 * DEG } } }), { draws: 1000, seed: 6 });
    const truth = Math.hypot(40, 20);
    expect(r.speed.p05).toBeLessThan(truth);
    expect(r.speed.p95).toBeGreaterThan(truth);
    // a size band of +/-15 % scales every position: the interval is about that wide, not a point
    expect((r.speed.p95 - r.speed.p05) / truth).toBeGreaterThan(0.15);
  });

  it('is deterministic for a seed and changes with it', () => {
    const s: Scene = { u: 10, aim: 80 * DEG, p0: { x: 100, y: 1000 }, v: { x: -30, y: 5 } };
    const sc = scene(s, times, { hfov: { lo: 60 * DEG, hi: 70 * DEG } });
    const a = solveTrack(sc, { draws: 300, seed: 9 });
    expect(solveTrack(sc, { draws: 300, seed: 9 })).toEqual(a);
    expect(solveTrack(sc, { draws: 300, seed: 10 }).speed.median).not.toBe(a.speed.median);
  });
});

describe('solveTrack: invalid input', () => {
  const s: Scene = { u: 0, aim: 90 * DEG, p0: { x: 300, y: 1500 }, v: { x: -40, y: 0 } };
  it('names the field and the allowed range', () => {
    expectInputError(() => solveTrack({ ...scene(s, times), marks: marksFor(s, [0]) }), 'timestamps');
    expectInputError(() => solveTrack({ ...scene(s, times), marks: marksFor(s, [2, 1]) }), 'timestamp 2');
    expectInputError(() => solveTrack({ ...scene(s, times), axisHeading: { lo: 190 * DEG, hi: 200 * DEG } }), 'camera aim');
    expectInputError(() => solveTrack({ ...scene(s, times), cameraSpeed: { lo: -1, hi: 3 } }), 'camera speed');
    expectInputError(() => solveTrack({ ...scene(s, times), hfov: { lo: 0, hi: 1 } }), 'horizontal field of view');
  });
});

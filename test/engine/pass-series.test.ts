import { describe, expect, it } from 'vitest';
import { SHARED_EDGE_SHARE, type PassScene } from '../../src/engine/pass-inputs';
import { Axis, type AxisCode } from '../../src/engine/pass-model';
import { solvePass } from '../../src/engine/pass-series';
import { Rng } from '../../src/engine/rng';
import { expectInputError } from './expect-error';
import { dirOf, pinhole, type V3 } from './pinhole';

/*
 * The pass through its Monte Carlo, on invented passes filmed by a pinhole camera built the long way
 * (pinhole.ts): the object's ends and centre are placed in space, projected, and handed over as marks
 * would be. Figures are held against the scene's own geometry, and intervals against how often they
 * hold the truth when the marks are jittered as a user's would be (a part shared by the pass, as the
 * snapped ends of the rendered clips show, and a part of each end's own).
 */

const DEG = Math.PI / 180;
const W = 1280;
const H = 720;

interface Pass {
  u: number;
  w: number;
  beta: number;
  /** object abeam at t = tAbeam, D from the road, h above the camera */
  D: number;
  h: number;
  tAbeam: number;
  L: number;
  axis: AxisCode;
  hfov: number;
  times: number[];
  /** a fixed camera's yaw and pitch; absent: tracked (aimed at the object) */
  fixed?: { yaw: number; pitch: number };
  /** mark the horizon on every frame (tracked cameras) */
  horizon?: boolean;
}

function objectAt(p: Pass, t: number): V3 {
  return { x: p.u * p.tAbeam + p.w * Math.cos(p.beta) * (t - p.tAbeam), y: p.D + p.w * Math.sin(p.beta) * (t - p.tAbeam), z: p.h };
}

/** The span's axis in space; a square span is kept square to the sight line d, level (the old flat test target). */
function axisVector(p: Pass, d: V3): V3 {
  if (p.axis === Axis.SQUARE) {
    const n = Math.hypot(d.x, d.y);
    return { x: -d.y / n, y: d.x / n, z: 0 };
  }
  if (p.axis === Axis.LENGTH) return { x: Math.cos(p.beta), y: Math.sin(p.beta), z: 0 };
  if (p.axis === Axis.WINGSPAN) return { x: -Math.sin(p.beta), y: Math.cos(p.beta), z: 0 };
  return { x: 0, y: 0, z: 1 };
}

/** The scene as marks give it, each end moved by N(0, jitter) along and across its span. */
function sceneOf(p: Pass, sigma: number, jitter: number, rng: Rng | null): PassScene {
  const f = W / 2 / Math.tan(p.hfov / 2);
  const g = (sd = jitter) => (rng ? rng.gauss(0, sd) : 0);
  // each span's ends: outward by a part shared by the pass (SHARED_EDGE_SHARE of the spread), then their own
  const outward = g((SHARED_EDGE_SHARE * jitter) / Math.SQRT2);
  const own = Math.sqrt(1 - SHARED_EDGE_SHARE * SHARED_EDGE_SHARE) * jitter;
  const marks = p.times.map((t) => {
    const o = objectAt(p, t);
    const d = { x: o.x - p.u * t, y: o.y, z: o.z };
    const e = axisVector(p, d);
    const cam = p.fixed
      ? pinhole(p.fixed.yaw, p.fixed.pitch, 0, f, W, H)
      : pinhole(Math.atan2(d.y, d.x), Math.atan2(d.z, Math.hypot(d.x, d.y)), 0, f, W, H);
    const a = cam.project({ x: d.x + (p.L / 2) * e.x, y: d.y + (p.L / 2) * e.y, z: d.z + (p.L / 2) * e.z });
    const b = cam.project({ x: d.x - (p.L / 2) * e.x, y: d.y - (p.L / 2) * e.y, z: d.z - (p.L / 2) * e.z });
    const len = Math.hypot(b.x - a.x, b.y - a.y);
    const ux = (b.x - a.x) / len;
    const uy = (b.y - a.y) / len;
    const [s1, c1, s2, c2] = [g(own) - outward, g(own), g(own) + outward, g(own)];
    return { t, span: { x1: a.x + s1 * ux - c1 * uy, y1: a.y + s1 * uy + c1 * ux, x2: b.x + s2 * ux - c2 * uy, y2: b.y + s2 * uy + c2 * ux, edgeSigmaPx: sigma }, cam };
  });
  const horizons = p.horizon
    ? marks.map(({ t, cam }) => {
        const o = objectAt(p, t);
        const az = Math.atan2(o.y, o.x - p.u * t);
        const l = cam.project(dirOf(az + 0.1, 0));
        const r = cam.project(dirOf(az - 0.1, 0));
        return { t, x1: l.x, y1: l.y + g(), x2: r.x, y2: r.y + g(), sigmaPx: sigma };
      })
    : [];
  const exact = (v: number) => ({ lo: v, hi: v });
  return {
    frame: { widthPx: W, heightPx: H },
    hfov: exact(p.hfov),
    object: { size: exact(p.L), axis: p.axis },
    marks: marks.map(({ t, span }) => ({ t, span })),
    observerSpeed: exact(p.u),
    trackAngle: exact(p.fixed ? 0 : p.beta),
    cameraHeight: exact(1.5),
    horizons,
    landmarks: [],
    fixed: p.fixed ? { aim: exact(p.fixed.yaw), pitch: exact(p.fixed.pitch) } : null,
    elevation: { lo: 0, hi: 60 * DEG },
  };
}

function truthOf(p: Pass) {
  const vx = p.w * Math.cos(p.beta) - p.u;
  const vy = p.w * Math.sin(p.beta);
  const V = Math.hypot(vx, vy);
  // relative horizontal position at tAbeam is (0, D); closest approach of (0, D) + v tau
  const tau = -(p.D * vy) / (V * V);
  const hx = vx * tau;
  const hy = p.D + vy * tau;
  return { V, t0: p.tAbeam + tau, horizontal: Math.hypot(hx, hy), slant: Math.hypot(hx, hy, p.h) };
}

const OPPOSITE: Pass = {
  u: 27,
  w: -75,
  beta: 0,
  D: 600,
  h: 130,
  tAbeam: 7,
  L: 38,
  axis: Axis.LENGTH,
  hfov: 35 * DEG,
  times: [0.5, 2.4, 4.3, 6.2, 8.1, 10, 11.9, 13.8],
  horizon: true,
};

describe('solvePass on invented passes', () => {
  it('an exactly marked pass by length gives the closest approach, relative speed and every range', () => {
    const r = solvePass(sceneOf(OPPOSITE, 0.3, 0, null), [-1], { draws: 400, seed: 3 });
    const h = r.hypotheses[0]!;
    const truth = truthOf(OPPOSITE);
    expect(h.closestSlant.median / truth.slant).toBeCloseTo(1, 3);
    expect(h.closestHorizontal.median / truth.horizontal).toBeCloseTo(1, 3);
    expect(h.relativeSpeed.median / truth.V).toBeCloseTo(1, 3);
    expect(h.tClosest.median).toBeCloseTo(truth.t0, 2);
    h.marks.forEach((m, k) => {
      const o = objectAt(OPPOSITE, m.t);
      const R = Math.hypot(o.x - OPPOSITE.u * m.t, o.y, o.z);
      expect(m.range.median / R).toBeCloseTo(1, 3);
      expect(m.range.p05).toBeLessThanOrEqual(R);
      expect(m.range.p95).toBeGreaterThanOrEqual(R);
      expect(r.elevationSources[k]).toBe('horizon');
    });
    expect(h.readings.map((x) => x.direction)).toEqual(['opposite']);
    expect(h.readings[0]!.speed.median).toBeCloseTo(75, 0);
    // parallel tracks: the point stands D u / (u - w) from the road (DESIGN.md)
    expect(h.readings[0]!.fixedPoint!.fromRoad.median).toBeCloseTo((600 * 27) / 102, 0);
    expect(h.readings[0]!.regimeShares.between).toBe(1);
  });

  it('each axis follows its own law: wingspans and heights of a high pass, and a square span', () => {
    for (const axis of [Axis.WINGSPAN, Axis.HEIGHT, Axis.SQUARE]) {
      const p: Pass = { ...OPPOSITE, axis, h: 350, D: 300, L: axis === Axis.HEIGHT ? 12 : 34 };
      const r = solvePass(sceneOf(p, 0.2, 0, null), [-1], { draws: 300, seed: 5 });
      const truth = truthOf(p);
      const h = r.hypotheses[0]!;
      expect(h.relativeSpeed.median / truth.V, `axis ${axis}`).toBeCloseTo(1, 2);
      expect(h.closestSlant.median / truth.slant, `axis ${axis}`).toBeCloseTo(1, 2);
    }
  });

  it('spans alone cannot tell the other way from the same way, faster: both signs fit, each reads its direction', () => {
    const r = solvePass(sceneOf(OPPOSITE, 0.3, 0, null), [-1, 1], { draws: 300, seed: 1 });
    expect(r.hypotheses.map((h) => h.ruledOut)).toEqual([false, false]);
    expect(r.hypotheses[1]!.readings.map((x) => x.direction)).toEqual(['same-faster']);
    // w = u + V for the same way, faster: 27 + 102
    expect(r.hypotheses[1]!.readings[0]!.speed.median).toBeCloseTo(129, 0);
    expect(r.hypotheses[1]!.readings[0]!.regimeShares.behind).toBe(1);
  });

  it('a fixed camera’s bearings settle the track’s angle and rule out the wrong sign', () => {
    const p: Pass = { ...OPPOSITE, beta: 15 * DEG, w: -80, D: 900, h: 200, tAbeam: 5, times: [0.5, 1.5, 2.5, 3.5, 4.5], hfov: 70 * DEG, fixed: { yaw: 65 * DEG, pitch: 6 * DEG }, horizon: false };
    const r = solvePass(sceneOf(p, 0.3, 0, null), [-1, 1], { draws: 300, seed: 2 });
    const back = r.hypotheses.find((h) => h.sign === -1)!;
    const ahead = r.hypotheses.find((h) => h.sign === 1)!;
    expect(back.ruledOut).toBe(false);
    expect(ahead.ruledOut).toBe(true);
    const reading = back.readings[0]!;
    expect(reading.speed.median).toBeCloseTo(80, 0);
    // heading of a velocity -80 (cos 15, sin 15): 195 deg, i.e. -165 deg from the road ahead
    const heading = reading.heading.median;
    expect(Math.abs(Math.atan2(Math.sin(heading - (180 + 15) * DEG), Math.cos(heading - (180 + 15) * DEG)))).toBeLessThan(0.5 * DEG);
  });

  it('a distant pass seen near abeam is flagged ill-conditioned, says which marks would settle it, and its interval still holds the truth', () => {
    const p: Pass = { ...OPPOSITE, D: 3000, h: 300, tAbeam: 3, times: [2, 2.5, 3, 3.5, 4], L: 60, horizon: false };
    const r = solvePass(sceneOf(p, 0.5, 0, null), [-1], { draws: 600, seed: 4 });
    const c = r.conditioning;
    expect(c.ill).toBe(true);
    expect(c.settleBefore!).toBeLessThan(2);
    expect(c.settleAfter!).toBeGreaterThan(4);
    const V = r.hypotheses[0]!.relativeSpeed;
    expect(V.p05).toBeLessThanOrEqual(truthOf(p).V);
    expect(V.p95).toBeGreaterThanOrEqual(truthOf(p).V);
    expect(V.p95 / V.p05).toBeGreaterThan(2);
    // and a well-marked pass is not
    expect(solvePass(sceneOf(OPPOSITE, 0.3, 0, null), [-1], { draws: 300 }).conditioning.ill).toBe(false);
  });

  it('5-95 % intervals hold the truth in 85-95 % of 200 jittered markings (relative speed, closest approach, a range, the object speed)', () => {
    const rng = new Rng(11);
    const truth = truthOf(OPPOSITE);
    const hits = { V: 0, slant: 0, horizontal: 0, range: 0, speed: 0 };
    const N = 200;
    const mid = 3;
    const o = objectAt(OPPOSITE, OPPOSITE.times[mid]!);
    const R = Math.hypot(o.x - OPPOSITE.u * OPPOSITE.times[mid]!, o.y, o.z);
    const inside = (e: { p05: number; p95: number }, x: number) => (e.p05 <= x && x <= e.p95 ? 1 : 0);
    for (let i = 0; i < N; i++) {
      const h = solvePass(sceneOf(OPPOSITE, 0.5, 0.5, rng), [-1], { draws: 300, seed: i + 1 }).hypotheses[0]!;
      hits.V += inside(h.relativeSpeed, truth.V);
      hits.slant += inside(h.closestSlant, truth.slant);
      hits.horizontal += inside(h.closestHorizontal, truth.horizontal);
      hits.range += inside(h.marks[mid]!.range, R);
      hits.speed += inside(h.readings[0]!.speed, 75);
    }
    for (const [k, v] of Object.entries(hits)) {
      expect(v / N, k).toBeGreaterThanOrEqual(0.85);
      expect(v / N, k).toBeLessThanOrEqual(0.95);
    }
  });

  it('refuses what is not a pass, naming the field', () => {
    const s = sceneOf(OPPOSITE, 0.3, 0, null);
    expectInputError(() => solvePass({ ...s, marks: s.marks.slice(0, 2) }, [-1]), 'timestamps');
    expectInputError(() => solvePass({ ...s, marks: [s.marks[1]!, s.marks[0]!, s.marks[2]!] }, [-1]), 'timestamp 2');
    expectInputError(() => solvePass({ ...s, trackAngle: { lo: 85 * DEG, hi: 85 * DEG } }, [-1]), 'track angle to the road');
    expectInputError(() => solvePass({ ...s, observerSpeed: { lo: -1, hi: 3 } }, [-1]), 'observer speed');
  });
});

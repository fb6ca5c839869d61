import { describe, expect, it } from 'vitest';
import { solveSeries, type SeriesScene } from '../../src/engine/series';
import { Rng } from '../../src/engine/rng';
import { DEG } from '../../src/engine/constants';

const W = 1920;
const H = 1080;
const exact = (v: number) => ({ lo: v, hi: v });

describe('solveSeries (parametric bootstrap through the range-over-time fit)', () => {
  // Invented pass: object 2 km off the observer's road at closest approach, relative speed 90 m/s,
  // closest at t = 6 s; observer at 25 m/s. Pixels are computed from exact geometry, object on the
  // optical axis (a tracked camera keeps it centred).
  const hfov = 65 * DEG;
  const f = W / 2 / Math.tan(hfov / 2);
  const L = 30;
  const truth = { Dp: 2000, V: 90, t0: 6 };
  function marks(noise: Rng | null, sigma: number) {
    return [0, 2, 4, 6, 8, 10, 12].map((t) => {
      const R = Math.hypot(truth.Dp, truth.V * (t - truth.t0));
      const half = f * (L / 2 / R); // tan(theta/2) = L / 2R, centred span
      const e = () => (noise ? sigma * noise.normal() : 0);
      return { t, span: { x1: W / 2 - half + e(), y1: 540, x2: W / 2 + half + e(), y2: 540, edgeSigmaPx: sigma } };
    });
  }

  it('recovers the pass from exact marks with exact inputs', () => {
    const s: SeriesScene = { frame: { widthPx: W, heightPx: H }, hfov: exact(hfov), object: { size: exact(L), aspect: exact(90 * DEG) }, marks: marks(null, 0.0001), observerSpeed: exact(25) };
    const r = solveSeries(s, { draws: 200 });
    expect(r.closestApproach.median).toBeCloseTo(truth.Dp, 0);
    expect(r.relativeSpeed.median).toBeCloseTo(truth.V, 1);
    expect(r.tClosest.median).toBeCloseTo(truth.t0, 2);
    expect(r.objectSpeed!.opposite!.median).toBeCloseTo(truth.V - 25, 1);
    expect(r.objectSpeed!.sameFaster!.median).toBeCloseTo(truth.V + 25, 1);
    expect(r.objectSpeed!.sameSlower).toBeUndefined(); // V > u: a slower object in the same direction cannot give it
  });

  it('with size and field-of-view bands, the intervals contain the truth and scale together', () => {
    const s: SeriesScene = {
      frame: { widthPx: W, heightPx: H },
      hfov: { lo: 60 * DEG, hi: 70 * DEG },
      object: { size: { lo: 26, hi: 34 }, aspect: exact(90 * DEG) },
      marks: marks(new Rng(5), 0.5),
    };
    const r = solveSeries(s, { draws: 2000, seed: 3 });
    expect(r.closestApproach.p05).toBeLessThan(truth.Dp);
    expect(r.closestApproach.p95).toBeGreaterThan(truth.Dp);
    expect(r.relativeSpeed.p05).toBeLessThan(truth.V);
    expect(r.relativeSpeed.p95).toBeGreaterThan(truth.V);
    // Size and field of view scale every range by one factor, which moves D' and V but not t0: so
    // compared with exact size and field of view, the D' interval widens a lot and t0's barely.
    const sharp = solveSeries({ ...s, hfov: exact(65 * DEG), object: { size: exact(30), aspect: exact(90 * DEG) } }, { draws: 2000, seed: 3 });
    const width = (e: { p05: number; p95: number }) => e.p95 - e.p05;
    expect(width(r.closestApproach) / width(sharp.closestApproach)).toBeGreaterThan(3);
    expect(width(r.tClosest) / width(sharp.tClosest)).toBeLessThan(1.3);
  });

  it('needs three timestamps in order', () => {
    const base = { frame: { widthPx: W, heightPx: H }, hfov: exact(hfov), object: { size: exact(L), aspect: exact(90 * DEG) } };
    expect(() => solveSeries({ ...base, marks: marks(null, 0.3).slice(0, 2) })).toThrow(/at least 3/);
    const m = marks(null, 0.3);
    m[2]!.t = m[1]!.t;
    expect(() => solveSeries({ ...base, marks: m })).toThrow(/timestamp 3/);
  });
});

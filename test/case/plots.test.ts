import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { niceTicks, planView, rangePlot, thinEvenly } from '../../src/case/plots';
import { analyseCase, type CaseAnalysis } from '../../src/case/analysis';
import { inventedPassCase } from './invented-pass';

const est = (m: number, w = 0.1) => ({ p05: m * (1 - w), median: m, p95: m * (1 + w) });

describe('range-over-time plot model', () => {
  it('draws the fitted pass through R(t) = sqrt(D^2 + V^2 (t - t0)^2) and every timestamp with its interval (invented pass)', () => {
    // invented: closest approach 500 m at t0 = 7 s, relative speed 87 m/s
    const ranges = [0.5, 1, 1.5, 2].map((t) => ({ t, r: Math.hypot(500, 87 * (t - 7)) }));
    const a = {
      timestamps: ranges.map(({ t, r }) => ({ t, result: { range: est(r) } })),
      series: { closestApproach: est(500), relativeSpeed: est(87), tClosest: est(7, 0.01) },
    } as unknown as CaseAnalysis;
    const p = rangePlot(a)!;
    expect(p.points).toHaveLength(4);
    for (const { t, r } of ranges) {
      const nearest = p.curve.reduce((b, c) => (Math.abs(c.t - t) < Math.abs(b.t - t) ? c : b));
      expect(Math.abs(nearest.r - Math.hypot(500, 87 * (nearest.t - 7)))).toBeLessThan(1e-9);
      expect(Math.abs(nearest.r - r) / r).toBeLessThan(0.02);
    }
    expect(p.range.min).toBeLessThanOrEqual(Math.min(...p.points.map((x) => x.p05)));
    expect(p.range.max).toBeGreaterThanOrEqual(Math.max(...p.points.map((x) => x.p95)));
    expect(p.description).toContain('4 timestamps');
  });

  it('draws nothing without a fit', () => {
    expect(rangePlot({ timestamps: [], series: null } as unknown as CaseAnalysis)).toBeNull();
  });

  it('ticks are round (1, 2 or 5 times a power of ten), evenly spaced, and cover the range (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.double({ min: 1e-3, max: 1e6, noNaN: true }), (lo, span) => {
        const { min, max, ticks } = niceTicks(lo, lo + span);
        expect(min).toBeLessThanOrEqual(lo);
        expect(max).toBeGreaterThanOrEqual(lo + span - 1e-9 * Math.max(1, Math.abs(lo + span)));
        const step = ticks[1]! - ticks[0]!;
        const mant = step / 10 ** Math.floor(Math.log10(step));
        expect([1, 2, 5, 10].some((m) => Math.abs(mant - m) < 1e-6)).toBe(true);
        expect(ticks.length).toBeGreaterThanOrEqual(2);
        expect(ticks.length).toBeLessThanOrEqual(12);
      }),
    );
  });
});

describe('plan view model', () => {
  // an invented pass marked the long way (invented-pass.ts): observer 25 m/s, object 70 m/s the
  // other way, 1000 m from the road, 120 m above the camera, abeam at 8 s
  const pass = { u: 25, w: -70, D: 1000, h: 120, tAbeam: 8, L: 38, hfovDeg: 30, times: [1, 3.5, 6, 8.5, 11, 13.5] };
  const a = analyseCase(inventedPassCase(pass), { draws: 500, seriesDraws: 300 });

  it('opposite directions: every sight line passes through one ground point, D u / (u - w) from the road', () => {
    const p = planView(a, 'opposite')!;
    expect(p.direction).toBe('opposite');
    expect(p.objectSpeed).toBeCloseTo(-70, 0);
    // D u / (u - w) = 1000 x 25 / 95 = 263.2 m (DESIGN.md, parallel tracks)
    expect(p.fixedPoint!.fromRoad / ((1000 * 25) / 95)).toBeCloseTo(1, 2);
    for (const l of p.sightLines) {
      // the point on this sight line at the fixed point's distance from the road is the fixed point
      const k = p.fixedPoint!.y / l.object.y;
      const x = l.observer.x + k * (l.object.x - l.observer.x);
      expect(Math.abs(x - p.fixedPoint!.x)).toBeLessThan(1e-6 * Math.max(1, Math.abs(p.fixedPoint!.x)));
    }
    expect(p.trackDistance / 1000).toBeCloseTo(1, 2);
    expect(p.description).toContain('between the road and the track');
    expect(p.description).toContain('horizontal, square to the road');
  });

  it('a faster object in the same direction: the motionless point is behind the observer, and it says so (issue 12, point 4)', () => {
    const p = planView(a, 'same-faster')!;
    // w = u + V = 25 + 95
    expect(p.objectSpeed).toBeCloseTo(120, 0);
    expect(p.description).toContain('behind the observer, out of view');
    expect(p.description).not.toContain('no point on the ground stays still');
  });

  it('draws the 5-95 % band of the track’s distance from the road', () => {
    const p = planView(a, 'opposite')!;
    expect(p.mode).toBe('pass');
    expect(p.trackBand.lo).toBeLessThanOrEqual(1000);
    expect(p.trackBand.hi).toBeGreaterThanOrEqual(1000);
    expect(p.bounds.yMax).toBeGreaterThan(p.trackBand.hi);
  });

  it('one frame with a pinned landmark: one sight line drawn abeam, the landmark as the motionless point', () => {
    const single = {
      assumptions: { observerSpeed: { lo: 25, hi: 25 } },
      series: null,
      timestamps: [
        {
          t: 1.5,
          result: {
            range: { p05: 900, median: 1000, p95: 1100 },
            landmarkRange: { p05: 240, median: 263, p95: 290 },
            // w = u (1 - R/d) with u = 25, R = 1000, d = 263 (DESIGN.md): -70 m/s, against the observer
            impliedSpeed: { p05: -80, median: -70, p95: -60 },
          },
        },
      ],
    } as unknown as CaseAnalysis;
    const p = planView(single)!;
    expect(p.mode).toBe('single');
    expect(p.direction).toBe('opposite');
    expect(p.sightLines).toHaveLength(1);
    expect(p.sightLines[0]!.object).toEqual({ x: 0, y: 1000 });
    expect(p.fixedPoint).toEqual({ x: 0, y: 263, fromRoad: 263 });
    expect(p.trackBand).toEqual({ lo: 900, hi: 1100 });
    expect(p.description).toContain('drawn abeam');
  });

  it('needs the fit or a pinned landmark, and the observer speed', () => {
    expect(planView({ ...a, series: null, timestamps: [] } as unknown as CaseAnalysis)).toBeNull();
    expect(planView({ ...a, assumptions: { observerSpeed: null } } as unknown as CaseAnalysis)).toBeNull();
  });
});

describe('thinning what the plots draw (a case at the mark limit)', () => {
  it('keeps short lists whole, and long ones evenly spaced with both ends', () => {
    const xs = Array.from({ length: 4444 }, (_, i) => i);
    expect(thinEvenly(xs.slice(0, 10), 150)).toEqual(xs.slice(0, 10));
    const t = thinEvenly(xs, 150);
    expect(t).toHaveLength(150);
    expect(t[0]).toBe(0);
    expect(t[149]).toBe(4443);
    // even spacing (common practice for decimating a series for display): steps differ by at most one
    const steps = t.slice(1).map((x, i) => x - t[i]!);
    expect(Math.max(...steps) - Math.min(...steps)).toBeLessThanOrEqual(1);
  });
});

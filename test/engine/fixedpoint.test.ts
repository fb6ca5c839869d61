import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  FIXED_POINT_TOLERANCE,
  MAX_WANDER_SAMPLES,
  fixedPointFraction,
  fixedPointWander,
  parallelFixedPoint,
  parallelFixedPointFraction,
  regimeOfFraction,
  sightLineFixedPoint,
  type FixedPoint,
  type FiniteFixedPoint,
  type Vec2,
} from '../../src/engine/fixedpoint';
import { InputError } from '../../src/engine/errors';
import { KMH_MS, MAX_RANGE_M, MAX_SPEED_MS, MAX_TIME_S } from '../../src/engine/constants';

/** Narrow a FixedPoint to its finite variant, failing the test otherwise. */
function finitePoint(fp: FixedPoint): FiniteFixedPoint {
  if (fp.regime === 'none') throw new Error('expected a finite fixed point, got none');
  return fp;
}

/**
 * Independent brute force: the point where two sight lines cross, by solving the 2x2 system
 * a + p (b - a) = c + q (d - c) with Cramer's rule. Returns null for (numerically) parallel lines.
 */
function intersectLines(a: Vec2, b: Vec2, c: Vec2, d: Vec2): Vec2 | null {
  const e1x = b.x - a.x;
  const e1y = b.y - a.y;
  const e2x = d.x - c.x;
  const e2y = d.y - c.y;
  // columns of the matrix: (e1) and (-e2); right side c - a
  const det = e1x * -e2y - -e2x * e1y;
  if (det === 0) return null;
  const rx = c.x - a.x;
  const ry = c.y - a.y;
  const p = (rx * -e2y - -e2x * ry) / det;
  return { x: a.x + p * e1x, y: a.y + p * e1y };
}

const at = (p: Vec2, v: Vec2, t: number): Vec2 => ({ x: p.x + v.x * t, y: p.y + v.y * t });

// Realistic, well-conditioned cases for the brute force: positions to 0.1 m within 5 km,
// velocities to 0.1 m/s within 300 m/s (a jet's cruise, see constants.ts).
const coord = fc.integer({ min: -50000, max: 50000 }).map((k) => k / 10);
const vel = fc.integer({ min: -3000, max: 3000 }).map((k) => k / 10);
const point = fc.record({ x: coord, y: coord });
const velocity = fc.record({ x: vel, y: vel });

describe('fixedPointFraction: kernel', () => {
  it('invented worked example, done by hand: observer 100 km/h, object 3 km off the road at 250 km/h the other way', () => {
    // Invented scenario. Parallel tracks, object abeam at (0, 3000), n = (-3000, 0).
    // n.u = -3000 x 100 km/h; n.(w - u) = -3000 x (-250 - 100) km/h = +3000 x 350 km/h.
    // s = -(n.u) / (n.(w - u)) = 100 / 350 = 0.285714...; from the road 3000 x 100 / 350 = 857.142857 m.
    const u = 100 * KMH_MS;
    const w = -250 * KMH_MS;
    const s = fixedPointFraction(0, 0, u, 0, 0, 3000, w, 0);
    expect(s).toBeCloseTo(2 / 7, 12);
    expect(3000 * s).toBeCloseTo(857.142857, 5);
    const fp = finitePoint(parallelFixedPoint(3000, u, w));
    expect(fp.regime).toBe('between');
    expect(fp.distanceFromRoad).toBeCloseTo(857.142857, 5);
  });

  it('gives the textbook cases on a simple crossing geometry', () => {
    // object at rest: it is its own fixed point
    expect(fixedPointFraction(0, 0, 30, 0, 500, 800, 0, 0)).toBe(1);
    // observer at rest: the fixed point is the observer
    expect(fixedPointFraction(0, 0, 0, 0, 500, 800, 40, -7)).toBe(0);
    // observer moving straight at the object: its sight line does not turn about the observer
    expect(fixedPointFraction(0, 0, 5, 8, 500, 800, 40, -7)).toBe(0);
    // collision course (relative velocity along the sight line): constant bearing, no point
    expect(fixedPointFraction(0, 0, 30, 0, 500, 800, 30 - 5, -8)).toBe(Infinity);
    // both at rest: the whole line is still, no single point
    expect(fixedPointFraction(0, 0, 0, 0, 500, 800, 0, 0)).toBe(Infinity);
  });

  it('agrees with the parallel-track formula D u / (u - w) when the object is not abeam', () => {
    // n = (-D, px - ox) also has an along-road part, which must drop out for velocities along x
    const s = fixedPointFraction(100, 0, 25, 0, -1700, 2000, -60, 0);
    expect(s).toBeCloseTo(25 / (25 + 60), 12);
  });

  it('returns exactly 0 (never -0) when the observer is at rest', () => {
    expect(Object.is(fixedPointFraction(0, 0, 0, 0, 100, 100, 3, 1), 0)).toBe(true);
    expect(Object.is(parallelFixedPointFraction(0, 12), 0)).toBe(true);
  });

  it('snaps to 1 and to 0 within the documented tolerance, and not beyond it', () => {
    const eps = FIXED_POINT_TOLERANCE / 10;
    // parallel: s = u / (u - w), so w = u (1 - 1/s)
    expect(parallelFixedPointFraction(30, 30 * eps)).toBe(1); // s ~ 1 + 1e-10
    expect(parallelFixedPointFraction(30, 30 * FIXED_POINT_TOLERANCE * 100)).not.toBe(1);
    expect(parallelFixedPointFraction(30 * eps, -30)).toBe(0);
    expect(parallelFixedPointFraction(30 * FIXED_POINT_TOLERANCE * 100, -30)).toBeGreaterThan(0);
    // u = w to the relative tolerance counts as constant bearing
    expect(parallelFixedPointFraction(30, 30 * (1 + eps))).toBe(Infinity);
    expect(parallelFixedPointFraction(30, 30 * (1 + 100 * FIXED_POINT_TOLERANCE))).toBeLessThan(-1e6);
  });

  it('brute force: the crossing of sight lines at t - dt/2 and t + dt/2 converges on the fixed point as dt -> 0', () => {
    fc.assert(
      fc.property(point, velocity, point, velocity, (o, u, p, w) => {
        const r = Math.hypot(p.x - o.x, p.y - o.y);
        fc.pre(r >= 100);
        const s = fixedPointFraction(o.x, o.y, u.x, u.y, p.x, p.y, w.x, w.y);
        fc.pre(Number.isFinite(s) && Math.abs(s) <= 20);
        // the sight line must turn at least 10 mrad/s, or two nearby lines are too close to parallel
        const omega = Math.abs((o.y - p.y) * (w.x - u.x) + (p.x - o.x) * (w.y - u.y)) / (r * r);
        fc.pre(omega >= 1e-2);
        const f = { x: o.x + s * (p.x - o.x), y: o.y + s * (p.y - o.y) };
        const dts = [1e-1, 1e-2, 1e-3, 1e-4];
        // rounding floor of crossing two lines that differ by the small angle omega dt
        const floor = (dt: number): number => (1e-14 * (1 + Math.abs(s))) / (omega * dt);
        const errs = dts.map((dt) => {
          const h = dt / 2;
          const x = intersectLines(at(o, u, -h), at(p, w, -h), at(o, u, h), at(p, w, h));
          expect(x).not.toBeNull();
          return Math.hypot(x!.x - f.x, x!.y - f.y) / r;
        });
        // central difference: error falls like dt^2 until rounding takes over ...
        for (let k = 1; k < errs.length; k++) {
          expect(errs[k]!).toBeLessThanOrEqual(errs[k - 1]! / 50 + floor(dts[k]!));
        }
        // ... and stays under a second-order bound in the relative rate |w - u| / r (the constant 4
        // is about twice the worst seen over 1.7e5 random cases)
        const rate = Math.hypot(w.x - u.x, w.y - u.y) / r;
        for (let k = 0; k < errs.length; k++) {
          const dt = dts[k]!;
          expect(errs[k]!).toBeLessThanOrEqual(4 * (rate * dt) ** 2 * (1 + Math.abs(s)) ** 2 + floor(dt));
        }
      }),
      { numRuns: 400 },
    );
  });

  it('brute force, parallel tracks: sight lines at any two times cross exactly at the fixed point (Euclid, Elements VI.2)', () => {
    const heading = fc.double({ min: 0, max: 2 * Math.PI, noNaN: true });
    const speed = fc.integer({ min: -3000, max: 3000 }).map((k) => k / 10);
    const dt = fc.double({ min: 0.5, max: 120, noNaN: true });
    fc.assert(
      fc.property(point, point, heading, speed, speed, dt, fc.double({ min: -60, max: 60, noNaN: true }), (o, p, th, su, sw, step, t0) => {
        const e = { x: Math.cos(th), y: Math.sin(th) };
        const off = Math.abs(e.x * (p.y - o.y) - e.y * (p.x - o.x)); // track separation
        fc.pre(off >= 100 && Math.abs(su - sw) >= 1);
        const u = { x: su * e.x, y: su * e.y };
        const w = { x: sw * e.x, y: sw * e.y };
        const s = fixedPointFraction(o.x, o.y, u.x, u.y, p.x, p.y, w.x, w.y);
        expect(Number.isFinite(s)).toBe(true);
        const f = { x: o.x + s * (p.x - o.x), y: o.y + s * (p.y - o.y) };
        const x = intersectLines(at(o, u, t0), at(p, w, t0), at(o, u, t0 + step), at(p, w, t0 + step));
        expect(x).not.toBeNull();
        const scale = Math.hypot(p.x - o.x, p.y - o.y) * (1 + Math.abs(s)) + Math.abs(su - sw) * (Math.abs(t0) + step);
        expect(Math.hypot(x!.x - f.x, x!.y - f.y)).toBeLessThan(1e-9 * scale);
      }),
      { numRuns: 400 },
    );
  });

  it('property: invariant under rotation and translation of the ground frame', () => {
    fc.assert(
      fc.property(point, velocity, point, velocity, fc.double({ min: -Math.PI, max: Math.PI, noNaN: true }), point, (o, u, p, w, th, shift) => {
        fc.pre(Math.hypot(p.x - o.x, p.y - o.y) >= 1);
        const s = fixedPointFraction(o.x, o.y, u.x, u.y, p.x, p.y, w.x, w.y);
        fc.pre(Number.isFinite(s) && Math.abs(s) < 1e4);
        const c = Math.cos(th);
        const si = Math.sin(th);
        const rot = (v: Vec2): Vec2 => ({ x: c * v.x - si * v.y, y: si * v.x + c * v.y });
        const o2 = rot({ x: o.x + shift.x, y: o.y + shift.y });
        const p2 = rot({ x: p.x + shift.x, y: p.y + shift.y });
        const u2 = rot(u);
        const w2 = rot(w);
        const s2 = fixedPointFraction(o2.x, o2.y, u2.x, u2.y, p2.x, p2.y, w2.x, w2.y);
        expect(Math.abs(s2 - s)).toBeLessThan(1e-6 * (1 + Math.abs(s)) ** 2);
      }),
      { numRuns: 300 },
    );
  });

  it('property: swapping observer and object gives the same point (s becomes 1 - s)', () => {
    fc.assert(
      fc.property(point, velocity, point, velocity, (o, u, p, w) => {
        fc.pre(Math.hypot(p.x - o.x, p.y - o.y) >= 1);
        const s = fixedPointFraction(o.x, o.y, u.x, u.y, p.x, p.y, w.x, w.y);
        const t = fixedPointFraction(p.x, p.y, w.x, w.y, o.x, o.y, u.x, u.y);
        if (!Number.isFinite(s)) {
          expect(t).toBe(Infinity);
          return;
        }
        expect(Math.abs(t - (1 - s))).toBeLessThan(1e-9 * (1 + Math.abs(s)));
      }),
      { numRuns: 300 },
    );
  });

  it('property: scaling both velocities by the same factor leaves the point where it is', () => {
    fc.assert(
      fc.property(point, velocity, point, velocity, fc.double({ min: 0.01, max: 3, noNaN: true }), (o, u, p, w, k) => {
        fc.pre(Math.hypot(p.x - o.x, p.y - o.y) >= 1);
        const s = fixedPointFraction(o.x, o.y, u.x, u.y, p.x, p.y, w.x, w.y);
        const t = fixedPointFraction(o.x, o.y, k * u.x, k * u.y, p.x, p.y, k * w.x, k * w.y);
        if (!Number.isFinite(s) || !Number.isFinite(t)) {
          // only a hair from the constant-bearing threshold could the two disagree
          fc.pre(false);
        }
        expect(Math.abs(t - s)).toBeLessThan(1e-7 * (1 + Math.abs(s)) ** 2);
      }),
      { numRuns: 300 },
    );
  });

  it('property: no valid input, however extreme, returns NaN', () => {
    const pos = fc.double({ min: -MAX_RANGE_M, max: MAX_RANGE_M, noNaN: true });
    const v = fc.double({ min: -MAX_SPEED_MS, max: MAX_SPEED_MS, noNaN: true });
    fc.assert(
      fc.property(pos, pos, v, v, pos, pos, v, v, (ox, oy, ux, uy, px, py, wx, wy) => {
        fc.pre(ox !== px || oy !== py);
        const s = fixedPointFraction(ox, oy, ux, uy, px, py, wx, wy);
        expect(Number.isNaN(s)).toBe(false);
        expect(s === Infinity || Number.isFinite(s)).toBe(true);
        const fp = sightLineFixedPoint({ x: ox, y: oy }, { x: ux, y: uy }, { x: px, y: py }, { x: wx, y: wy });
        if (fp.regime !== 'none') {
          for (const n of [fp.fraction, fp.point.x, fp.point.y, fp.distanceFromObserver, fp.distanceFromRoad]) {
            expect(Number.isFinite(n)).toBe(true);
          }
        }
      }),
      { numRuns: 500 },
    );
  });

  const names = [
    'observer x',
    'observer y',
    'observer velocity x',
    'observer velocity y',
    'object x',
    'object y',
    'object velocity x',
    'object velocity y',
  ];
  const good = [0, 0, 30, 0, 100, 2000, -50, 0];

  it('property: every invalid argument throws InputError naming that argument', () => {
    const bad = fc.oneof(
      fc.constantFrom(NaN, Infinity, -Infinity),
      fc.double({ min: 1e6 + 1, max: 1e300, noNaN: true }),
      fc.double({ min: -1e300, max: -1e6 - 1, noNaN: true }),
    );
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 7 }), bad, (i, b) => {
        const args = good.slice();
        args[i] = b;
        let err: unknown;
        try {
          fixedPointFraction(...(args as [number, number, number, number, number, number, number, number]));
        } catch (e) {
          err = e;
        }
        expect(err).toBeInstanceOf(InputError);
        expect((err as InputError).message.startsWith(`${names[i]}:`)).toBe(true);
      }),
    );
  });

  it('rejects a speed above MAX_SPEED_MS and a position beyond MAX_RANGE_M', () => {
    expect(() => fixedPointFraction(0, 0, MAX_SPEED_MS * 1.01, 0, 0, 100, 0, 0)).toThrow(/observer velocity x: .*at most 1000 m\/s/);
    expect(() => fixedPointFraction(0, 0, 1, 0, 0, MAX_RANGE_M * 1.01, 0, 0)).toThrow(/object y: /);
  });

  it('throws InputError when the object sits on the observer', () => {
    expect(() => fixedPointFraction(5, 7, 1, 0, 5, 7, 0, 1)).toThrow(InputError);
    expect(() => fixedPointFraction(5, 7, 1, 0, 5, 7, 0, 1)).toThrow(/object position: got "\(5, 7\)"/);
  });
});

describe('regimeOfFraction', () => {
  it('classifies each kind of fraction', () => {
    expect(regimeOfFraction(0.3)).toBe('between');
    expect(regimeOfFraction(1.7)).toBe('beyond');
    expect(regimeOfFraction(-0.2)).toBe('behind');
    expect(regimeOfFraction(Infinity)).toBe('none');
    expect(regimeOfFraction(-Infinity)).toBe('none');
    expect(regimeOfFraction(1)).toBe('at-object');
    expect(regimeOfFraction(0)).toBe('at-observer');
  });
  it('throws InputError for NaN', () => {
    expect(() => regimeOfFraction(NaN)).toThrow(/fraction: got NaN/);
  });
});

describe('sightLineFixedPoint', () => {
  it('reports point, signed distance along the sight line and distance from the road', () => {
    // invented: observer on the road at 25 m/s, object 1200 m ahead and 900 m off, flying back at 50 m/s
    const fp = finitePoint(sightLineFixedPoint({ x: 0, y: 0 }, { x: 25, y: 0 }, { x: 1200, y: 900 }, { x: -50, y: 0 }));
    expect(fp.regime).toBe('between');
    expect(fp.fraction).toBeCloseTo(1 / 3, 12);
    expect(fp.point.x).toBeCloseTo(400, 9);
    expect(fp.point.y).toBeCloseTo(300, 9);
    expect(fp.distanceFromObserver).toBeCloseTo(500, 9); // 1/3 of the 1500 m sight line (3-4-5)
    expect(fp.distanceFromRoad).toBeCloseTo(300, 9);
  });

  it('measures distanceFromRoad from the observer\'s track line when it is not the x axis', () => {
    // the same scene as above, rotated by 30 degrees and shifted: distances must not change
    const th = Math.PI / 6;
    const c = Math.cos(th);
    const si = Math.sin(th);
    const rot = (x: number, y: number): Vec2 => ({ x: c * x - si * y + 40, y: si * x + c * y - 70 });
    const o = rot(0, 0);
    const p = rot(1200, 900);
    const u = { x: 25 * c, y: 25 * si };
    const w = { x: -50 * c, y: -50 * si };
    const fp = finitePoint(sightLineFixedPoint(o, u, p, w));
    expect(fp.distanceFromRoad).toBeCloseTo(300, 9);
    expect(fp.distanceFromObserver).toBeCloseTo(500, 9);
  });

  it('counts distanceFromRoad positive on the object\'s side even when that is to the right of travel', () => {
    const fp = finitePoint(sightLineFixedPoint({ x: 0, y: 0 }, { x: 25, y: 0 }, { x: 0, y: -1000 }, { x: -25, y: 0 }));
    expect(fp.distanceFromRoad).toBeCloseTo(500, 9);
    expect(fp.point.y).toBeCloseTo(-500, 9);
  });

  it('gives a negative distance along the sight line when the point is behind the observer', () => {
    const fp = finitePoint(sightLineFixedPoint({ x: 0, y: 0 }, { x: 20, y: 0 }, { x: 0, y: 1000 }, { x: 60, y: 0 }));
    expect(fp.regime).toBe('behind');
    expect(fp.distanceFromObserver).toBeCloseTo(-500, 9); // 1000 x 20 / (20 - 60)
  });

  it('carries no numbers when there is no point', () => {
    const fp = sightLineFixedPoint({ x: 0, y: 0 }, { x: 20, y: 0 }, { x: 0, y: 1000 }, { x: 20, y: 0 });
    expect(fp).toEqual({ regime: 'none' });
  });

  it('validates object-form inputs with the same field names', () => {
    expect(() => sightLineFixedPoint({ x: 0, y: NaN }, { x: 1, y: 0 }, { x: 1, y: 1 }, { x: 0, y: 0 })).toThrow(/^observer y:/);
    expect(() => sightLineFixedPoint({ x: 0, y: 0 }, { x: 1, y: 0 }, { x: 1, y: 1 }, { x: 0, y: 2e3 })).toThrow(/^object velocity y:/);
  });
});

describe('parallelFixedPoint', () => {
  it('puts the point between, beyond, behind or nowhere as the directions and speeds say', () => {
    expect(parallelFixedPoint(1000, 30, -20).regime).toBe('between');
    expect(parallelFixedPoint(1000, 30, 20).regime).toBe('beyond');
    expect(parallelFixedPoint(1000, 30, 40).regime).toBe('behind');
    expect(parallelFixedPoint(1000, 30, 30).regime).toBe('none');
    expect(parallelFixedPoint(1000, 30, 0).regime).toBe('at-object');
    expect(parallelFixedPoint(1000, 0, 30).regime).toBe('at-observer');
    expect(parallelFixedPoint(1000, 0, 0).regime).toBe('none');
  });

  it('gives D|u|/(|u|+|w|) for opposite directions and D u/(u - w) in general', () => {
    expect(finitePoint(parallelFixedPoint(1000, 30, -20)).distanceFromRoad).toBeCloseTo(600, 9);
    expect(finitePoint(parallelFixedPoint(1000, 30, 20)).distanceFromRoad).toBeCloseTo(3000, 9);
    expect(finitePoint(parallelFixedPoint(1000, 30, 40)).distanceFromRoad).toBeCloseTo(-3000, 9);
    const fp = finitePoint(parallelFixedPoint(1000, 30, 20));
    expect(fp.point).toEqual({ x: 0, y: fp.distanceFromRoad });
    expect(fp.distanceFromObserver).toBe(fp.distanceFromRoad);
  });

  // speeds of at least 0.01 m/s keep every ratio far from the 1e-9 snapping tolerance
  const nonzeroSpeed = fc.oneof(
    fc.double({ min: 0.01, max: MAX_SPEED_MS, noNaN: true }),
    fc.double({ min: -MAX_SPEED_MS, max: -0.01, noNaN: true }),
  );
  const D = fc.double({ min: 1, max: MAX_RANGE_M, noNaN: true });

  it('property: the point lies strictly between the tracks exactly when the directions are opposite', () => {
    fc.assert(
      fc.property(D, nonzeroSpeed, nonzeroSpeed, (d, u, w) => {
        const fp = parallelFixedPoint(d, u, w);
        const opposite = u > 0 !== w > 0;
        expect(fp.regime === 'between').toBe(opposite);
        if (fp.regime !== 'none') {
          const strictlyBetween = fp.distanceFromRoad > 0 && fp.distanceFromRoad < d;
          expect(strictlyBetween).toBe(opposite);
        }
      }),
      { numRuns: 500 },
    );
  });

  it('property: the same holds through the general kernel for parallel tracks at any heading', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 2 * Math.PI, noNaN: true }),
        fc.double({ min: 10, max: 1e5, noNaN: true }),
        fc.double({ min: -1e5, max: 1e5, noNaN: true }),
        nonzeroSpeed,
        nonzeroSpeed,
        (th, d, along, u, w) => {
          const e = { x: Math.cos(th), y: Math.sin(th) };
          const left = { x: -e.y, y: e.x };
          const o = { x: 0, y: 0 };
          const p = { x: along * e.x + d * left.x, y: along * e.y + d * left.y };
          const fp = sightLineFixedPoint(o, { x: u * e.x, y: u * e.y }, p, { x: w * e.x, y: w * e.y });
          fc.pre(fp.regime !== 'none');
          const opposite = u > 0 !== w > 0;
          expect(fp.regime === 'between').toBe(opposite);
          expect(fp.distanceFromRoad > 0 && fp.distanceFromRoad < d).toBe(opposite);
          // and it matches the parallel formula
          expect(fp.distanceFromRoad).toBeCloseTo((d * u) / (u - w), 6 - Math.ceil(Math.log10(1 + Math.abs((d * u) / (u - w)))));
        },
      ),
      { numRuns: 300 },
    );
  });

  it('invalid inputs throw InputError naming the field', () => {
    expect(() => parallelFixedPoint(0, 30, 20)).toThrow(/^distance between tracks:/);
    expect(() => parallelFixedPoint(-5, 30, 20)).toThrow(InputError);
    expect(() => parallelFixedPoint(2e6, 30, 20)).toThrow(/^distance between tracks: .*at most 1000000 m/);
    expect(() => parallelFixedPoint(100, NaN, 20)).toThrow(/^observer speed:/);
    expect(() => parallelFixedPoint(100, 30, -1001)).toThrow(/^object speed:/);
    expect(() => parallelFixedPointFraction(Infinity, 1)).toThrow(/^observer speed:/);
    expect(() => parallelFixedPointFraction(1, NaN)).toThrow(/^object speed:/);
  });
});

describe('fixedPointWander', () => {
  it('parallel tracks: the point stays put over the whole clip (Euclid, Elements VI.2)', () => {
    // invented: car at 28 m/s, object 2.5 km off, same heading, 65 m/s the other way, 40 s clip
    const th = 0.4;
    const e = { x: Math.cos(th), y: Math.sin(th) };
    const wander = fixedPointWander({
      observer: { x: 10, y: -20 },
      observerVelocity: { x: 28 * e.x, y: 28 * e.y },
      object: { x: 10 - 2500 * e.y + 800 * e.x, y: -20 + 2500 * e.x + 800 * e.y },
      objectVelocity: { x: -65 * e.x, y: -65 * e.y },
      t1: -20,
      t2: 20,
      samples: 41,
    });
    expect(wander.parallel).toBe(true);
    expect(wander.counted).toBe(41);
    expect(wander.points.every((p) => p.regime === 'between')).toBe(true);
    expect(wander.spread).toBeLessThan(1e-6);
    expect(wander.pathLength).toBeLessThan(1e-5);
  });

  it('non-parallel tracks: every sample is the kernel\'s point at that time, and the point wanders', () => {
    const track = {
      observer: { x: 0, y: 0 },
      observerVelocity: { x: 30, y: 0 },
      object: { x: -500, y: 1000 },
      objectVelocity: { x: -40, y: 10 },
      t1: 0,
      t2: 60,
      samples: 13,
    };
    const wander = fixedPointWander(track);
    expect(wander.parallel).toBe(false);
    expect(wander.points).toHaveLength(13);
    const xs: number[] = [];
    const ys: number[] = [];
    for (const [i, sample] of wander.points.entries()) {
      const t = (60 * i) / 12;
      expect(sample.t).toBeCloseTo(t, 12);
      const o = at(track.observer, track.observerVelocity, t);
      const p = at(track.object, track.objectVelocity, t);
      const fp = finitePoint(sightLineFixedPoint(o, track.observerVelocity, p, track.objectVelocity));
      expect(sample.regime).toBe(fp.regime);
      expect(sample.x).toBeCloseTo(fp.point.x, 6);
      expect(sample.y).toBeCloseTo(fp.point.y, 6);
      xs.push(fp.point.x);
      ys.push(fp.point.y);
    }
    let diameter = 0;
    let path = 0;
    for (let i = 0; i < xs.length; i++) {
      if (i > 0) path += Math.hypot(xs[i]! - xs[i - 1]!, ys[i]! - ys[i - 1]!);
      for (let j = 0; j < i; j++) diameter = Math.max(diameter, Math.hypot(xs[i]! - xs[j]!, ys[i]! - ys[j]!));
    }
    expect(wander.spread).toBeGreaterThan(100);
    expect(wander.spread).toBeCloseTo(diameter, 6);
    expect(wander.pathLength).toBeCloseTo(path, 6);
    expect(wander.pathLength).toBeGreaterThanOrEqual(wander.spread);
  });

  it('reports behind samples but leaves them out of the spread', () => {
    // invented: the object crosses the road ahead of the car; the point swings from behind, through
    // the observer, to between and beyond
    const wander = fixedPointWander({
      observer: { x: 0, y: 0 },
      observerVelocity: { x: 30, y: 0 },
      object: { x: 2000, y: 1000 },
      objectVelocity: { x: 0, y: -20 },
      t1: 0,
      t2: 100,
      samples: 21,
    });
    const behind = wander.points.filter((p) => p.regime === 'behind');
    const kept = wander.points.filter((p) => p.regime !== 'behind' && p.regime !== 'none');
    expect(behind.length).toBeGreaterThan(0);
    expect(kept.length).toBeGreaterThan(1);
    expect(wander.counted).toBe(kept.length);
    let diameter = 0;
    for (const a of kept) for (const b of kept) diameter = Math.max(diameter, Math.hypot(a.x! - b.x!, a.y! - b.y!));
    expect(wander.spread).toBeCloseTo(diameter, 6);
    for (const b of behind) expect(Number.isFinite(b.x)).toBe(true);
  });

  it('a collision course is constant bearing throughout: every sample is none, with no coordinates', () => {
    // "constant bearing, closing range" (common practice in collision avoidance)
    const wander = fixedPointWander({
      observer: { x: 0, y: 0 },
      observerVelocity: { x: 10, y: 0 },
      object: { x: 100, y: 100 },
      objectVelocity: { x: 0, y: -10 },
      t1: 0,
      t2: 20,
      samples: 21,
    });
    expect(wander.points.every((p) => p.regime === 'none' && p.x === null && p.y === null)).toBe(true);
    // the sample at t = 10 is the instant of coincidence: no sight line, also none
    expect(wander.points[10]!.t).toBe(10);
    expect(wander.counted).toBe(0);
    expect(wander.spread).toBe(0);
    expect(wander.pathLength).toBe(0);
  });

  it('defaults to 51 samples', () => {
    const wander = fixedPointWander({
      observer: { x: 0, y: 0 },
      observerVelocity: { x: 30, y: 0 },
      object: { x: 0, y: 1000 },
      objectVelocity: { x: -30, y: 5 },
      t1: 0,
      t2: 10,
    });
    expect(wander.points).toHaveLength(51);
  });

  it('invalid inputs throw InputError naming the field', () => {
    const base = {
      observer: { x: 0, y: 0 },
      observerVelocity: { x: 30, y: 0 },
      object: { x: 0, y: 1000 },
      objectVelocity: { x: -30, y: 5 },
      t1: 0,
      t2: 10,
    };
    expect(() => fixedPointWander({ ...base, t2: 0 })).toThrow(/^t2: got 0; allowed: more than t1/);
    expect(() => fixedPointWander({ ...base, t1: -MAX_TIME_S - 1 })).toThrow(/^t1:/);
    expect(() => fixedPointWander({ ...base, t2: NaN })).toThrow(/^t2:/);
    expect(() => fixedPointWander({ ...base, samples: 1 })).toThrow(/^samples:/);
    expect(() => fixedPointWander({ ...base, samples: 2.5 })).toThrow(/^samples:/);
    expect(() => fixedPointWander({ ...base, samples: MAX_WANDER_SAMPLES + 1 })).toThrow(/^samples:/);
    expect(() => fixedPointWander({ ...base, object: { x: Infinity, y: 0 } })).toThrow(/^object x:/);
    expect(() => fixedPointWander({ ...base, objectVelocity: { x: 0, y: -1e4 } })).toThrow(/^object velocity y:/);
    expect(() => fixedPointWander({ ...base, samples: 1 })).toThrow(InputError);
  });
});

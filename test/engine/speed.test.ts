import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  MAX_RELATIVE_SPEED_MS,
  closestDistanceFromWindow,
  impliedMotionFromLandmark,
  impliedSpeedFromFraction,
  impliedSpeedFromLandmark,
  observationWindow,
  relativeSpeedFromWindow,
} from '../../src/engine/speed';
import { parallelFixedPoint, sightLineFixedPoint } from '../../src/engine/fixedpoint';
import { InputError, UndeterminedError } from '../../src/engine/errors';
import { DEG, KMH_MS, MAX_RANGE_M, MAX_SPEED_MS, MAX_TIME_S } from '../../src/engine/constants';

/** Relative closeness that does not depend on the magnitude. */
function near(a: number, b: number, rel: number, abs = 0): boolean {
  return Math.abs(a - b) <= rel * Math.max(Math.abs(a), Math.abs(b)) + abs;
}

/** Run f and return what it threw (or undefined). */
function thrown(f: () => unknown): unknown {
  try {
    f();
  } catch (e) {
    return e;
  }
  return undefined;
}

describe('impliedSpeedFromLandmark', () => {
  it('invented worked example, by hand: pinned over a landmark at 2/7 of the object\'s range', () => {
    // Invented scenario, the converse of the fixed-point example: observer at 100 km/h (km/h = 1/3.6
    // m/s, SI Brochure), object at 3500 m, landmark on the same sight line at 1000 m.
    // R/d = 3.5, so w = 100 x (1 - 3.5) = -250 km/h: 250 km/h in the opposite direction.
    const w = impliedSpeedFromLandmark(100 * KMH_MS, 3500, 1000);
    expect(w / KMH_MS).toBeCloseTo(-250, 9);
    const motion = impliedMotionFromLandmark(100 * KMH_MS, 3500, 1000);
    expect(motion.direction).toBe('opposite');
    expect(motion.speed / KMH_MS).toBeCloseTo(250, 9);
    expect(motion.velocity).toBe(w);
  });

  it('a landmark beyond the object means the same direction, slower; at the object, at rest', () => {
    // R = 1000, d = 4000: w = u (1 - 1/4) = 0.75 u
    expect(impliedSpeedFromLandmark(30, 1000, 4000)).toBeCloseTo(22.5, 12);
    expect(impliedMotionFromLandmark(30, 1000, 4000)).toEqual({ speed: 22.5, direction: 'same', velocity: 22.5 });
    expect(impliedSpeedFromLandmark(30, 1234, 1234)).toBe(0);
    expect(impliedMotionFromLandmark(30, 1234, 1234 * (1 + 1e-12))).toEqual({ speed: 0, direction: 'stationary', velocity: 0 });
  });

  it('independent check: with that speed the object stays on the sight line through the landmark at later times', () => {
    // Intercept theorem (Euclid, Elements VI.2) checked by bearings: observer from (0, 0) at u along x,
    // object from (0, R) at w, landmark fixed at (0, d). Bearings of landmark and object must agree.
    fc.assert(
      fc.property(
        fc.double({ min: 1, max: 300, noNaN: true }),
        fc.double({ min: 100, max: 20000, noNaN: true }),
        fc.double({ min: 0.05, max: 5, noNaN: true }),
        fc.double({ min: 0.5, max: 60, noNaN: true }),
        (u, R, ratio, t) => {
          const d = R * ratio;
          const w = impliedSpeedFromLandmark(u, R, d);
          const toLandmark = Math.atan2(d, 0 - u * t);
          const toObject = Math.atan2(R, w * t - u * t);
          expect(Math.abs(toObject - toLandmark)).toBeLessThan(1e-9);
        },
      ),
      { numRuns: 300 },
    );
  });

  it('property: round trip with parallelFixedPoint (fixed point for u, w; landmark there; recover w)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.1, max: MAX_SPEED_MS, noNaN: true }),
        fc.double({ min: -MAX_SPEED_MS, max: MAX_SPEED_MS, noNaN: true }),
        fc.double({ min: 1, max: 1e5, noNaN: true }),
        (u, w, D) => {
          const fp = parallelFixedPoint(D, u, w);
          // only a point in front of the observer can hold a landmark
          fc.pre(fp.regime !== 'none' && fp.fraction > 0 && fp.distanceFromObserver <= MAX_RANGE_M);
          const back = impliedSpeedFromLandmark(u, D, fp.distanceFromObserver);
          expect(near(back, w, 1e-9, 1e-9 * (u + Math.abs(w)))).toBe(true);
        },
      ),
      { numRuns: 500 },
    );
  });

  it('property: round trip through the general kernel when the object is not abeam (R is the slant range)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.1, max: 300, noNaN: true }),
        fc.double({ min: -300, max: 300, noNaN: true }),
        fc.double({ min: 10, max: 1e4, noNaN: true }),
        fc.double({ min: -1e4, max: 1e4, noNaN: true }),
        (u, w, D, along) => {
          const fp = sightLineFixedPoint({ x: 0, y: 0 }, { x: u, y: 0 }, { x: along, y: D }, { x: w, y: 0 });
          fc.pre(fp.regime !== 'none' && fp.fraction > 0 && fp.distanceFromObserver <= MAX_RANGE_M);
          const back = impliedSpeedFromLandmark(u, Math.hypot(along, D), fp.distanceFromObserver);
          expect(near(back, w, 1e-8, 1e-8 * (u + Math.abs(w)))).toBe(true);
        },
      ),
      { numRuns: 300 },
    );
  });

  it('property: the direction follows R against d, and the speed is never negative', () => {
    fc.assert(
      fc.property(
        fc.double({ min: Number.MIN_VALUE, max: MAX_SPEED_MS, noNaN: true }),
        fc.double({ min: 1e-3, max: MAX_RANGE_M, noNaN: true }),
        fc.double({ min: 1e-3, max: MAX_RANGE_M, noNaN: true }),
        (u, R, d) => {
          const m = impliedMotionFromLandmark(u, R, d);
          expect(m.speed).toBeGreaterThanOrEqual(0);
          expect(Number.isNaN(m.speed) || Number.isNaN(m.velocity)).toBe(false);
          if (m.direction === 'stationary') expect(near(R, d, 2e-9)).toBe(true);
          else expect(m.direction).toBe(R > d ? 'opposite' : 'same');
        },
      ),
      { numRuns: 500 },
    );
  });

  it('an unrepresentable ratio is UndeterminedError, not Infinity', () => {
    expect(() => impliedSpeedFromLandmark(30, 1e6, Number.MIN_VALUE)).toThrow(UndeterminedError);
  });

  it('property: every invalid input throws InputError naming the field', () => {
    const fields = ['observer speed', 'object range', 'landmark range'];
    const good = [30, 2000, 800];
    const bad = fc.oneof(
      fc.constantFrom(NaN, Infinity, -Infinity, 0, -1),
      fc.double({ min: 1e6 + 1, max: 1e300, noNaN: true }),
      fc.double({ min: -1e300, max: 0, noNaN: true }),
    );
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 2 }), bad, (i, b) => {
        fc.pre(i !== 0 || !(b > 0 && b <= MAX_SPEED_MS));
        const args = good.slice() as [number, number, number];
        args[i] = b;
        for (const f of [impliedSpeedFromLandmark, impliedMotionFromLandmark]) {
          const e = thrown(() => f(...args));
          expect(e).toBeInstanceOf(InputError);
          expect((e as InputError).message.startsWith(`${fields[i]}:`)).toBe(true);
        }
      }),
    );
  });

  it('rejects an observer speed above MAX_SPEED_MS or at rest', () => {
    expect(() => impliedSpeedFromLandmark(1001, 100, 100)).toThrow(/^observer speed: got 1001; allowed: more than 0 and at most 1000 m\/s/);
    expect(() => impliedSpeedFromLandmark(0, 100, 100)).toThrow(/^observer speed:/);
  });
});

describe('impliedSpeedFromFraction', () => {
  it('worked values: s = 2/7 gives -2.5 u (the invented example), s = 1 rest, s = -1/2 three times u', () => {
    expect(impliedSpeedFromFraction(100, 2 / 7)).toBeCloseTo(-250, 10);
    expect(impliedSpeedFromFraction(100, 1)).toBe(0);
    expect(impliedSpeedFromFraction(100, -0.5)).toBeCloseTo(300, 10);
    expect(impliedSpeedFromFraction(100, 4)).toBeCloseTo(75, 10);
  });

  it('property: inverts the parallel fixed point for every regime with a finite point', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.1, max: MAX_SPEED_MS, noNaN: true }),
        fc.double({ min: -MAX_SPEED_MS, max: MAX_SPEED_MS, noNaN: true }),
        (u, w) => {
          const fp = parallelFixedPoint(1000, u, w);
          fc.pre(fp.regime !== 'none');
          const back = impliedSpeedFromFraction(u, fp.fraction);
          expect(near(back, w, 1e-9, 1e-9 * (u + Math.abs(w)))).toBe(true);
        },
      ),
      { numRuns: 500 },
    );
  });

  it('throws InputError for s = 0 and for a non-finite s; UndeterminedError when the speed overflows', () => {
    expect(() => impliedSpeedFromFraction(30, 0)).toThrow(/^fraction: got 0; allowed: a finite number other than 0/);
    expect(() => impliedSpeedFromFraction(30, -0)).toThrow(InputError);
    expect(() => impliedSpeedFromFraction(30, NaN)).toThrow(/^fraction:/);
    expect(() => impliedSpeedFromFraction(30, Infinity)).toThrow(/^fraction:/);
    expect(() => impliedSpeedFromFraction(NaN, 0.5)).toThrow(/^observer speed:/);
    expect(() => impliedSpeedFromFraction(-3, 0.5)).toThrow(/^observer speed:/);
    expect(() => impliedSpeedFromFraction(30, Number.MIN_VALUE)).toThrow(UndeterminedError);
  });

  it('property: no valid input returns NaN', () => {
    fc.assert(
      fc.property(
        fc.double({ min: Number.MIN_VALUE, max: MAX_SPEED_MS, noNaN: true }),
        fc.double({ noNaN: true, noDefaultInfinity: true }),
        (u, s) => {
          fc.pre(s !== 0);
          const e = thrown(() => {
            const w = impliedSpeedFromFraction(u, s);
            expect(Number.isFinite(w)).toBe(true);
          });
          if (e !== undefined) expect(e).toBeInstanceOf(UndeterminedError);
        },
      ),
      { numRuns: 500 },
    );
  });
});

describe('observationWindow', () => {
  it('invented worked example, by hand: 3 km abeam, 350 km/h relative, +/- 10 degrees', () => {
    // Invented scenario. tan(10 deg) = 0.176327; 2 x 3000 x 0.176327 = 1057.96 m of track inside the
    // wedge; 350 km/h = 97.2222 m/s (SI Brochure: km/h = 1/3.6 m/s); 1057.96 / 97.2222 = 10.882 s.
    const T = observationWindow(3000, 350 * KMH_MS, 10 * DEG);
    expect(T).toBeCloseTo(10.882, 3);
  });

  it('independent check: bisection on the bearing atan(V t / D) finds the same window', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 10, max: 1e5, noNaN: true }),
        fc.double({ min: 1, max: 600, noNaN: true }),
        fc.double({ min: 0.5, max: 80, noNaN: true }),
        (D, V, Adeg) => {
          const A = Adeg * DEG;
          // time at which the object, passing abeam at t = 0, is A off the beam; no tan used
          let lo = 0;
          let hi = 1;
          while (Math.atan((V * hi) / D) < A) hi *= 2;
          for (let k = 0; k < 200; k++) {
            const mid = (lo + hi) / 2;
            if (Math.atan((V * mid) / D) < A) lo = mid;
            else hi = mid;
          }
          expect(near(observationWindow(D, V, A), 2 * lo, 1e-12)).toBe(true);
        },
      ),
      { numRuns: 200 },
    );
  });

  it('tends to the small-angle form 2 D A / V for a narrow wedge (common practice)', () => {
    const T = observationWindow(2000, 50, 1e-4);
    expect(near(T, (2 * 2000 * 1e-4) / 50, 1e-8)).toBe(true);
  });

  it('property: observationWindow and its two inverses round-trip', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 1, max: MAX_RANGE_M, noNaN: true }),
        fc.double({ min: 0.01, max: MAX_RELATIVE_SPEED_MS, noNaN: true }),
        fc.double({ min: 1e-3, max: Math.PI / 2 - 1e-3, noNaN: true }),
        (D, V, A) => {
          const T = observationWindow(D, V, A);
          fc.pre(T > 0 && T <= MAX_TIME_S);
          expect(near(relativeSpeedFromWindow(D, T, A), V, 1e-12)).toBe(true);
          expect(near(closestDistanceFromWindow(V, T, A), D, 1e-12)).toBe(true);
        },
      ),
      { numRuns: 500 },
    );
  });

  it('property: no valid input returns NaN (overflow is UndeterminedError)', () => {
    const A = fc.double({ min: Number.MIN_VALUE, max: Math.PI / 2, noNaN: true, maxExcluded: true });
    const pos = (max: number) => fc.double({ min: Number.MIN_VALUE, max, noNaN: true });
    fc.assert(
      fc.property(pos(MAX_RANGE_M), pos(MAX_RELATIVE_SPEED_MS), pos(MAX_TIME_S), A, (D, V, T, a) => {
        for (const f of [() => observationWindow(D, V, a), () => relativeSpeedFromWindow(D, T, a), () => closestDistanceFromWindow(V, T, a)]) {
          const e = thrown(() => {
            const r = f();
            expect(Number.isFinite(r)).toBe(true);
          });
          if (e !== undefined) expect(e).toBeInstanceOf(UndeterminedError);
        }
      }),
      { numRuns: 500 },
    );
  });

  it('property: every invalid input throws InputError naming the field', () => {
    const bad = fc.constantFrom(NaN, Infinity, -Infinity, 0, -5, 1e300);
    const badAngle = fc.constantFrom(NaN, Infinity, 0, -0.1, Math.PI / 2, 2);
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 2 }), bad, badAngle, (i, b, a) => {
        const cases: [() => unknown, string][] = [
          [() => observationWindow(...([[b, 50, 0.2], [3000, b, 0.2], [3000, 50, a]][i] as [number, number, number])), ['closest distance', 'relative speed', 'half angle'][i]!],
          [() => relativeSpeedFromWindow(...([[b, 10, 0.2], [3000, b, 0.2], [3000, 10, a]][i] as [number, number, number])), ['closest distance', 'window', 'half angle'][i]!],
          [() => closestDistanceFromWindow(...([[b, 10, 0.2], [50, b, 0.2], [50, 10, a]][i] as [number, number, number])), ['relative speed', 'window', 'half angle'][i]!],
        ];
        for (const [f, field] of cases) {
          const e = thrown(f);
          expect(e).toBeInstanceOf(InputError);
          expect((e as InputError).message.startsWith(`${field}:`)).toBe(true);
        }
      }),
    );
  });

  it('an unrepresentably long window or large result is UndeterminedError, not Infinity', () => {
    expect(() => observationWindow(1e6, Number.MIN_VALUE, 1.5)).toThrow(UndeterminedError);
    expect(() => relativeSpeedFromWindow(1e6, Number.MIN_VALUE, 1.5)).toThrow(UndeterminedError);
    expect(() => closestDistanceFromWindow(2000, MAX_TIME_S, Number.MIN_VALUE)).toThrow(UndeterminedError);
  });

  it('names the allowed range in the message', () => {
    expect(() => observationWindow(3000, 50, Math.PI / 2)).toThrow(/^half angle: got 1\.57\d+; allowed: more than 0 and less than 1\.57\d+ rad/);
    expect(() => observationWindow(3000, 2001, 0.2)).toThrow(/^relative speed: .*at most 2000 m\/s/);
    expect(() => relativeSpeedFromWindow(3000, MAX_TIME_S + 1, 0.2)).toThrow(/^window: .*at most 86400 s/);
  });
});

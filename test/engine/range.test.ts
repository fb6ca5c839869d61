import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { angularSizeAt, footDistanceUnchecked, rangeFromAngularSize, rangeFromColumns } from '../../src/engine/range';
import { angleBetweenColumns, focalLengthPx } from '../../src/engine/camera';
import { DEG, MAX_RANGE_M, MAX_SIZE_M, MAX_FRAME_PX } from '../../src/engine/constants';
import { InputError } from '../../src/engine/errors';
import { expectInputError } from './expect-error';

const ARCSEC = DEG / 3600;


/*
 * The astronomical checks exceed the engine's bounds (MAX_SIZE_M, MAX_RANGE_M), which are sized for
 * things filmed from a road. Angular size depends only on size / range, so both are scaled down by the
 * same power of ten; the unscaled 2 atan(r / d) is computed beside it as an independent check.
 */
describe('angular size of the Moon and Sun (theta = 2 atan(r / d))', () => {
  it('Moon, r 1737.4 km at 384 467 km: 1864.2 arcsec (NASA Moon Fact Sheet)', () => {
    const theta = angularSizeAt(2 * 1737.4e-3, 384467e-3);
    expect(Math.abs(theta / ARCSEC - 1864.2)).toBeLessThan(0.05);
    expect(theta).toBeCloseTo(2 * Math.atan(1737.4 / 384467), 15);
  });

  it('Moon, r 1737.4 km at the 384 400 km semimajor axis: 0.51792 deg (NASA Moon Fact Sheet)', () => {
    const theta = angularSizeAt(2 * 1737.4e-3, 384400e-3);
    expect(theta / DEG).toBeCloseTo(0.51792, 5);
    expect(theta).toBeCloseTo(2 * Math.atan(1737.4 / 384400), 15);
  });

  it('Sun, nominal r 695 700 km at 1 au = 149 597 870 700 m: 0.53290 deg (IAU 2015 Res. B3; IAU 2012 Res. B2)', () => {
    const theta = angularSizeAt(2 * 695700e-5, 149597870700e-8);
    expect(theta / DEG).toBeCloseTo(0.5329, 5);
    expect(theta).toBeCloseTo(2 * Math.atan(695700e3 / 149597870700), 15);
  });

  it('the inverse gives the distances back (round trip)', () => {
    const moon = angularSizeAt(3.4748, 384.467);
    expect(rangeFromAngularSize(3.4748, moon)).toBeCloseTo(384.467, 9);
    const sun = angularSizeAt(13.914, 1495.978707);
    expect(rangeFromAngularSize(13.914, sun)).toBeCloseTo(1495.978707, 8);
    // and from the published angle itself: 1864.2 arcsec for 3474.8 km -> 384 467 km to 0.01 %
    expect(rangeFromAngularSize(3.4748, 1864.2 * ARCSEC) / 384.467).toBeCloseTo(1, 4);
  });
});

describe('rangeFromAngularSize', () => {
  it('R = L / (2 tan(theta/2)) broadside: 36 m spanning 0.5 deg is about 4125 m', () => {
    expect(rangeFromAngularSize(36, 0.5 * DEG)).toBeCloseTo(36 / (2 * Math.tan(0.25 * DEG)), 8);
    expect(rangeFromAngularSize(36, 0.5 * DEG)).toBeCloseTo(4125.3, 0);
  });

  it('scales with sin(aspect): at 30 deg off the nose the projected size, and so the range, halves', () => {
    expect(rangeFromAngularSize(36, 0.5 * DEG, 30 * DEG)).toBeCloseTo(rangeFromAngularSize(36, 0.5 * DEG) / 2, 8);
    expect(rangeFromAngularSize(36, 0.5 * DEG, 150 * DEG)).toBeCloseTo(rangeFromAngularSize(36, 0.5 * DEG, 30 * DEG), 8);
  });

  it('brute force: a foreshortened segment on the sight line matches the formula to (L/2R)^2 when R >> L', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 1, max: 100, noNaN: true }),
        fc.double({ min: 100, max: 10000, noNaN: true }),
        fc.double({ min: 5 * DEG, max: 175 * DEG, noNaN: true }),
        (L, ratio, a) => {
          const R = L * ratio;
          // endpoints at lateral +/- (L/2) sin a and depth R -/+ (L/2) cos a
          const x = (L / 2) * Math.sin(a);
          const dz = (L / 2) * Math.cos(a);
          const theta = Math.atan(x / (R - dz)) + Math.atan(x / (R + dz));
          const got = rangeFromAngularSize(L, theta, a);
          expect(Math.abs(got / R - 1)).toBeLessThan(2 * (L / (2 * R)) ** 2 + 1e-12);
        },
      ),
    );
  });

  it('property: angularSizeAt and rangeFromAngularSize are inverses', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.1, max: MAX_SIZE_M, noNaN: true }),
        // just under the bound: a range at exactly MAX_RANGE_M may round a hair above it on the way back
        fc.double({ min: 1, max: 0.999 * MAX_RANGE_M, noNaN: true }),
        fc.double({ min: 1 * DEG, max: 179 * DEG, noNaN: true }),
        (L, R, a) => {
          const theta = angularSizeAt(L, R, a);
          expect(rangeFromAngularSize(L, theta, a) / R).toBeCloseTo(1, 9);
        },
      ),
    );
  });

  it('a range beyond MAX_RANGE_M throws InputError naming "range"', () => {
    const e = expectInputError(() => rangeFromAngularSize(1000, 1e-6 * DEG), 'range');
    expect(e.field).toBe('range');
    expect(e.message).toContain(`at most ${MAX_RANGE_M} m`);
  });

  it('rejects bad sizes and angles, naming the field and showing degrees', () => {
    expectInputError(() => rangeFromAngularSize(0, 0.01), 'true size');
    expectInputError(() => rangeFromAngularSize(MAX_SIZE_M * 2, 0.01), 'true size');
    expectInputError(() => rangeFromAngularSize(30, 0), 'angular size');
    const e = expectInputError(() => rangeFromAngularSize(30, 0.01, Math.PI), 'aspect angle');
    expect(e.message).toContain('got 180;');
    expect(e.message).toContain('more than 0 and less than 180 deg');
    expectInputError(() => rangeFromAngularSize(30, 0.01, 0), 'aspect angle');
    expectInputError(() => angularSizeAt(30, 0), 'range');
    expectInputError(() => angularSizeAt(30, MAX_RANGE_M * 2), 'range');
    expectInputError(() => angularSizeAt(NaN, 100), 'true size');
  });

  it('property: any inputs either throw InputError or give a range in (0, MAX_RANGE_M], never NaN', () => {
    const any = (valid: fc.Arbitrary<number>) => fc.oneof(valid, fc.double(), fc.constantFrom(0, NaN, Infinity, Math.PI));
    fc.assert(
      fc.property(
        any(fc.double({ min: 0.01, max: MAX_SIZE_M, noNaN: true })),
        any(fc.double({ min: 1e-7, max: 3, noNaN: true })),
        any(fc.double({ min: 1e-3, max: 3.14, noNaN: true })),
        (L, theta, a) => {
          const open = (v: number) => Number.isFinite(v) && v > 0 && v < Math.PI;
          const inputsOk = Number.isFinite(L) && L > 0 && L <= MAX_SIZE_M && open(theta) && open(a);
          let r: number;
          try {
            r = rangeFromAngularSize(L, theta, a);
          } catch (e) {
            expect(e).toBeInstanceOf(InputError);
            if (inputsOk) expect((e as InputError).field).toBe('range');
            return;
          }
          expect(inputsOk).toBe(true);
          expect(r > 0 && r <= MAX_RANGE_M).toBe(true);
        },
      ),
    );
  });

  it('property: angularSizeAt never returns NaN and throws InputError on invalid input', () => {
    const any = (valid: fc.Arbitrary<number>) => fc.oneof(valid, fc.double());
    fc.assert(
      fc.property(
        any(fc.double({ min: 0.01, max: MAX_SIZE_M, noNaN: true })),
        any(fc.double({ min: 1, max: MAX_RANGE_M, noNaN: true })),
        any(fc.double({ min: 1e-3, max: 3.14, noNaN: true })),
        (L, R, a) => {
          const ok =
            L > 0 && L <= MAX_SIZE_M && R > 0 && R <= MAX_RANGE_M && Number.isFinite(a) && a > 0 && a < Math.PI;
          if (!ok) {
            expect(() => angularSizeAt(L, R, a)).toThrow(InputError);
            return;
          }
          // a range far below the size drives the angle to its 180 deg limit, which may round to it
          const t = angularSizeAt(L, R, a);
          expect(t >= 0 && t <= Math.PI).toBe(true);
        },
      ),
    );
  });
});

describe('rangeFromColumns', () => {
  it('brute force: a broadside object placed off axis and projected through the pinhole gives its range back', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 640, max: MAX_FRAME_PX, noNaN: true }),
        fc.double({ min: 20 * DEG, max: 120 * DEG, noNaN: true }),
        fc.double({ min: -0.8, max: 0.8, noNaN: true }),
        fc.double({ min: 5, max: 80, noNaN: true }),
        fc.double({ min: 200, max: 50000, noNaN: true }),
        (W, h, s, L, R) => {
          // Invented scenario: the object's centre at bearing b (within the frame), square to the sight line.
          const b = (s * h) / 2;
          const cx = R * Math.sin(b);
          const cz = R * Math.cos(b);
          const ex = (L / 2) * Math.cos(b);
          const ez = -(L / 2) * Math.sin(b);
          const f = focalLengthPx(W, h);
          const u1 = W / 2 + (f * (cx - ex)) / (cz - ez);
          const u2 = W / 2 + (f * (cx + ex)) / (cz + ez);
          fc.pre(u1 >= 0 && u2 <= W && u2 - u1 >= 0.01);
          expect(rangeFromColumns(u1, u2, W, h, L) / R).toBeCloseTo(1, 7);
        },
      ),
    );
  });

  it('property: the range falls strictly as the span grows', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 100, max: MAX_FRAME_PX, noNaN: true }),
        fc.double({ min: 1 * DEG, max: 150 * DEG, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0.5, max: 100, noNaN: true }),
        (W, h, start, a, b, L) => {
          // a start column, then two spans at least 1 px apart that both fit in the frame
          const u1 = start * (W - 3);
          const room = W - u1;
          const s1 = 1 + a * (room - 2);
          const s2 = Math.min(room, s1 + 1 + b * (room - s1 - 1));
          let r1: number;
          try {
            r1 = rangeFromColumns(u1, u1 + s1, W, h, L);
          } catch (e) {
            // only a far-off range may be refused, and then it must be the bound that refuses it
            expect((e as InputError).field).toBe('range');
            return;
          }
          expect(rangeFromColumns(u1, u1 + s2, W, h, L)).toBeLessThan(r1);
        },
      ),
    );
  });

  it('agrees with rangeFromAngularSize of angleBetweenColumns, with an aspect angle too', () => {
    const theta = angleBetweenColumns(1000, 1100, 1920, 67.3 * DEG);
    expect(rangeFromColumns(1000, 1100, 1920, 67.3 * DEG, 36, 60 * DEG)).toBe(rangeFromAngularSize(36, theta, 60 * DEG));
  });

  it('invented scenario: a 36 m span over 100 px at the centre of a 1920 px, 67.3 deg frame is about 519 m', () => {
    const f = focalLengthPx(1920, 67.3 * DEG);
    const r = rangeFromColumns(910, 1010, 1920, 67.3 * DEG, 36);
    // independent: half-span 50 px either side of the centre, R = (L/2) / tan(atan(50 / f))
    expect(r).toBeCloseTo(18 / (50 / f), 6);
    expect(r).toBeGreaterThan(515);
    expect(r).toBeLessThan(525);
  });

  it('rejects bad inputs, naming the field', () => {
    expectInputError(() => rangeFromColumns(10, 10, 1920, 1, 36), 'span between the marked columns');
    expectInputError(() => rangeFromColumns(10, 20, 1920, 0, 36), 'horizontal field of view');
    expectInputError(() => rangeFromColumns(10, 20, 1920, 1, -36), 'true size');
    expectInputError(() => rangeFromColumns(10, 20, 1920, 1, 36, 4), 'aspect angle');
  });
});

describe('footDistanceUnchecked: an upright landmark on level ground', () => {
  it('inverts the exact angle between its foot and top, atan((L - h)/d) + atan(h/d), for masts taller and shorter than the camera is high', () => {
    // invented masts; the angle is built from the two rays to foot and top, not from the formula
    for (const [L, h, d] of [
      [20, 1.5, 170],
      [90, 1.5, 750],
      [1, 1.5, 40],
      [16, 3, 60],
    ] as const) {
      const theta = Math.atan((L - h) / d) + Math.atan(h / d);
      expect(footDistanceUnchecked(L, Math.tan(theta), h)).toBeCloseTo(d, 6);
    }
  });
  it('differs from L / (2 tan(theta / 2)) when the camera is off the mast’s mid height', () => {
    const theta = Math.atan(18.5 / 170) + Math.atan(1.5 / 170);
    const naive = 20 / (2 * Math.tan(theta / 2));
    expect(Math.abs(Math.sqrt(naive * naive - 8.5 * 8.5) / 170 - 1)).toBeGreaterThan(0.001);
  });
});

import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { BEAUFORT_SCALE, beaufortForce, beaufortForceExtended } from '../../src/engine/beaufort';
import { KNOT_MS, MAX_SPEED_MS } from '../../src/engine/constants';
import { InputError } from '../../src/engine/errors';
import { expectInputError } from './expect-error';

const kn = (k: number) => k * KNOT_MS;


// Met Office Beaufort scale in knots, as printed in REFERENCES.md: 0 < 1; 1: 1-3; 2: 4-6; ... 12: >= 64
const MET_OFFICE: [number, number, string][] = [
  [0, 0, 'below 1'],
  [1, 1, '1-3'],
  [2, 4, '4-6'],
  [3, 7, '7-10'],
  [4, 11, '11-16'],
  [5, 17, '17-21'],
  [6, 22, '22-27'],
  [7, 28, '28-33'],
  [8, 34, '34-40'],
  [9, 41, '41-47'],
  [10, 48, '48-55'],
  [11, 56, '56-63'],
  [12, 64, '64 or more'],
];

describe('Beaufort table (Met Office scale, knots)', () => {
  it('has forces 0-12 with the Met Office lower bounds and printed bands', () => {
    expect(BEAUFORT_SCALE.map((r) => [r.force, r.loKt, r.published])).toEqual(MET_OFFICE);
  });

  it('each force runs up to, not including, the next force\u2019s lower bound; force 12 is open (our convention)', () => {
    for (let i = 0; i < BEAUFORT_SCALE.length - 1; i++) {
      expect(BEAUFORT_SCALE[i]!.hiKt).toBe(BEAUFORT_SCALE[i + 1]!.loKt);
    }
    expect(BEAUFORT_SCALE[12]!.hiKt).toBeNull();
  });

  it('descriptions in the customary wording (common practice)', () => {
    expect(BEAUFORT_SCALE.map((r) => r.description)).toEqual([
      'calm',
      'light air',
      'light breeze',
      'gentle breeze',
      'moderate breeze',
      'fresh breeze',
      'strong breeze',
      'near gale',
      'gale',
      'severe gale',
      'storm',
      'violent storm',
      'hurricane force',
    ]);
  });
});

describe('beaufortForce at every boundary (Met Office scale, in m/s via KNOT_MS)', () => {
  it('0.99 kt -> 0, 1 kt -> 1, 3.99 kt -> 1, 4 kt -> 2 (Met Office)', () => {
    expect(beaufortForce(kn(0.99)).force).toBe(0);
    expect(beaufortForce(kn(1)).force).toBe(1);
    expect(beaufortForce(kn(3.99)).force).toBe(1);
    expect(beaufortForce(kn(4)).force).toBe(2);
  });

  for (const [force, lo] of MET_OFFICE.slice(1)) {
    it(`${lo - 0.01} kt -> ${force - 1}, ${lo} kt -> ${force} (Met Office)`, () => {
      expect(beaufortForce(kn(lo - 0.01)).force).toBe(force - 1);
      expect(beaufortForce(kn(lo)).force).toBe(force);
    });
  }

  it('63.99 kt -> 11 and 64 kt -> 12, hurricane force (Met Office)', () => {
    expect(beaufortForce(kn(63.99)).force).toBe(11);
    const r = beaufortForce(kn(64));
    expect(r).toEqual({ force: 12, description: 'hurricane force', loKt: 64, hiKt: null });
  });

  it('a speed between two printed bands belongs to the lower force: 3.6 kt is force 1, 10.5 kt force 3 (our convention)', () => {
    expect(beaufortForce(kn(3.6))).toEqual({ force: 1, description: 'light air', loKt: 1, hiKt: 4 });
    expect(beaufortForce(kn(10.5)).force).toBe(3);
  });

  it('0 is calm and the largest accepted speed is force 12', () => {
    expect(beaufortForce(0).force).toBe(0);
    expect(beaufortForce(MAX_SPEED_MS).force).toBe(12);
  });

  it('property: the force never falls as the wind rises, and its band contains the speed', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 100, noNaN: true }), fc.double({ min: 0, max: 100, noNaN: true }), (a, b) => {
        const [lo, hi] = a <= b ? [a, b] : [b, a];
        expect(beaufortForce(lo).force).toBeLessThanOrEqual(beaufortForce(hi).force);
        const r = beaufortForce(lo);
        expect(lo).toBeGreaterThanOrEqual(r.loKt * KNOT_MS);
        if (r.hiKt !== null) expect(lo).toBeLessThan(r.hiKt * KNOT_MS);
      }),
    );
  });

  it('rejects negative, non-finite and absurd speeds with InputError naming the field', () => {
    expectInputError(() => beaufortForce(-0.1), 'wind speed');
    expectInputError(() => beaufortForce(Number.NaN), 'wind speed');
    expectInputError(() => beaufortForce(Number.POSITIVE_INFINITY), 'wind speed');
    expectInputError(() => beaufortForce(MAX_SPEED_MS + 1), 'wind speed');
  });

  it('property: every invalid speed throws InputError', () => {
    fc.assert(
      fc.property(fc.oneof(fc.double({ max: -1e-9 }), fc.double({ min: MAX_SPEED_MS + 1e-6 })), (v) => {
        expect(() => beaufortForce(v)).toThrow(InputError);
      }),
    );
  });
});

describe('beaufortForceExtended', () => {
  it('force 17 at 56.1-61.2 m/s (extended national scales, REFERENCES.md)', () => {
    expect(beaufortForceExtended(56.1).force).toBe(17);
    expect(beaufortForceExtended(61.1).force).toBe(17);
    expect(beaufortForceExtended(56.09).force).toBe(16);
  });

  it('forces 13-16 start at 37.0, 41.5, 46.2 and 51.0 m/s (from memory)', () => {
    expect(beaufortForceExtended(36.99).force).toBe(12);
    expect(beaufortForceExtended(37.0).force).toBe(13);
    expect(beaufortForceExtended(41.5).force).toBe(14);
    expect(beaufortForceExtended(46.2).force).toBe(15);
    expect(beaufortForceExtended(51.0).force).toBe(16);
  });

  it('below force 13 it agrees with the Met Office knot scale', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 36.99, noNaN: true }), (v) => {
        const e = beaufortForceExtended(v);
        expect(e.force).toBe(beaufortForce(v).force);
        expect(v).toBeGreaterThanOrEqual(e.loMs);
        expect(e.hiMs).not.toBeNull();
        expect(v).toBeLessThan(e.hiMs!);
      }),
    );
  });

  it('rejects invalid speeds with InputError', () => {
    expectInputError(() => beaufortForceExtended(-1), 'wind speed');
    expectInputError(() => beaufortForceExtended(Number.NaN), 'wind speed');
  });
});

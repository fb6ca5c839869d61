import { describe, expect, it } from 'vitest';
import { parseBand } from '../../src/case/bands';
import { InputError } from '../../src/engine/errors';
import { DEG, KNOT_MS, FOOT_M } from '../../src/engine/constants';

// Unit values: NIST SP 811 (2008) App. B.8 (knot 1852/3600 m/s, foot 0.3048 m), SI Brochure (km/h).
describe('parseBand: ranges typed by a user, with units', () => {
  it.each([
    ['39 to 41 deg', 'angle', 'deg', 39 * DEG, 41 * DEG],
    ['39–41', 'angle', 'deg', 39 * DEG, 41 * DEG],
    ['24-36 m', 'length', 'm', 24, 36],
    ['24 - 36', 'length', 'm', 24, 36],
    ['80 ft to 30 m', 'length', 'm', 80 * FOOT_M, 30],
    ['90 km/h ± 5', 'speed', 'km/h', 85 / 3.6, 95 / 3.6],
    ['55 kn', 'speed', 'km/h', 55 * KNOT_MS, 55 * KNOT_MS],
    ['25', 'speed', 'm/s', 25, 25],
  ] as const)('%s', (text, kind, unit, lo, hi) => {
    const b = parseBand(text, kind, 'field', unit);
    expect(b.lo).toBeCloseTo(lo, 9);
    expect(b.hi).toBeCloseTo(hi, 9);
  });

  it.each([
    ['', 'a value or a range'],
    ['36 to 24', 'low end not above the high end'],
    ['fast', ''],
    ['10 kg', ''],
  ])('rejects %j, naming the field', (text, allowed) => {
    try {
      parseBand(text, 'length', 'object size', 'm');
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      expect((e as InputError).message).toContain('object size');
      expect((e as InputError).message).toContain(allowed);
    }
  });
});

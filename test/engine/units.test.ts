import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { convert, formatEstimate, formatQuantity, parseQuantity, type Quantity, type UnitSystem } from '../../src/engine/units';
import {
  DEG,
  FOOT_M,
  KMH_MS,
  KNOT_MS,
  MAX_RANGE_M,
  MAX_SIZE_M,
  MAX_SPEED_MS,
  MAX_TIME_S,
  MPH_MS,
  NAUTICAL_MILE_M,
  STATUTE_MILE_M,
} from '../../src/engine/constants';
import { InputError } from '../../src/engine/errors';
import { expectInputError } from './expect-error';


/** Equal to within a couple of units in the last place. */
function expectNear(actual: number, expected: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(4 * Number.EPSILON * Math.max(1, Math.abs(expected)));
}

describe('unit definitions against NIST SP 811 (2008) App. B.8', () => {
  it('1 kn = 1852/3600 m/s, printed 5.144 444 E-01 m/s, under every spelling', () => {
    for (const name of ['kn', 'kt', 'kts', 'knot', 'knots']) {
      const v = parseQuantity(`1 ${name}`, 'speed', 'speed');
      expectNear(v, 1852 / 3600);
      expect(v).toBeCloseTo(0.5144444, 7);
    }
    expect(KNOT_MS).toBe(1852 / 3600);
  });

  it('`kt` is the knot, not a kilotonne (mathjs would read it as k + t)', () => {
    expectNear(parseQuantity('250 kt', 'speed', 'speed'), 250 * (1852 / 3600));
  });

  it('1 NM = 1 nmi = 1852 m (NIST SP 811; International Hydrographic Conference 1929)', () => {
    expect(parseQuantity('1 NM', 'distance', 'range')).toBe(1852);
    expect(parseQuantity('1 nmi', 'distance', 'range')).toBe(1852);
    expect(NAUTICAL_MILE_M).toBe(1852);
  });

  it('lower-case nm stays the nanometre', () => {
    expectNear(parseQuantity('1 nm', 'length', 'size'), 1e-9);
  });

  it('1 ft = 0.3048 m (NIST SP 811; 1959 agreement)', () => {
    expect(parseQuantity('1 ft', 'length', 'size')).toBe(0.3048);
    expect(FOOT_M).toBe(0.3048);
  });

  it('1 mph = 0.44704 m/s and 1 mi = 1609.344 m (NIST SP 811)', () => {
    expectNear(parseQuantity('1 mph', 'speed', 'speed'), 0.44704);
    expectNear(parseQuantity('1 mi/h', 'speed', 'speed'), 0.44704);
    expect(parseQuantity('1 mi', 'distance', 'range')).toBe(1609.344);
    expect(MPH_MS).toBe(0.44704);
    expect(STATUTE_MILE_M).toBe(1609.344);
  });

  it('1 km/h = 1/3.6 m/s (SI Brochure)', () => {
    expectNear(parseQuantity('1 km/h', 'speed', 'speed'), 1 / 3.6);
    expectNear(KMH_MS, 1 / 3.6);
  });

  it('convert agrees with the constants', () => {
    expectNear(convert(KNOT_MS, 'speed', 'kn'), 1);
    expectNear(convert(1852, 'distance', 'NM'), 1);
    expectNear(convert(0.3048, 'length', 'ft'), 1);
    expectNear(convert(0.44704, 'speed', 'mph'), 1);
    expectNear(convert(Math.PI, 'angle', 'deg'), 180);
    expectNear(convert(90, 'time', 'min'), 1.5);
  });
});

describe('parseQuantity: the example expressions', () => {
  const cases: [string, Quantity, number][] = [
    ['100 km/h', 'speed', 100 / 3.6],
    ['55 kn', 'speed', 55 * KNOT_MS],
    ['0.4*1852 m', 'distance', 0.4 * 1852],
    ['3 NM', 'distance', 3 * 1852],
    ['250 kt', 'speed', 250 * KNOT_MS],
    ['12.5 deg', 'angle', 12.5 * DEG],
    ['12.5\u00b0', 'angle', 12.5 * DEG],
    ['30 m/s', 'speed', 30],
    ['8000 ft', 'distance', 8000 * FOOT_M],
    ['2.5 km', 'distance', 2500],
    ['(1 + 2) km', 'distance', 3000],
    ['10^3 m', 'distance', 1000],
    ['1 min + 30 s', 'time', 90],
    ['2 h', 'time', 7200],
    ['-36 km/h', 'speed', -10],
    ['0.2 rad', 'angle', 0.2],
  ];
  for (const [text, kind, si] of cases) {
    it(`${text} -> ${si} SI`, () => {
      expect(parseQuantity(text, kind, 'field')).toBeCloseTo(si, 9);
    });
  }

  it('mm:ss and h:mm:ss clock times for time', () => {
    expect(parseQuantity('1:30', 'time', 'timestamp')).toBe(90);
    expect(parseQuantity('0:07.25', 'time', 'timestamp')).toBe(7.25);
    expect(parseQuantity('1:02:03', 'time', 'timestamp')).toBe(3723);
  });

  it('a bare number takes the default unit', () => {
    expect(parseQuantity('30', 'speed', 'speed', 'm/s')).toBe(30);
    expect(parseQuantity('100', 'speed', 'speed', 'km/h')).toBeCloseTo(100 / 3.6, 12);
    expect(parseQuantity('2 * 20', 'speed', 'speed', 'kn')).toBeCloseTo(40 * KNOT_MS, 12);
    expect(parseQuantity('12.5', 'angle', 'angle', 'deg')).toBeCloseTo(12.5 * DEG, 14);
    // a unit in the text wins over the default
    expect(parseQuantity('10 m/s', 'speed', 'speed', 'kn')).toBe(10);
  });
});

describe('parseQuantity: rejections', () => {
  it('refuses anything but arithmetic and units: import, definitions, assignments, functions', () => {
    for (const text of [
      'import("fs")',
      'import({}, {override: true})',
      'f(x)=x',
      'a=1',
      'evaluate("1 m")',
      'createUnit("foo")',
      'createUnit',
      'sqrt(4) m',
      'x',
      'pi m',
      '"3 m"',
      '[1, 2] m',
      '{a: 1}',
      '1 m; 2 m',
      '5 km to m',
      '1 < 2',
      'true ? 1 m : 2 m',
      'a.b',
    ]) {
      const e = expectInputError(() => parseQuantity(text, 'distance', 'offset'), 'offset');
      expect(e.message).toContain('a distance such as');
    }
  });

  it('wrong dimension names what was expected', () => {
    const e = expectInputError(() => parseQuantity('100 km/h', 'distance', 'range'), 'range');
    expect(e.message).toContain('a distance such as');
    const s = expectInputError(() => parseQuantity('3 NM', 'speed', 'observer speed'), 'observer speed');
    expect(s.message).toContain('a speed such as 100 km/h, 55 kn or 30 m/s');
    expectInputError(() => parseQuantity('1 kg', 'length', 'size'), 'size');
    expectInputError(() => parseQuantity('12 deg', 'time', 'time'), 'time');
  });

  it('unparsable, empty, unitless and non-finite entries are refused', () => {
    expectInputError(() => parseQuantity('abc', 'speed', 'speed'), 'speed');
    expectInputError(() => parseQuantity('5 km +', 'distance', 'range'), 'range');
    expectInputError(() => parseQuantity('', 'distance', 'range'), 'range');
    expectInputError(() => parseQuantity('   ', 'distance', 'range'), 'range');
    expectInputError(() => parseQuantity('30', 'speed', 'speed'), 'speed');
    expectInputError(() => parseQuantity('km', 'distance', 'range'), 'range');
    expectInputError(() => parseQuantity('1e400 m', 'distance', 'range'), 'range');
    expectInputError(() => parseQuantity('1 m / 0', 'distance', 'range'), 'range');
    expectInputError(() => parseQuantity('x'.repeat(500), 'distance', 'range'), 'range');
  });

  it('bounds: beyond the engine maxima, or negative where a sign makes no sense', () => {
    expectInputError(() => parseQuantity('5000 km/h', 'speed', 'speed'), 'speed');
    expectInputError(() => parseQuantity('2000 km', 'distance', 'range'), 'range');
    expectInputError(() => parseQuantity('-3 m', 'length', 'size'), 'size');
    expectInputError(() => parseQuantity('-3 s', 'time', 'time'), 'time');
    expectInputError(() => parseQuantity('25 h', 'time', 'time'), 'time');
    expectInputError(() => parseQuantity('400 deg', 'angle', 'angle'), 'angle');
  });

  it('bad clock times and bad default units are refused', () => {
    expectInputError(() => parseQuantity('1:75', 'time', 'timestamp'), 'timestamp');
    expectInputError(() => parseQuantity('1:30', 'distance', 'range'), 'range');
    expectInputError(() => parseQuantity('30', 'speed', 'speed', 'kg'), 'default unit');
    expectInputError(() => parseQuantity('30', 'speed', 'speed', '5 m/s'), 'default unit');
  });

  it('bad kind or field name are refused', () => {
    expectInputError(() => parseQuantity('1 m', 'mass' as Quantity, 'x'), 'quantity');
    expectInputError(() => parseQuantity('1 m', 'distance', ''), 'field name');
  });

  it('property: any text either gives a finite SI value within bounds or throws InputError', () => {
    const chars = fc.constantFrom(...'0123456789.+-*/^() kmhsftNMdegnrai:=;,"[]{}x'.split(''));
    fc.assert(
      fc.property(fc.string({ unit: chars, maxLength: 24 }), fc.constantFrom<Quantity>('speed', 'distance', 'length', 'angle', 'time'), (text, kind) => {
        let v: number;
        try {
          v = parseQuantity(text, kind, 'entry', kind === 'angle' ? 'deg' : undefined);
        } catch (e) {
          expect(e).toBeInstanceOf(InputError);
          return;
        }
        expect(Number.isFinite(v)).toBe(true);
      }),
      { numRuns: 500 },
    );
  });
});

describe('formatQuantity per system', () => {
  it('speed: km/h, mph, kt', () => {
    expect(formatQuantity(36, 'speed', 'metric')).toBe('130 km/h');
    expect(formatQuantity(36, 'speed', 'imperial')).toBe('80.5 mph');
    expect(formatQuantity(36, 'speed', 'aviation')).toBe('70.0 kt');
    expect(formatQuantity(250 * KNOT_MS, 'speed', 'aviation')).toBe('250 kt');
  });

  it('distance: m -> km at 1 km, ft -> mi at 1 mi, ft -> NM at 1 NM', () => {
    expect(formatQuantity(500, 'distance', 'metric')).toBe('500 m');
    expect(formatQuantity(999.7, 'distance', 'metric')).toBe('1.00 km');
    expect(formatQuantity(2410, 'distance', 'metric')).toBe('2.41 km');
    expect(formatQuantity(500, 'distance', 'imperial')).toBe('1640 ft');
    expect(formatQuantity(2410, 'distance', 'imperial')).toBe('1.50 mi');
    expect(formatQuantity(500, 'distance', 'aviation')).toBe('1640 ft');
    expect(formatQuantity(2410, 'distance', 'aviation')).toBe('1.30 NM');
    expect(formatQuantity(-2410, 'distance', 'metric')).toBe('-2.41 km');
  });

  it('length in m or ft, angle in degrees, time in s / min / h', () => {
    expect(formatQuantity(35, 'length', 'metric')).toBe('35.0 m');
    expect(formatQuantity(35, 'length', 'imperial')).toBe('115 ft');
    expect(formatQuantity(35, 'length', 'aviation')).toBe('115 ft');
    expect(formatQuantity(0.2, 'angle', 'metric')).toBe('11.5\u00b0');
    expect(formatQuantity(12.5, 'time', 'metric')).toBe('12.5 s');
    expect(formatQuantity(90, 'time', 'metric')).toBe('1.50 min');
    expect(formatQuantity(7200, 'time', 'aviation')).toBe('2.00 h');
  });

  it('significant digits, zero, and no exponent for large figures', () => {
    expect(formatQuantity(2410, 'distance', 'metric', 2)).toBe('2.4 km');
    expect(formatQuantity(0, 'speed', 'metric')).toBe('0.00 km/h');
    expect(formatQuantity(-1e-12, 'speed', 'metric', 2)).toBe('-3.6e-12 km/h');
    expect(formatQuantity(400000, 'distance', 'metric')).toBe('400 km');
    expect(formatQuantity(MAX_RANGE_M, 'distance', 'imperial')).toBe('621 mi');
    expect(formatQuantity(300, 'speed', 'metric')).toBe('1080 km/h');
  });

  it('formatEstimate: median with its 5-95 % interval in one unit', () => {
    expect(formatEstimate({ median: 2410, p05: 1980, p95: 2900 }, 'distance', 'metric')).toBe('2.41 km (1.98-2.90 km, 5-95 %)');
    expect(formatEstimate({ median: 1200, p05: 900, p95: 1500 }, 'distance', 'metric')).toBe('1.20 km (0.900-1.50 km, 5-95 %)');
    expect(formatEstimate({ median: 72, p05: 64, p95: 80 }, 'speed', 'aviation')).toBe('140 kt (124-156 kt, 5-95 %)');
    expect(formatEstimate({ median: 0.2, p05: 0.19, p95: 0.21 }, 'angle', 'metric')).toBe('11.5\u00b0 (10.9-12.0\u00b0, 5-95 %)');
    // negatives would read as minus signs around a hyphen
    expect(formatEstimate({ median: -3, p05: -5, p95: -1 }, 'speed', 'metric')).toBe('-10.8 km/h (-18.0 to -3.60 km/h, 5-95 %)');
  });

  it('rejects bad values, kinds, systems, digits and estimates with InputError', () => {
    expectInputError(() => formatQuantity(Number.NaN, 'speed', 'metric'), 'value');
    expectInputError(() => formatQuantity(1, 'speed', 'si' as UnitSystem), 'unit system');
    expectInputError(() => formatQuantity(1, 'mass' as Quantity, 'metric'), 'quantity');
    expectInputError(() => formatQuantity(1, 'speed', 'metric', 0), 'significant digits');
    expectInputError(() => formatQuantity(1, 'speed', 'metric', 2.5), 'significant digits');
    expectInputError(() => formatEstimate({ median: 1, p05: 2, p95: 3 }, 'speed', 'metric'), 'estimate');
    expectInputError(() => formatEstimate({ median: Number.NaN, p05: 0, p95: 3 }, 'speed', 'metric'), 'estimate median');
    expectInputError(() => convert(1, 'speed', 'kg'), 'unit');
    expectInputError(() => convert(1, 'speed', '5 m/s'), 'unit');
    expectInputError(() => convert(Number.POSITIVE_INFINITY, 'speed', 'kn'), 'value');
  });
});

describe('format then parse round-trips within rounding', () => {
  const bounds: Record<Quantity, [number, number]> = {
    speed: [-MAX_SPEED_MS, MAX_SPEED_MS],
    distance: [-MAX_RANGE_M, MAX_RANGE_M],
    length: [0, MAX_SIZE_M],
    angle: [-2 * Math.PI, 2 * Math.PI],
    time: [0, MAX_TIME_S],
  };
  it('property: |parse(format(v)) - v| is within half a unit in the last shown digit', () => {
    fc.assert(
      fc.property(
        fc.constantFrom<Quantity>('speed', 'distance', 'length', 'angle', 'time'),
        fc.constantFrom<UnitSystem>('metric', 'imperial', 'aviation'),
        fc.double({ min: 0, max: 0.99, noNaN: true }),
        fc.integer({ min: 0, max: 7 }),
        fc.boolean(),
        fc.integer({ min: 2, max: 6 }),
        (kind, system, t, decades, negative, digits) => {
          const [lo, hi] = bounds[kind];
          // spread values over several decades so that every unit switch is crossed
          const v = (negative && lo < 0 ? -1 : 1) * hi * t * 10 ** -decades;
          const text = formatQuantity(v, kind, system, digits);
          const back = parseQuantity(text, kind, 'round trip');
          const tol = 0.5 * 10 ** (1 - digits) * Math.abs(v) + 1e-9 * Math.max(1, Math.abs(v));
          expect(Math.abs(back - v)).toBeLessThanOrEqual(tol);
        },
      ),
      { numRuns: 2000 },
    );
  });
});

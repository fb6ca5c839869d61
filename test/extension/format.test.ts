import { describe, expect, it } from 'vitest';
import { degreesEstimate, distanceEstimate, speedEstimate } from '../../extension/overlay/format';

// Exact factors from NIST SP 811 (2008) App. B.8: 1 NM = 1852 m, 1 ft = 0.3048 m,
// 1 mi = 1609.344 m, 1 kn = 1852/3600 m/s, 1 mph = 0.44704 m/s; km/h from the SI Brochure.
const e = (m: number) => ({ p05: m * 0.8, median: m, p95: m * 1.2 });

describe('overlay readout units (no mathjs in the overlay)', () => {
  it.each([
    [2000, 'metric', '2.00 km (1.60–2.40 km, 5–95 %)'],
    [500, 'metric', '500 m (400–600 m, 5–95 %)'],
    [2000, 'aviation', '1.08 NM (0.864–1.30 NM, 5–95 %)'],
    [500, 'aviation', '1640 ft (1312–1969 ft, 5–95 %)'],
    [2000, 'imperial', '1.24 mi (0.994–1.49 mi, 5–95 %)'],
  ] as const)('%d m in %s: %s', (m, system, text) => {
    expect(distanceEstimate(e(m), system)).toBe(text);
  });

  it.each([
    [25, 'metric', '90.0 km/h (72.0–108 km/h, 5–95 %)'],
    [25, 'aviation', '48.6 kt (38.9–58.3 kt, 5–95 %)'],
    [25, 'imperial', '55.9 mph (44.7–67.1 mph, 5–95 %)'],
  ] as const)('%d m/s in %s: %s', (ms, system, text) => {
    expect(speedEstimate(e(ms), system)).toBe(text);
  });

  it('an angle with its interval, in degrees (pi rad = 180 degrees exactly, SI Brochure Table 8)', () => {
    expect(degreesEstimate({ p05: Math.PI / 90, median: Math.PI / 60, p95: Math.PI / 45 })).toBe('3.00° (2.00–4.00°, 5–95 %)');
  });
});

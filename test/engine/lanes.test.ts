import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { LANE_CYCLES, customLaneCycle, laneCycleById, observerSpeedFromDashes } from '../../src/engine/lanes';
import { FOOT_M, KMH_MS, MAX_SPEED_MS } from '../../src/engine/constants';
import { InputError } from '../../src/engine/errors';
import { expectInputError } from './expect-error';


// REFERENCES.md, "Broken lane-line cycles": [id, segment m, gap m, cycle m, source as printed there]
const TABLE: [string, number, number, number, string][] = [
  ['us-broken', 10 * FOOT_M, 30 * FOOT_M, 12.19, 'MUTCD 2009, section 3A.06'],
  ['uk-lane-fast', 2, 7, 9, 'Traffic Signs Manual ch. 5 (2003), Table 4-2, diagram 1005.1'],
  ['uk-lane-slow', 1, 5, 6, 'Traffic Signs Manual ch. 5, Table 4-2, diagram 1005'],
  ['uk-centre-fast', 3, 6, 9, 'Traffic Signs Manual ch. 5, Table 4-1, diagram 1008.1'],
  ['nz-lane', 3, 7, 10, 'Traffic Control Devices Manual Part 5, Table 2-28'],
  ['de-motorway', 6, 12, 18, 'RMS, from secondary sources'],
  // Australia: AS 1742.2 (from memory)
  ['au-broken', 3, 9, 12, 'AS 1742.2 (from memory)'],
];

describe('LANE_CYCLES against REFERENCES.md', () => {
  it('holds exactly the rows of the table', () => {
    expect(LANE_CYCLES.map((c) => c.id)).toEqual(TABLE.map((r) => r[0]));
  });

  for (const [id, seg, gap, cycle, source] of TABLE) {
    it(`${id}: ${seg.toFixed(3)} m + ${gap.toFixed(3)} m, ${cycle} m cycle (${source})`, () => {
      const c = laneCycleById(id);
      expect(c.segmentM).toBe(seg);
      expect(c.gapM).toBe(gap);
      expect(c.cycleM).toBeCloseTo(cycle, 2);
      expect(c.cycleM).toBe(c.segmentM + c.gapM);
      expect(c.source).toBe(source);
    });
  }

  it('US 10 ft + 30 ft is stored through the exact international foot (MUTCD 2009, section 3A.06; NIST SP 811)', () => {
    const us = laneCycleById('us-broken');
    expect(us.segmentM).toBeCloseTo(3.048, 12);
    expect(us.gapM).toBeCloseTo(9.144, 12);
    expect(us.cycleM).toBeCloseTo(12.192, 12);
  });

  it('UK labels give their speed-limit condition (Traffic Signs Manual ch. 5)', () => {
    expect(laneCycleById('uk-lane-fast').label).toContain('> 40 mph');
    expect(laneCycleById('uk-lane-slow').label).toContain('<= 40 mph');
    expect(laneCycleById('uk-centre-fast').label).toContain('> 40 mph');
  });

  it('ids are unique', () => {
    expect(new Set(LANE_CYCLES.map((c) => c.id)).size).toBe(LANE_CYCLES.length);
  });

  it('the table cannot be changed by a caller', () => {
    expect(Object.isFrozen(LANE_CYCLES)).toBe(true);
    expect(Object.isFrozen(LANE_CYCLES[0])).toBe(true);
  });
});

describe('laneCycleById and customLaneCycle', () => {
  it('an unknown id names the field and lists the known ids', () => {
    expectInputError(() => laneCycleById('mars-highway'), 'lane pattern');
    try {
      laneCycleById('mars-highway');
    } catch (e) {
      for (const c of LANE_CYCLES) expect((e as Error).message).toContain(c.id);
    }
  });

  it('a custom pattern adds segment and gap', () => {
    const c = customLaneCycle(4.5, 7.5);
    expect(c.cycleM).toBe(12);
    expect(c.segmentM).toBe(4.5);
    expect(c.gapM).toBe(7.5);
  });

  it('accepts the ends of 0.1..100 m and refuses beyond them', () => {
    expect(customLaneCycle(0.1, 100).cycleM).toBeCloseTo(100.1, 12);
    expectInputError(() => customLaneCycle(0.05, 5), 'lane segment length');
    expectInputError(() => customLaneCycle(5, 100.5), 'lane gap length');
    expectInputError(() => customLaneCycle(Number.NaN, 5), 'lane segment length');
    expectInputError(() => customLaneCycle(5, Number.POSITIVE_INFINITY), 'lane gap length');
  });
});

describe('observerSpeedFromDashes', () => {
  it('invented worked example: 30 cycles of 12 m in 10 s give 36 m/s = 129.6 km/h', () => {
    const r = observerSpeedFromDashes(30, 12, 5, 15);
    expect(r.speed).toBeCloseTo(36, 12);
    expect(r.speed / KMH_MS).toBeCloseTo(129.6, 10);
    // half-cycle count tolerance (common practice): 29.5 and 30.5 cycles
    expect(r.lo).toBeCloseTo(35.4, 12);
    expect(r.hi).toBeCloseTo(36.6, 12);
  });

  it('a wider tolerance widens the band around the same speed', () => {
    const a = observerSpeedFromDashes(20, 9, 0, 8, 0.5);
    const b = observerSpeedFromDashes(20, 9, 0, 8, 2);
    expect(b.speed).toBe(a.speed);
    expect(b.lo).toBeLessThan(a.lo);
    expect(b.hi).toBeGreaterThan(a.hi);
  });

  it('fractional counts are accepted, and the low end never goes below 0', () => {
    const r = observerSpeedFromDashes(0.4, 10, 0, 1);
    expect(r.speed).toBeCloseTo(4, 12);
    expect(r.lo).toBe(0);
    expect(r.hi).toBeCloseTo(9, 12);
  });

  it('brute-force: a simulated drive past dash edges, both stops on the first video frame after an edge', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 5, max: 60, noNaN: true }),
        fc.constantFrom(...LANE_CYCLES.map((c) => c.cycleM)),
        fc.integer({ min: 5, max: 100 }),
        fc.double({ min: 0, max: 0.999, noNaN: true }),
        (v, cycle, n, phase) => {
          const fps = 30;
          // the reference point is at x0 + v t; dash leading edges lie at k * cycle
          const x0 = phase * cycle;
          const tEdge = (k: number) => (k * cycle - x0) / v;
          const frameAfter = (t: number) => Math.ceil(t * fps) / fps;
          const t1 = frameAfter(tEdge(1));
          const t2 = frameAfter(tEdge(1 + n));
          // each stop lags its edge by under one frame, under v / fps <= 2 m, less than half the shortest cycle
          const r = observerSpeedFromDashes(n, cycle, t1, t2);
          expect(r.lo).toBeLessThanOrEqual(v);
          expect(r.hi).toBeGreaterThanOrEqual(v);
          expect(Math.abs(r.speed - v) / v).toBeLessThan(0.5 / n + 1e-9);
        },
      ),
    );
  });

  it('property: lo <= speed <= hi and speed = n x cycle / dt', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.5, max: 500, noNaN: true }),
        fc.double({ min: 0.2, max: 200, noNaN: true }),
        fc.double({ min: 0, max: 1000, noNaN: true }),
        fc.double({ min: 0.5, max: 1000, noNaN: true }),
        fc.double({ min: 0, max: 10, noNaN: true }),
        (n, c, t1, dt, tol) => {
          const t2 = t1 + dt;
          if (!(t2 > t1) || (n * c) / (t2 - t1) > MAX_SPEED_MS) return;
          const r = observerSpeedFromDashes(n, c, t1, t2, tol);
          expect(r.speed).toBeCloseTo((n * c) / (t2 - t1), 9);
          expect(r.lo).toBeLessThanOrEqual(r.speed);
          expect(r.hi).toBeGreaterThanOrEqual(r.speed);
          expect(r.lo).toBeGreaterThanOrEqual(0);
        },
      ),
    );
  });

  it('rejects a second timestamp not after the first, naming it', () => {
    expectInputError(() => observerSpeedFromDashes(10, 12, 5, 5), 'second timestamp');
    expectInputError(() => observerSpeedFromDashes(10, 12, 5, 4), 'second timestamp');
  });

  it('rejects bad counts, cycles, times and tolerances with InputError', () => {
    expectInputError(() => observerSpeedFromDashes(0, 12, 0, 1), 'cycles counted');
    expectInputError(() => observerSpeedFromDashes(-3, 12, 0, 1), 'cycles counted');
    expectInputError(() => observerSpeedFromDashes(Number.NaN, 12, 0, 1), 'cycles counted');
    expectInputError(() => observerSpeedFromDashes(10, 0, 0, 1), 'lane cycle length');
    expectInputError(() => observerSpeedFromDashes(10, 500, 0, 1), 'lane cycle length');
    expectInputError(() => observerSpeedFromDashes(10, 12, -1, 1), 'first timestamp');
    expectInputError(() => observerSpeedFromDashes(10, 12, 0, Number.POSITIVE_INFINITY), 'second timestamp');
    expectInputError(() => observerSpeedFromDashes(10, 12, 0, 1, -0.5), 'count tolerance');
  });

  it('rejects an implied speed beyond MAX_SPEED_MS', () => {
    // 1000 cycles of 12 m in 1 s = 12 000 m/s: a typo, not a drive
    expectInputError(() => observerSpeedFromDashes(1000, 12, 0, 1), 'observer speed');
  });

  it('property: invalid cycle counts always throw InputError', () => {
    fc.assert(
      fc.property(fc.oneof(fc.double({ max: 0 }), fc.constant(Number.NaN)), (n) => {
        expect(() => observerSpeedFromDashes(n, 12, 0, 10)).toThrow(InputError);
      }),
    );
  });
});

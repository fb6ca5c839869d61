import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  APPROACH_CATEGORIES_VAT,
  CLASS_ENVELOPES,
  FINAL_APPROACH_RANGES,
  HOVER_GROUND_SPEED_KT,
  SPEED_FIGURES,
  VERDICT_SENTENCES,
  approachCategory,
  judgeSpeed,
  type JudgeInput,
  type ObjectKind,
} from '../../src/engine/plausibility';
import { beaufortForce } from '../../src/engine/beaufort';
import { FOOT_M, KNOT_MS } from '../../src/engine/constants';
import { InputError } from '../../src/engine/errors';
import type { Estimate } from '../../src/engine/stats';
import { expectInputError } from './expect-error';

const kn = (k: number) => k * KNOT_MS;
const kts = (lo: number, med: number, hi: number): Estimate => ({ p05: kn(lo), median: kn(med), p95: kn(hi) });


describe('published envelopes as data', () => {
  it('approach categories by Vat: A < 91, B 91-120, C 121-140, D 141-165, E 166-210 kt (EU Regulation 2019/1384 CAT.OP.MPA.320 Table 1; 14 CFR 97.3)', () => {
    expect(APPROACH_CATEGORIES_VAT.map((c) => [c.id, c.loKt])).toEqual([
      ['A', 0],
      ['B', 91],
      ['C', 121],
      ['D', 141],
      ['E', 166],
    ]);
    expect(APPROACH_CATEGORIES_VAT[4]!.hiKt).toBe(210);
    for (const c of APPROACH_CATEGORIES_VAT) expect(c.source).toContain('2019/1384');
  });

  it('PANS-OPS final approach ranges: A 70-100 and C 115-160 confirmed; B, D, E, H (from memory) (ICAO Doc 8168)', () => {
    const byId = Object.fromEntries(FINAL_APPROACH_RANGES.map((r) => [r.id, r]));
    expect([byId.A!.loKt, byId.A!.hiKt, byId.C!.loKt, byId.C!.hiKt]).toEqual([70, 100, 115, 160]);
    // from memory, and the data says so
    expect([byId.B!.loKt, byId.B!.hiKt, byId.D!.loKt, byId.D!.hiKt]).toEqual([85, 130, 130, 185]);
    expect([byId.E!.loKt, byId.E!.hiKt, byId.H!.loKt, byId.H!.hiKt]).toEqual([155, 230, 60, 90]);
    for (const id of ['B', 'D', 'E', 'H']) expect(byId[id]!.source).toContain('(from memory)');
    for (const id of ['A', 'C']) expect(byId[id]!.source).not.toContain('from memory');
    for (const r of FINAL_APPROACH_RANGES) expect(r.source).toContain('Doc 8168');
  });

  it('speed limits and minimum flying speeds with their sources', () => {
    // 14 CFR 91.117(a); ICAO Annex 11 App. 4; EU SERA.6001
    expect(SPEED_FIGURES.limit250.kt).toBe(250);
    expect(SPEED_FIGURES.limit250.source).toContain('91.117(a)');
    expect(SPEED_FIGURES.limit250.source).toContain('SERA.6001');
    // 14 CFR 91.117(b)
    expect(SPEED_FIGURES.limit200.kt).toBe(200);
    expect(SPEED_FIGURES.limit200.source).toContain('91.117(b)');
    // former 14 CFR 23.49(c), to Amdt 23-64 (2016)
    expect(SPEED_FIGURES.singleEngineVs0.kt).toBe(61);
    expect(SPEED_FIGURES.singleEngineVs0.source).toContain('23.49(c)');
    // 14 CFR 1.1, 2019 text
    expect(SPEED_FIGURES.lightSportVs1.kt).toBe(45);
    expect(SPEED_FIGURES.lightSportVs1.source).toContain('14 CFR 1.1');
    // derived: category B's lowest Vat over 1.3 (Vat = 1.3 VS0, EU Regulation 2019/1384)
    expect(SPEED_FIGURES.transportFloor.kt).toBeCloseTo(70, 0);
    expect(SPEED_FIGURES.transportFloor.kt * 1.3).toBeCloseTo(91, 12);
  });

  it('helicopters can hover: ground speed 0 is inside their envelope (REFERENCES.md)', () => {
    expect(CLASS_ENVELOPES.rotorcraft.canHover).toBe(true);
    expect(CLASS_ENVELOPES.rotorcraft.floorKt).toBeNull();
    expect(CLASS_ENVELOPES.rotorcraft.approach.loKt).toBe(0);
    for (const k of ['fixed-wing-transport', 'fixed-wing-light', 'light-sport'] as const) {
      expect(CLASS_ENVELOPES[k].canHover).toBe(false);
      expect(CLASS_ENVELOPES[k].floorKt).toBeGreaterThan(0);
    }
  });

  it('verdict sentences are plain and never accuse anyone', () => {
    for (const s of Object.values(VERDICT_SENTENCES)) {
      expect(s.length).toBeGreaterThan(20);
      expect(s).not.toMatch(/fake|hoax|fraud|decei|liar|manipulat|staged/i);
    }
  });
});

describe('approachCategory at every boundary (EU Regulation 2019/1384 CAT.OP.MPA.320 Table 1; 14 CFR 97.3)', () => {
  const cases: [number, string | null][] = [
    [0, 'A'],
    [90.99, 'A'],
    [91, 'B'],
    [120.5, 'B'],
    [120.99, 'B'],
    [121, 'C'],
    [140.99, 'C'],
    [141, 'D'],
    [165.99, 'D'],
    [166, 'E'],
    [210, 'E'],
    [210.01, null],
  ];
  for (const [k, cat] of cases) {
    it(`${k} kt -> ${cat ?? 'beyond E'}`, () => {
      expect(approachCategory(kn(k))).toBe(cat);
    });
  }
  it('rejects invalid speeds', () => {
    expectInputError(() => approachCategory(-1), 'speed at threshold');
    expectInputError(() => approachCategory(Number.NaN), 'speed at threshold');
  });
});

describe('judgeSpeed: invented scenarios', () => {
  it('invented: a transport jet "hovering" at 0-5 kt in calm air is out of envelope, with the headwind it would need and its Beaufort force', () => {
    const v = judgeSpeed({ groundSpeed: kts(0, 2.5, 5), kind: 'fixed-wing-transport', headwind: 0 });
    expect(v.level).toBe('out-of-envelope');
    expect(v.rule.id).toBe('stall-floor');
    expect(v.rule.text).toContain('70 kt');
    expect(v.rule.text).toContain('0-5 kt');
    expect(v.hover).not.toBeNull();
    // least flying speed 91/1.3 kt (derived from EU Regulation 2019/1384), less the 2.5 kt median ground speed
    expect(v.hover!.headwindNeededMs).toBeCloseTo(kn(91 / 1.3 - 2.5), 9);
    // about 67.5 kt: Met Office force 12 (>= 64 kt)
    expect(v.hover!.beaufort).toEqual({ force: 12, description: 'hurricane force' });
    expect(v.notes.join(' ')).toMatch(/headwind of about 68 kt \(Beaufort 12, hurricane force\)/);
    expect(v.numbers.headwindNeededMs).toBe(v.hover!.headwindNeededMs);
  });

  it('invented: the same transport jet at 140 kt is ordinary, on approach or with no phase given', () => {
    const a = judgeSpeed({ groundSpeed: kts(125, 140, 155), kind: 'fixed-wing-transport', phase: 'approach' });
    expect(a.level).toBe('ordinary');
    expect(a.rule.text).toBe('Final approach speeds of categories A-E span 70-230 kt; the implied airspeed 125-155 kt lies inside');
    expect(a.rule.source).toContain('Doc 8168');
    expect(a.hover).toBeNull();
    const b = judgeSpeed({ groundSpeed: kts(125, 140, 155), kind: 'fixed-wing-transport' });
    expect(b.level).toBe('ordinary');
  });

  it('invented: a rotorcraft hovering is ordinary, and needs no headwind', () => {
    const v = judgeSpeed({ groundSpeed: kts(0, 1, 4), kind: 'rotorcraft' });
    expect(v.level).toBe('ordinary');
    expect(v.hover).toEqual({ headwindNeededMs: 0, beaufort: { force: 0, description: 'calm' } });
  });

  it('invented: a rotorcraft hovering in a tailwind (airspeed backwards) is still ordinary', () => {
    const v = judgeSpeed({ groundSpeed: kts(0, 1, 3), kind: 'rotorcraft', headwind: -kn(10) });
    expect(v.level).toBe('ordinary');
    expect(v.numbers.airspeedP95Ms).toBeCloseTo(kn(10), 9);
  });

  it('invented: 320 kt at 3000 ft is flagged against the 250 kt rule (14 CFR 91.117(a))', () => {
    const v = judgeSpeed({ groundSpeed: kts(300, 320, 340), kind: 'fixed-wing-transport', altitudeFt: 3000 });
    expect(v.level).toBe('out-of-envelope');
    expect(v.rule.id).toBe('limit-250');
    expect(v.rule.text).toContain('250 kt');
    expect(v.rule.source).toContain('91.117(a)');
    // 250 kt indicated is about 265 kt true at 3000 ft (2 % per 1000 ft, common practice)
    expect(v.numbers.limit250TasMs).toBeCloseTo(kn(265), 9);
    expect(v.numbers.altitudeMedianM).toBeCloseTo(3000 * FOOT_M, 9);
  });

  it('invented: 320 kt at 15 000 ft is not held to the 250 kt rule', () => {
    const v = judgeSpeed({ groundSpeed: kts(300, 320, 340), kind: 'fixed-wing-transport', altitudeFt: 15000 });
    expect(v.level).toBe('ordinary');
    expect(v.numbers.limit250TasMs).toBeUndefined();
  });

  it('invented: 320 kt with no altitude is not flagged, but a note says the limit was not applied', () => {
    const v = judgeSpeed({ groundSpeed: kts(300, 320, 340), kind: 'fixed-wing-transport' });
    expect(v.level).toBe('ordinary');
    expect(v.notes.join(' ')).toContain('No altitude was given');
  });

  it('invented: an altitude interval straddling 10 000 ft leaves the rule out, with a note', () => {
    const v = judgeSpeed({
      groundSpeed: kts(300, 320, 340),
      kind: 'fixed-wing-transport',
      altitudeFt: { p05: 8000, median: 10500, p95: 13000 },
    });
    expect(v.level).toBe('ordinary');
    expect(v.notes.join(' ')).toContain('straddles 10 000 ft');
  });

  it('invented: only the tail above 250 kt at 3000 ft -> ordinary with a note; the median above -> stretched', () => {
    const tail = judgeSpeed({ groundSpeed: kts(200, 240, 290), kind: 'fixed-wing-transport', altitudeFt: 3000 });
    expect(tail.level).toBe('ordinary');
    expect(tail.notes.join(' ')).toContain('only reaches above with its tail');
    const median = judgeSpeed({ groundSpeed: kts(230, 280, 320), kind: 'fixed-wing-transport', altitudeFt: 3000 });
    expect(median.level).toBe('stretched');
    expect(median.rule.id).toBe('limit-250');
  });

  it('invented: a transport on approach entirely above 250 kt is out of envelope even without an altitude', () => {
    const v = judgeSpeed({ groundSpeed: kts(260, 280, 300), kind: 'fixed-wing-transport', phase: 'approach' });
    expect(v.level).toBe('out-of-envelope');
    expect(v.rule.id).toBe('approach-ceiling');
  });

  it('invented: a transport on approach at 240 kt median is stretched beyond category E', () => {
    const v = judgeSpeed({ groundSpeed: kts(225, 240, 248), kind: 'fixed-wing-transport', phase: 'approach' });
    expect(v.level).toBe('stretched');
    expect(v.rule.id).toBe('fixed-wing-transport-approach-range');
    expect(v.rule.text).toContain('above');
  });

  it('invented: headwind adds to ground speed to give airspeed', () => {
    const v = judgeSpeed({ groundSpeed: kts(40, 50, 60), kind: 'fixed-wing-light', headwind: kn(20) });
    expect(v.numbers.airspeedMedianMs).toBeCloseTo(kn(70), 9);
    expect(v.level).toBe('ordinary');
    const tail = judgeSpeed({ groundSpeed: kts(80, 90, 100), kind: 'fixed-wing-light', headwind: -kn(20) });
    expect(tail.numbers.airspeedP05Ms).toBeCloseTo(kn(60), 9);
  });

  it('invented: a light aeroplane at 40 kt is stretched (below the 61 kt cap, former 14 CFR 23.49(c)); at 10-20 kt it is out', () => {
    const slow = judgeSpeed({ groundSpeed: kts(35, 40, 45), kind: 'fixed-wing-light' });
    expect(slow.level).toBe('stretched');
    expect(slow.rule.text).toContain('below');
    // median 28 kt below the 30.5 kt floor, but the interval reaches above it: not out of envelope
    const straddle = judgeSpeed({ groundSpeed: kts(20, 28, 40), kind: 'fixed-wing-light' });
    expect(straddle.level).toBe('stretched');
    const crawl = judgeSpeed({ groundSpeed: kts(10, 15, 20), kind: 'fixed-wing-light' });
    expect(crawl.level).toBe('out-of-envelope');
    expect(crawl.rule.id).toBe('stall-floor');
  });

  it('invented: a light-sport aeroplane at 50 kt is ordinary; at 150 kt it is past its 120 kt top speed (14 CFR 1.1, from memory)', () => {
    expect(judgeSpeed({ groundSpeed: kts(45, 50, 56), kind: 'light-sport' }).level).toBe('ordinary');
    const fast = judgeSpeed({ groundSpeed: kts(140, 150, 160), kind: 'light-sport' });
    expect(fast.level).toBe('stretched');
    expect(fast.rule.text).toContain('none of it reaches');
  });

  it('invented: the headwind stated for hovering is the one that lifts the median airspeed to the least flying speed', () => {
    const gs = kts(0, 3, 8);
    const first = judgeSpeed({ groundSpeed: gs, kind: 'fixed-wing-light' });
    expect(first.level).toBe('out-of-envelope');
    const need = first.hover!.headwindNeededMs;
    expect(need).toBeCloseTo(kn(61 - 3), 9);
    // 58 kt: Met Office force 11, violent storm (56-63 kt)
    expect(first.hover!.beaufort.force).toBe(11);
    const windy = judgeSpeed({ groundSpeed: gs, kind: 'fixed-wing-light', headwind: need });
    expect(windy.numbers.airspeedMedianMs).toBeCloseTo(kn(61), 9);
    expect(windy.level).toBe('ordinary');
  });

  it('invented: a hovering claim can be asked for even at speed', () => {
    const v = judgeSpeed({ groundSpeed: kts(20, 30, 40), kind: 'fixed-wing-transport', hovering: true });
    expect(v.hover).not.toBeNull();
    expect(v.hover!.headwindNeededMs).toBeCloseTo(kn(91 / 1.3 - 30), 9);
    const none = judgeSpeed({ groundSpeed: kts(20, 30, 40), kind: 'fixed-wing-transport' });
    expect(none.hover).toBeNull();
  });

  it('invented: an unknown object hovering is undecided; the slowest aeroplane class sets the headwind', () => {
    const v = judgeSpeed({ groundSpeed: kts(0, 2, 6), kind: 'unknown' });
    expect(v.level).toBe('undecided');
    expect(v.rule.id).toBe('no-class');
    // light-sport VS1 cap 45 kt (14 CFR 1.1) less 2 kt: 43 kt, Met Office force 9 (41-47 kt)
    expect(v.hover!.headwindNeededMs).toBeCloseTo(kn(43), 9);
    expect(v.hover!.beaufort.force).toBe(9);
  });

  it('invented: an unknown object faster than sound at sea level is out of envelope (from memory: 661 kt)', () => {
    const v = judgeSpeed({ groundSpeed: kts(800, 900, 1000), kind: 'unknown' });
    expect(v.level).toBe('out-of-envelope');
    expect(v.rule.id).toBe('sane-maximum');
  });

  it('invented: near a class C or D airport the 200 kt limit is mentioned, not applied (14 CFR 91.117(b))', () => {
    const v = judgeSpeed({ groundSpeed: kts(200, 220, 240), kind: 'fixed-wing-transport', altitudeFt: 2000 });
    expect(v.level).toBe('ordinary');
    expect(v.notes.join(' ')).toContain('200 kt');
  });
});

describe('judgeSpeed: properties', () => {
  const kindArb = fc.constantFrom<ObjectKind>('fixed-wing-transport', 'fixed-wing-light', 'light-sport', 'rotorcraft', 'unknown');
  const estimateArb = fc
    .tuple(fc.double({ min: 0, max: 400, noNaN: true }), fc.double({ min: 0, max: 400, noNaN: true }), fc.double({ min: 0, max: 400, noNaN: true }))
    .map(([a, b, c]) => {
      const [p05, median, p95] = [a, b, c].sort((x, y) => x - y) as [number, number, number];
      return { p05, median, p95 };
    });
  const inputArb = fc.record({
    groundSpeed: estimateArb,
    kind: kindArb,
    headwind: fc.double({ min: -60, max: 60, noNaN: true }),
    altitudeFt: fc.option(fc.double({ min: 0, max: 40000, noNaN: true }), { nil: undefined }),
    phase: fc.constantFrom<JudgeInput['phase']>('approach', 'cruise', 'unknown', undefined),
  });

  it('property: every number is finite, the level is known and the rule is stated', () => {
    fc.assert(
      fc.property(inputArb, (input) => {
        const v = judgeSpeed(input);
        expect(Object.keys(VERDICT_SENTENCES)).toContain(v.level);
        for (const x of Object.values(v.numbers)) expect(Number.isFinite(x)).toBe(true);
        expect(v.rule.text.length).toBeGreaterThan(0);
        expect(v.rule.source.length).toBeGreaterThan(0);
        expect(v.numbers.airspeedP05Ms).toBeLessThanOrEqual(v.numbers.airspeedMedianMs!);
        expect(v.numbers.airspeedMedianMs).toBeLessThanOrEqual(v.numbers.airspeedP95Ms!);
      }),
    );
  });

  it('property: an aeroplane whose whole airspeed interval is below its floor is always out of envelope', () => {
    fc.assert(
      fc.property(
        fc.constantFrom('fixed-wing-transport', 'fixed-wing-light', 'light-sport' as const),
        estimateArb,
        fc.double({ min: -60, max: 60, noNaN: true }),
        (kind, gs, headwind) => {
          const floor = CLASS_ENVELOPES[kind].floorKt! * KNOT_MS;
          const v = judgeSpeed({ groundSpeed: gs, kind, headwind });
          if (gs.p95 + headwind < floor) expect(v.level).toBe('out-of-envelope');
          // only the whole interval below the floor counts, not the median alone
          if (gs.p95 + headwind >= floor) expect(v.rule.id).not.toBe('stall-floor');
        },
      ),
    );
  });

  it('property: a rotorcraft below 90 kt on approach is never out of envelope', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (a, b) => {
        const hi = kn(89) * Math.max(a, b);
        const lo = kn(89) * Math.min(a, b);
        const v = judgeSpeed({ groundSpeed: { p05: lo, median: (lo + hi) / 2, p95: hi }, kind: 'rotorcraft', phase: 'approach' });
        expect(v.level).toBe('ordinary');
      }),
    );
  });

  it('property: the hover headwind equals the least flying speed less the median ground speed, and its force matches', () => {
    fc.assert(
      fc.property(
        fc.constantFrom('fixed-wing-transport', 'fixed-wing-light', 'light-sport', 'rotorcraft' as const),
        fc.double({ min: 0, max: kn(HOVER_GROUND_SPEED_KT), noNaN: true }),
        fc.double({ min: 0, max: 20, noNaN: true }),
        (kind, p05, spread) => {
          const gs = { p05, median: p05 + spread / 2, p95: p05 + spread };
          const v = judgeSpeed({ groundSpeed: gs, kind });
          const need = Math.max(0, CLASS_ENVELOPES[kind].minFlyingKt * KNOT_MS - gs.median);
          expect(v.hover).not.toBeNull();
          expect(v.hover!.headwindNeededMs).toBeCloseTo(need, 9);
          expect(v.hover!.beaufort.force).toBe(beaufortForce(need).force);
        },
      ),
    );
  });
});

describe('judgeSpeed: invalid inputs throw InputError naming the field', () => {
  const ok: JudgeInput = { groundSpeed: kts(100, 120, 140), kind: 'fixed-wing-transport' };
  it('bad ground-speed estimates', () => {
    expectInputError(() => judgeSpeed({ ...ok, groundSpeed: { p05: 3, median: 2, p95: 4 } }), 'ground speed');
    expectInputError(() => judgeSpeed({ ...ok, groundSpeed: { p05: -1, median: 2, p95: 4 } }), 'ground speed (5 %)');
    expectInputError(() => judgeSpeed({ ...ok, groundSpeed: { p05: 1, median: Number.NaN, p95: 4 } }), 'ground speed (median)');
    expectInputError(() => judgeSpeed({ ...ok, groundSpeed: { p05: 1, median: 2, p95: 5000 } }), 'ground speed (95 %)');
    expectInputError(() => judgeSpeed({ ...ok, groundSpeed: null as unknown as Estimate }), 'ground speed');
  });
  it('bad kind, phase, headwind, altitude, hovering flag', () => {
    expectInputError(() => judgeSpeed({ ...ok, kind: 'airship' as ObjectKind }), 'kind of object');
    expectInputError(() => judgeSpeed({ ...ok, phase: 'landing' as JudgeInput['phase'] }), 'flight phase');
    expectInputError(() => judgeSpeed({ ...ok, headwind: Number.NaN }), 'headwind');
    expectInputError(() => judgeSpeed({ ...ok, altitudeFt: 1e7 }), 'altitude');
    expectInputError(() => judgeSpeed({ ...ok, altitudeFt: { p05: 5000, median: 4000, p95: 6000 } }), 'altitude');
    expectInputError(() => judgeSpeed({ ...ok, hovering: 'yes' as unknown as boolean }), 'hovering claim');
  });
  it('property: any non-finite ground-speed figure throws InputError', () => {
    fc.assert(
      fc.property(fc.constantFrom(Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY), fc.integer({ min: 0, max: 2 }), (bad, slot) => {
        const g = { p05: 1, median: 2, p95: 3 };
        const keys = ['p05', 'median', 'p95'] as const;
        g[keys[slot]!] = bad;
        expect(() => judgeSpeed({ ...ok, groundSpeed: g })).toThrow(InputError);
      }),
    );
  });
  it('does not change its input', () => {
    const input: JudgeInput = { groundSpeed: kts(0, 2, 5), kind: 'fixed-wing-light', altitudeFt: { p05: 900, median: 1000, p95: 1100 } };
    const copy = JSON.parse(JSON.stringify(input));
    judgeSpeed(input);
    expect(input).toEqual(copy);
  });
});

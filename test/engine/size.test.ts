import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  CODE_LETTERS,
  OTHER_SIZE_CLASSES,
  codeLetterForWingspan,
  customSizeBand,
  otherSizeClassById,
  sizeBandForLetter,
  type AircraftDimension,
  type CodeLetter,
} from '../../src/engine/size';
import { MAX_SIZE_M } from '../../src/engine/constants';
import { InputError } from '../../src/engine/errors';
import { expectInputError } from './expect-error';


describe('codeLetterForWingspan: ICAO Annex 14 Vol I, 8th ed. (2018), Table 1-1, bands exclude their upper value', () => {
  const cases: [number, CodeLetter][] = [
    [0.5, 'A'],
    [14.99, 'A'],
    [15, 'B'],
    [23.99, 'B'],
    [24, 'C'],
    [35.99, 'C'],
    [36, 'D'],
    [51.99, 'D'],
    [52, 'E'],
    [64.99, 'E'],
    [65, 'F'],
    [79.99, 'F'],
  ];
  for (const [span, letter] of cases) {
    it(`${span} m -> ${letter}`, () => expect(codeLetterForWingspan(span)).toBe(letter));
  }

  it('80 m and beyond throw, naming the wingspan', () => {
    expectInputError(() => codeLetterForWingspan(80), 'wingspan');
    expectInputError(() => codeLetterForWingspan(120), 'wingspan');
    expectInputError(() => codeLetterForWingspan(0), 'wingspan');
    expectInputError(() => codeLetterForWingspan(-3), 'wingspan');
    expectInputError(() => codeLetterForWingspan(NaN), 'wingspan');
  });

  it('exactly at each upper value the next letter starts (Table 1-1 "up to but not including")', () => {
    const letters: CodeLetter[] = ['A', 'B', 'C', 'D', 'E', 'F'];
    [15, 24, 36, 52, 65].forEach((edge, i) => {
      expect(codeLetterForWingspan(edge)).toBe(letters[i + 1]);
      expect(codeLetterForWingspan(edge - 1e-9)).toBe(letters[i]);
    });
  });

  it('property: the letter found is the one whose wingspan band holds the value', () => {
    fc.assert(
      fc.property(fc.double({ min: 8, max: 80, maxExcluded: true, noNaN: true }), (m) => {
        const band = sizeBandForLetter(codeLetterForWingspan(m), 'wingspan');
        expect(m >= band.lo && m < band.hi).toBe(true);
      }),
    );
  });

  it('property: any number either throws InputError or gives a letter', () => {
    fc.assert(
      fc.property(fc.oneof(fc.double({ min: -10, max: 100 }), fc.double()), (m) => {
        if (Number.isFinite(m) && m > 0 && m < 80) expect(['A', 'B', 'C', 'D', 'E', 'F']).toContain(codeLetterForWingspan(m));
        else expect(() => codeLetterForWingspan(m)).toThrow(InputError);
      }),
    );
  });
});

describe('CODE_LETTERS data', () => {
  it('wingspan bands are the Table 1-1 values (ICAO Annex 14 Vol I, 8th ed. (2018)); A starts at 8 m (common practice)', () => {
    const spans = CODE_LETTERS.map((c) => [c.letter, c.wingspan.lo, c.wingspan.hi]);
    expect(spans).toEqual([
      ['A', 8, 15],
      ['B', 15, 24],
      ['C', 24, 36],
      ['D', 36, 52],
      ['E', 52, 65],
      ['F', 65, 80],
    ]);
    for (const c of CODE_LETTERS) expect(c.wingspan.source).toContain('Annex 14');
    expect(sizeBandForLetter('A', 'wingspan').source).toContain('common practice');
  });

  it('length bands C 26-45, D 40-55, E 55-76, F 70-85 m are marked (from memory), as REFERENCES.md says', () => {
    // REFERENCES.md: typical fuselage lengths per letter are (from memory)
    const expected: Record<string, [number, number]> = { C: [26, 45], D: [40, 55], E: [55, 76], F: [70, 85] };
    for (const [letter, [lo, hi]] of Object.entries(expected)) {
      const b = sizeBandForLetter(letter as CodeLetter, 'length');
      expect([b.lo, b.hi]).toEqual([lo, hi]);
      expect(b.source).toContain('from memory');
    }
    expect(sizeBandForLetter('A', 'length').source).toContain('common practice');
    expect(sizeBandForLetter('B', 'length').source).toContain('common practice');
  });

  it('length bands overlap "length about wingspan +/- 15 %" for transport jets (common practice, REFERENCES.md)', () => {
    for (const letter of ['C', 'D', 'E', 'F'] as const) {
      const w = sizeBandForLetter(letter, 'wingspan');
      const l = sizeBandForLetter(letter, 'length');
      expect(l.hi).toBeGreaterThanOrEqual(w.lo * 0.85);
      expect(l.lo).toBeLessThanOrEqual(w.hi * 1.15);
    }
  });

  it('every band is ordered, positive and within MAX_SIZE_M; data are frozen', () => {
    expect(Object.isFrozen(CODE_LETTERS)).toBe(true);
    for (const c of CODE_LETTERS) {
      expect(Object.isFrozen(c)).toBe(true);
      for (const b of [c.wingspan, c.length]) {
        expect(Object.isFrozen(b)).toBe(true);
        expect(b.lo).toBeGreaterThan(0);
        expect(b.lo).toBeLessThan(b.hi);
        expect(b.hi).toBeLessThanOrEqual(MAX_SIZE_M);
        expect(b.source.length).toBeGreaterThan(0);
      }
    }
  });
});

describe('sizeBandForLetter', () => {
  it('returns the band for the dimension asked', () => {
    expect(sizeBandForLetter('D', 'wingspan')).toMatchObject({ lo: 36, hi: 52 });
    expect(sizeBandForLetter('D', 'length')).toMatchObject({ lo: 40, hi: 55 });
  });
  it('rejects an unknown letter or dimension, naming the field', () => {
    const e = expectInputError(() => sizeBandForLetter('G' as CodeLetter, 'wingspan'), 'code letter');
    expect(e.message).toContain('A, B, C, D, E, F');
    expectInputError(() => sizeBandForLetter('C', 'height' as AircraftDimension), 'dimension');
  });
});

describe('customSizeBand', () => {
  it('keeps a valid band and marks it as the user\'s', () => {
    expect(customSizeBand(30, 40)).toEqual({ lo: 30, hi: 40, source: 'user' });
    expect(customSizeBand(12, 12)).toEqual({ lo: 12, hi: 12, source: 'user' });
  });
  it('rejects 0, reversed, infinite and oversized bands, naming the field', () => {
    expectInputError(() => customSizeBand(0, 10), 'size (low end)');
    expectInputError(() => customSizeBand(5, MAX_SIZE_M + 1), 'size (high end)');
    expectInputError(() => customSizeBand(20, 10), 'size');
    expectInputError(() => customSizeBand(NaN, 10), 'size (low end)');
  });
  it('property: invalid pairs throw InputError, valid ones come back unchanged', () => {
    const n = fc.oneof(fc.double({ min: -1, max: MAX_SIZE_M + 1 }), fc.double());
    fc.assert(
      fc.property(n, n, (lo, hi) => {
        const ok = lo > 0 && lo <= MAX_SIZE_M && hi > 0 && hi <= MAX_SIZE_M && lo <= hi;
        if (ok) expect(customSizeBand(lo, hi)).toEqual({ lo, hi, source: 'user' });
        else expect(() => customSizeBand(lo, hi)).toThrow(InputError);
      }),
    );
  });
});

describe('OTHER_SIZE_CLASSES (common practice)', () => {
  it('has helicopter, small multirotor and balloon classes with ordered bands, each marked common practice', () => {
    const ids = OTHER_SIZE_CLASSES.map((c) => c.id);
    expect(new Set(ids).size).toBe(ids.length);
    for (const id of ['helicopter', 'small-multirotor', 'party-balloon', 'weather-balloon-low', 'weather-balloon-high']) {
      expect(ids).toContain(id);
    }
    for (const c of OTHER_SIZE_CLASSES) {
      expect(c.lo).toBeGreaterThan(0);
      expect(c.lo).toBeLessThan(c.hi);
      expect(c.hi).toBeLessThanOrEqual(MAX_SIZE_M);
      expect(c.source).toContain('common practice');
      expect(c.dimension.length).toBeGreaterThan(0);
      expect(Object.isFrozen(c)).toBe(true);
    }
    expect(otherSizeClassById('helicopter').dimension).toBe('main rotor diameter');
  });
  it('otherSizeClassById rejects unknown ids, listing the known ones', () => {
    const e = expectInputError(() => otherSizeClassById('saucer'), 'size class');
    expect(e.message).toContain('helicopter');
  });
});

import { describe, expect, it } from 'vitest';
import { defaultAssumptions, engineAssumptions } from '../../src/case/assumptions';
import type { CaseAssumptions, Mark } from '../../src/case/schema';
import { assumedDimension, dimensionMismatch, mismatchText } from '../../src/case/size-match';
import { analyseCase } from '../../src/case/analysis';
import { newCase, upsertMark, withAssumptions } from '../../src/case/marks';
import { summaryText } from '../../src/case/summary';

/*
 * Spans against the size they are divided into: range = size / (2 tan(angle / 2)) holds only when
 * the span and the size are the same dimension of the object (the engine's range from angular
 * size). Invented marks; the code letters' bands are ICAO Annex 14 Vol I Table 1-1 (wingspan).
 */
const mapping = { objectFit: 'fill', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };
const span = (id: string, dimension?: Mark['dimension'], t = 1): Mark => ({
  id,
  kind: 'object-span',
  t,
  points: [{ x: 300, y: 100 }, { x: 330, y: 101 }],
  edgeSigmaPx: 0.5,
  mapping,
  createdAt: 1,
  ...(dimension ? { dimension } : {}),
});
const landmark: Mark = { id: 'm', kind: 'landmark-span', t: 1, points: [{ x: 320, y: 120 }, { x: 320, y: 200 }], edgeSigmaPx: 0.5, mapping, createdAt: 1 };
const byLength = { ...defaultAssumptions(), sizeLabel: 'code letter C, length 26-45 m', objectSizeM: { lo: 26, hi: 45 }, sizeDimension: 'length' as const };

const byWingspanD = { ...defaultAssumptions(), sizeLabel: 'code letter D wingspan, 36-52 m', objectSizeM: { lo: 36, hi: 52 }, sizeDimension: 'wingspan' as const };

describe('the dimension an assumed size is', () => {
  it("a size the user chose says its dimension; the tool's default follows the marks, so it says none; a size that does not say is null", () => {
    expect(assumedDimension(byWingspanD)).toBe('wingspan');
    expect(assumedDimension(byLength)).toBe('length');
    expect(assumedDimension(undefined)).toBeNull();
    expect(assumedDimension(defaultAssumptions())).toBeNull();
    const typed = { ...defaultAssumptions(), sizeLabel: 'size given, 30 m' };
    delete typed.sizeDimension;
    expect(assumedDimension(typed)).toBeNull();
  });
});

describe('dimensionMismatch', () => {
  it('first use warns of nothing: the default size follows a span marked by length (issue 12, point 11)', () => {
    expect(dimensionMismatch([span('a', 'length')], undefined)).toBeNull();
    expect(dimensionMismatch([span('a', 'length')], defaultAssumptions())).toBeNull();
    // and the figures take the code letter's length band (REFERENCES.md, from memory), not its wingspan
    const a = engineAssumptions(defaultAssumptions(), [span('a', 'length')]);
    expect(a.objectSize).toEqual({ lo: 26, hi: 45 });
    expect(a.sizeLabel).toMatch(/length/);
    expect(engineAssumptions(undefined, [span('a', 'wingspan')]).objectSize).toEqual({ lo: 24, hi: 36 });
  });

  it('finds spans marked as a length against a wingspan the user chose, counting them', () => {
    expect(dimensionMismatch([span('a', 'length')], byWingspanD)).toEqual({ assumed: 'wingspan', marked: 'length', spans: 1, of: 1 });
    expect(dimensionMismatch([span('a', 'length'), span('b', 'wingspan', 2), landmark], byWingspanD)).toEqual({ assumed: 'wingspan', marked: 'length', spans: 1, of: 2 });
    expect(dimensionMismatch([span('a', 'wingspan'), span('b', 'wingspan', 2)], byLength)).toEqual({ assumed: 'length', marked: 'wingspan', spans: 2, of: 2 });
  });

  it('says nothing when they agree, when a span does not say, or when the size does not say', () => {
    expect(dimensionMismatch([span('a', 'wingspan')], undefined)).toBeNull();
    expect(dimensionMismatch([span('a', 'length')], byLength)).toBeNull();
    expect(dimensionMismatch([span('a'), span('b', 'other', 2), span('c', 'height', 3)], byLength)).toBeNull();
    const typed: CaseAssumptions = { ...byLength };
    delete typed.sizeDimension;
    expect(dimensionMismatch([span('a', 'wingspan')], typed)).toBeNull();
    expect(dimensionMismatch([landmark], undefined)).toBeNull();
  });

  it('puts it in one sentence naming both dimensions and how many spans', () => {
    expect(mismatchText({ assumed: 'wingspan', marked: 'length', spans: 1, of: 1 })).toBe(
      "The object's span is marked as its length, but the size assumed is a wingspan: the range from it is wrong until a size by length is chosen or the wingspan is marked.",
    );
    expect(mismatchText({ assumed: 'length', marked: 'wingspan', spans: 2, of: 3 })).toMatch(/^2 of the object's 3 spans are marked as its wingspan, but the size assumed is a length: the range from them/);
    expect(mismatchText({ assumed: 'length', marked: 'wingspan', spans: 3, of: 3 })).toMatch(/^All 3 of the object's spans are marked/);
  });

  it('reaches the analysis and the shared summary, beside the assumptions', () => {
    const video = { pageUrl: 'http://127.0.0.1/invented', pageTitle: 'invented', src: '', width: 640, height: 360, duration: 3 };
    let c = upsertMark(newCase('c', video, '0.1.0', 1), span('a', 'length'), 2);
    c = withAssumptions(c, byWingspanD, 3);
    const r = analyseCase(c, { draws: 500 });
    expect(r.dimensionMismatch).toContain('marked as its length, but the size assumed is a wingspan');
    const text = summaryText(c, r, { format: 'text', system: 'metric', toolVersion: '0.1.0' }).replace(/\s+/g, ' ');
    expect(text).toContain("Warning: The object's span is marked as its length, but the size assumed is a wingspan");
    // and nothing is said once the size is by length
    const fixed = withAssumptions(c, byLength, 4);
    const r2 = analyseCase(fixed, { draws: 500 });
    expect(r2.dimensionMismatch).toBeNull();
    expect(summaryText(fixed, r2, { format: 'text', system: 'metric', toolVersion: '0.1.0' })).not.toContain('Warning:');
  });
});

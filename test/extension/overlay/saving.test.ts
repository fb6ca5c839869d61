import { describe, expect, it } from 'vitest';
import { mergePending } from '../../../extension/overlay/saving';
import { newCase } from '../../../src/case/marks';
import type { CaseRecord, Mark } from '../../../src/case/schema';

/*
 * A stored version of the case arriving while a nudge waits for its save must not undo the nudge:
 * the mark being edited here is the user's latest word on it (the same rule as an editor keeping
 * unsaved changes over a reload from disk, common practice); every other mark is the stored one.
 */
const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };
const mark = (id: string, x: number): Mark => ({ id, kind: 'object-span', t: 1, points: [{ x, y: 10 }, { x: x + 50, y: 10 }], edgeSigmaPx: 0.5, mapping, createdAt: 1 });
const withMarks = (marks: Mark[]): CaseRecord => ({ ...newCase('c', { pageUrl: 'http://127.0.0.1/x', pageTitle: 'invented', src: '', width: 640, height: 360, duration: 2 }, '0.1.0', 1), marks });

describe('mergePending', () => {
  it('keeps the local version of the mark whose nudge is not saved yet, in its place', () => {
    const stored = withMarks([mark('a', 10), mark('b', 100)]);
    const local = withMarks([mark('a', 13), mark('b', 90)]);
    const merged = mergePending(stored, local, 'a');
    expect(merged.marks.map((m) => [m.id, m.points[0]!.x])).toEqual([['a', 13], ['b', 100]]);
  });

  it('adds the pending mark when the stored version does not hold it yet', () => {
    const merged = mergePending(withMarks([mark('b', 100)]), withMarks([mark('a', 13)]), 'a');
    expect(merged.marks.map((m) => m.id)).toEqual(['b', 'a']);
  });

  it('takes the stored version as it is when nothing waits, or the pending mark is gone here', () => {
    const stored = withMarks([mark('a', 10)]);
    expect(mergePending(stored, withMarks([mark('a', 13)]), null)).toBe(stored);
    expect(mergePending(stored, null, 'a')).toBe(stored);
    expect(mergePending(stored, withMarks([]), 'a')).toBe(stored);
  });
});

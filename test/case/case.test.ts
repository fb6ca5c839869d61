import { describe, expect, it } from 'vitest';
import { caseIdFor } from '../../src/case/ids';
import { newCase, removeMark, upsertMark } from '../../src/case/marks';
import type { Mark, VideoInfo } from '../../src/case/schema';
import { CaseFormatError, validateCase } from '../../src/case/validate';

const video: VideoInfo = { pageUrl: 'http://127.0.0.1:8000/plain.html', pageTitle: 'Invented clip', src: 'http://127.0.0.1:8000/a.webm', width: 640, height: 360, duration: 4 };
const mark = (id: string, x = 300): Mark => ({
  id,
  kind: 'object-span',
  t: 1.25,
  points: [{ x, y: 100 }, { x: x + 40, y: 101 }],
  edgeSigmaPx: 0.7,
  dimension: 'wingspan',
  mapping: { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 },
  createdAt: 1,
});

describe('case ids', () => {
  it('are stable for a page and media, ignore the fragment, and differ between videos', () => {
    const a = caseIdFor('http://x.test/p?q=1#t=5', 'http://x.test/v.webm');
    expect(a).toBe(caseIdFor('http://x.test/p?q=1', 'http://x.test/v.webm'));
    expect(a).toMatch(/^[0-9a-f]{16}$/);
    expect(a).not.toBe(caseIdFor('http://x.test/p?q=1', 'http://x.test/w.webm'));
    // a stream with no address is told apart by its index on the page
    expect(caseIdFor('http://x.test/p', '', 0)).not.toBe(caseIdFor('http://x.test/p', '', 1));
  });
});

describe('marks in a case', () => {
  it('upsert adds, then replaces by id, without touching the original', () => {
    const c0 = newCase('abc', video, '0.1.0', 10);
    const c1 = upsertMark(c0, mark('m1'), 11);
    const c2 = upsertMark(c1, mark('m1', 310), 12);
    expect(c0.marks).toHaveLength(0);
    expect(c1.marks[0]!.points[0]!.x).toBe(300);
    expect(c2.marks).toHaveLength(1);
    expect(c2.marks[0]!.points[0]!.x).toBe(310);
    expect(c2.updatedAt).toBe(12);
    expect(removeMark(c2, 'm1', 13).marks).toHaveLength(0);
    expect(c2.marks).toHaveLength(1);
  });
});

describe('validateCase', () => {
  const good = upsertMark(newCase('abc', video, '0.1.0', 10), mark('m1'), 11);

  it('accepts a well-formed case', () => {
    expect(validateCase(JSON.parse(JSON.stringify(good)))).toEqual(good);
  });

  it.each([
    ['schema', (c: any) => (c.schema = 99), 'case.schema'],
    ['video width', (c: any) => (c.video.width = 0), 'case.video.width'],
    ['mark kind', (c: any) => (c.marks[0].kind = 'banana'), 'case.marks[0].kind'],
    ['point count', (c: any) => c.marks[0].points.pop(), 'case.marks[0].points'],
    ['point coordinate', (c: any) => (c.marks[0].points[1].x = Number.NaN), 'case.marks[0].points[1].x'],
    ['edge sigma', (c: any) => (c.marks[0].edgeSigmaPx = -1), 'case.marks[0].edgeSigmaPx'],
    ['notes', (c: any) => (c.notes = 5), 'case.notes'],
  ])('rejects a bad %s, naming its path', (_name, spoil, path) => {
    const c = JSON.parse(JSON.stringify(good));
    spoil(c);
    try {
      validateCase(c);
      expect.unreachable('should have thrown');
    } catch (e) {
      expect(e).toBeInstanceOf(CaseFormatError);
      expect((e as CaseFormatError).path).toBe(path);
    }
  });
});

import { describe, expect, it } from 'vitest';
import { CASE_FILE_FORMAT, parseCaseFile, toCaseFile } from '../../src/case/casefile';
import { newCase, upsertMark } from '../../src/case/marks';
import { CaseFormatError } from '../../src/case/validate';

const c = upsertMark(
  newCase('abc123', { pageUrl: 'http://127.0.0.1/x', pageTitle: 'invented', src: '', width: 640, height: 360, duration: 3 }, '0.1.0', 1),
  { id: 'm1', kind: 'object-span', t: 1, points: [{ x: 1, y: 2 }, { x: 30, y: 2 }], edgeSigmaPx: 0.5, mapping: { objectFit: 'fill', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 }, createdAt: 2 },
  3,
);

const pathOf = (f: () => unknown) => {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(CaseFormatError);
    return (e as CaseFormatError).path;
  }
  throw new Error('did not throw');
};

describe('case files', () => {
  it('round-trip: what is exported is read back equal', () => {
    const text = JSON.stringify(toCaseFile(c, '0.1.0'));
    expect(JSON.parse(text).format).toBe(CASE_FILE_FORMAT);
    expect(parseCaseFile(text)).toEqual(c);
  });

  it('reject a bad file whole, naming the first bad field by its path', () => {
    expect(pathOf(() => parseCaseFile('{ not json'))).toBe('file');
    expect(pathOf(() => parseCaseFile(JSON.stringify({ format: 'something-else', case: c })))).toBe('file.format');
    const bad = JSON.parse(JSON.stringify(toCaseFile(c, '0.1.0')));
    bad.case.marks[0].points[1].x = 'far';
    expect(pathOf(() => parseCaseFile(JSON.stringify(bad)))).toBe('file.case.marks[0].points[1].x');
  });

  it('refuse absurd sizes before parsing', () => {
    expect(pathOf(() => parseCaseFile(' '.repeat(20 * 1024 * 1024 + 1)))).toBe('file');
  });
});

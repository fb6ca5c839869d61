import { describe, expect, it } from 'vitest';
import { newCase, withAnnotation } from '../../src/case/marks';
import { MAX_TAGS } from '../../src/case/schema';
import { CaseFormatError, normaliseTags, validateCase, validateNotes, validateStatus, validateTags } from '../../src/case/validate';

const video = { pageUrl: 'http://127.0.0.1:8000/plain.html', pageTitle: 'Invented clip', src: '', width: 640, height: 360, duration: 4 };
const base = newCase('0123456789abcdef', video, '0.1.0', 10);

const message = (f: () => unknown): string => {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(CaseFormatError);
    return (e as Error).message;
  }
  throw new Error('did not throw');
};

describe('annotations: status, tags, notes', () => {
  it('a new case is open, untagged, with no history, and valid', () => {
    expect(base).toMatchObject({ status: 'open', tags: [], history: [] });
    // valid: the validated copy (known fields only) holds exactly what was given
    expect(validateCase(base)).toStrictEqual(base);
  });

  it('withAnnotation sets only the fields given and leaves the original alone', () => {
    const a = withAnnotation(base, { status: 'explained' }, 20);
    expect(a).toMatchObject({ status: 'explained', tags: [], notes: '', updatedAt: 20 });
    const b = withAnnotation(a, { notes: 'invented note', tags: ['night'] }, 30);
    expect(b).toMatchObject({ status: 'explained', tags: ['night'], notes: 'invented note' });
    expect(base.status).toBe('open');
  });

  it('status: one of our three words, the message lists them', () => {
    expect(validateStatus('second-look', 'status')).toBe('second-look');
    expect(message(() => validateStatus('closed', 'status'))).toBe('status: expected one of open, explained, second-look, got "closed"');
  });

  it('tags from a user: trimmed, blanks and repeats dropped, first spelling kept', () => {
    expect(normaliseTags(['  night ', 'night', '', '   ', 'drone', 'Night'])).toEqual(['night', 'drone', 'Night']);
  });

  it('tags: each 1 to 40 characters, at most 20, naming the tag', () => {
    expect(message(() => normaliseTags(['ok', 'x'.repeat(41)]))).toBe('tags[1]: expected 1 to 40 characters, got 41');
    // 40 characters counted as a reader counts them: astral characters are one each
    expect(normaliseTags(['\u{1F6E9}'.repeat(40)])).toHaveLength(1);
    expect(message(() => normaliseTags(Array.from({ length: MAX_TAGS + 1 }, (_, i) => `t${i}`)))).toBe('tags: expected at most 20 tags, got 21');
    expect(message(() => normaliseTags(['a', 5]))).toBe('tags[1]: expected text');
    expect(message(() => normaliseTags('a,b'))).toBe('tags: expected a list');
  });

  it('stored tags must already be trimmed and distinct', () => {
    expect(message(() => validateTags([' a'], 'case.tags'))).toBe('case.tags[0]: expected no spaces at either end');
    expect(message(() => validateTags(['a', 'a'], 'case.tags'))).toBe('case.tags[1]: "a" is already a tag of this case');
  });

  it('notes: at most 20 000 characters', () => {
    expect(validateNotes('n'.repeat(20_000), 'notes')).toHaveLength(20_000);
    expect(message(() => validateNotes('n'.repeat(20_001), 'notes'))).toBe('notes: expected 0 to 20000 characters, got 20001');
    expect(message(() => validateNotes(null, 'notes'))).toBe('notes: expected text');
  });

  it('a record with a bad status or tag is refused, naming its path', () => {
    expect(message(() => validateCase({ ...base, status: 'done' }))).toContain('case.status:');
    expect(message(() => validateCase({ ...base, tags: ['a', ''] }))).toBe('case.tags[1]: expected 1 to 40 characters, got 0');
    expect(message(() => validateCase({ ...base, history: {} }))).toBe('case.history: expected a list');
  });

  it('history: versions of this case only, without their own history', () => {
    const { history: _h, ...body } = base;
    const ok = { ...base, history: [{ ...body, keptAt: 5 }] };
    expect(validateCase(ok)).toStrictEqual(ok);
    expect(message(() => validateCase({ ...base, history: [{ ...body, id: 'another', keptAt: 5 }] }))).toBe(
      "case.history[0].id: expected the case's own id 0123456789abcdef, got another",
    );
    expect(message(() => validateCase({ ...base, history: [{ ...body }] }))).toBe('case.history[0].keptAt: expected a finite number');
    expect(message(() => validateCase({ ...base, history: [{ ...base, keptAt: 5 }] }))).toBe('case.history[0].history: an earlier version holds no history of its own');
  });
});

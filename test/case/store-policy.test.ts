import { describe, expect, it } from 'vitest';
import { listingOf, siteOf } from '../../src/case/catalog';
import { utf8Length } from '../../src/case/casefile';
import { newCase, upsertMark, withAnnotation } from '../../src/case/marks';
import { readCaseRecord } from '../../src/case/migrate';
import {
  addedBytes,
  checkFits,
  dueSeek,
  SEEK_WAIT_MS,
  itemBytes,
  NEAR_LIMIT_SHARE,
  quarantineEntry,
  quarantineKeyFor,
  quarantineRecord,
  StorageFullError,
  usageOf,
} from '../../src/case/store-policy';

const video = { pageUrl: 'http://127.0.0.1:8000/plain.html?x=1', pageTitle: 'Invented clip', src: '', width: 640, height: 360, duration: 4 };
const mapping = { objectFit: 'fill', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };

describe('quarantine, the pure part', () => {
  it('keeps the stored value whole under quarantine:<key>, with the first bad field and its path', () => {
    const raw = { schema: 2, id: 'abc', video: { ...video, width: -4 } };
    let err: unknown;
    try {
      readCaseRecord(raw);
    } catch (e) {
      err = e;
    }
    const q = quarantineRecord('case:abc', raw, err, 1234);
    expect(quarantineKeyFor('case:abc')).toBe('quarantine:case:abc');
    expect(q).toEqual({ key: 'case:abc', reason: 'case.video.width: expected 1 to 20000, got -4', quarantinedAt: 1234, raw });
    expect(q.raw).toBe(raw); // the very value, not a copy that could drop anything
    expect(quarantineEntry('quarantine:case:abc', q)).toEqual({ key: 'case:abc', quarantineKey: 'quarantine:case:abc', reason: q.reason, quarantinedAt: 1234 });
  });

  it('an error that is not a format error still gives a reason', () => {
    expect(quarantineRecord('case:x', 1, new RangeError('boom'), 0).reason).toBe('unreadable (boom)');
    // something under a quarantine key that we did not write still lists
    expect(quarantineEntry('quarantine:case:y', 'junk')).toEqual({ key: 'case:y', quarantineKey: 'quarantine:case:y', reason: 'no reason recorded', quarantinedAt: 0 });
  });
});

describe('weighing writes against the quota', () => {
  it('UTF-8 length agrees with Node’s Buffer.byteLength (a general-purpose library)', () => {
    for (const s of ['', 'abc', 'é', '€', '\u{1F6E9}', 'a\u{1F6E9}é€\n"', '\ud800x', 'x\udc00']) expect(utf8Length(s), JSON.stringify(s)).toBe(Buffer.byteLength(s, 'utf8'));
  });

  it('an item weighs its key plus its JSON, in UTF-8 bytes', () => {
    expect(itemBytes('k', { a: 'é' })).toBe(1 + Buffer.byteLength('{"a":"é"}'));
  });

  it('a replaced item counts only what it adds; a shrink adds nothing', () => {
    const old = { 'case:a': { s: 'x'.repeat(100) } };
    expect(addedBytes({ 'case:a': { s: 'x'.repeat(150) } }, old)).toBe(50);
    expect(addedBytes({ 'case:a': { s: 'x' } }, old)).toBe(0);
    expect(addedBytes({ 'case:b': 1 }, old)).toBe('case:b'.length + 1);
  });

  it('a write that does not fit fails with a message naming the case and the sizes', () => {
    expect(() => checkFits('case abc', 100, 900, 1000)).not.toThrow();
    try {
      checkFits('case abc (Invented clip)', 101, 900, 1000);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(StorageFullError);
      expect((e as Error).message).toMatch(/^case abc \(Invented clip\): not saved, storage is full: it needs 101 more bytes but only 100 of 1000 are free\./);
      expect((e as Error).message).toContain('Everything saved before is kept');
    }
    // a write that adds nothing always fits, even past the quota (it cannot make things worse)
    expect(() => checkFits('case abc', 0, 2000, 1000)).not.toThrow();
  });

  it('near the limit past 90 % of the quota', () => {
    expect(NEAR_LIMIT_SHARE).toBe(0.9);
    expect(usageOf(900, 1000)).toEqual({ bytesInUse: 900, quotaBytes: 1000, nearLimit: false });
    expect(usageOf(901, 1000).nearLimit).toBe(true);
  });
});

describe('a case as a line of the log', () => {
  it('carries what the list shows and searches, without the marks', () => {
    let c = newCase('0123456789abcdef', video, '0.1.0', 10);
    c = upsertMark(c, { id: 'm1', kind: 'object-span', t: 2, points: [{ x: 1, y: 1 }, { x: 5, y: 1 }], edgeSigmaPx: 0.5, mapping, by: 'invented reviewer', createdAt: 11 }, 11);
    c = upsertMark(c, { id: 'm2', kind: 'lane-dash', t: 0.5, points: [{ x: 1, y: 1 }], edgeSigmaPx: 0.5, mapping, createdAt: 12 }, 12);
    c = upsertMark(c, { id: 'm3', kind: 'landmark-span', t: 2, points: [{ x: 1, y: 1 }, { x: 1, y: 9 }], edgeSigmaPx: 0.5, mapping, by: 'invented reviewer', createdAt: 13 }, 13);
    c = withAnnotation(c, { status: 'second-look', tags: ['night'], notes: 'invented' }, 14);
    expect(listingOf(c)).toEqual({
      id: '0123456789abcdef',
      pageUrl: video.pageUrl,
      pageTitle: 'Invented clip',
      site: '127.0.0.1:8000',
      createdAt: 10,
      updatedAt: 14,
      status: 'second-look',
      tags: ['night'],
      notes: 'invented',
      markCount: 3,
      timestamps: [0.5, 2],
      markedBy: ['invented reviewer'],
      historyCount: 0,
    });
  });

  it('site is the host (WHATWG URL), or empty for an address without one', () => {
    expect(siteOf('https://example.org:8443/a?b#c')).toBe('example.org:8443');
    expect(siteOf('not a url')).toBe('');
    expect(siteOf('')).toBe('');
  });
});

describe('a seek waiting for the overlay', () => {
  it('is due until SEEK_WAIT_MS has passed, and a malformed one never is', () => {
    expect(dueSeek({ t: 2.5, requestedAt: 1000 }, 1000 + SEEK_WAIT_MS)).toBe(2.5);
    expect(dueSeek({ t: 2.5, requestedAt: 1000 }, 1001 + SEEK_WAIT_MS)).toBeNull();
    expect(dueSeek({ t: 2.5, requestedAt: 5000 }, 1000)).toBeNull(); // from the future: a clock change
    for (const bad of [undefined, null, 3, { t: '2', requestedAt: 1 }, { t: 2 }]) expect(dueSeek(bad, 1)).toBeNull();
  });
});

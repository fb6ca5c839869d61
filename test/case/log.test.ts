import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { InputError } from '../../src/engine/errors';
import type { CaseListing } from '../../src/case/listing';
import { CASE_STATUSES, type CaseRecord, type CaseStatus, type Mark } from '../../src/case/schema';
import {
  DEFAULT_QUERY,
  applyQuery,
  distinctSites,
  distinctTags,
  matchesQuery,
  parseDay,
  parseDayRange,
  parseTags,
  checkNotes,
  headlineKey,
  marksByTimestamp,
  openableUrl,
  LruCache,
  searchWords,
  sortCases,
  visibleRows,
  type LogQuery,
  type SortKey,
} from '../../src/case/log';
import { HEADLINE_DRAWS, caseHeadline, headlineOf, headlineText } from '../../src/case/headline';
import { analyseCase } from '../../src/case/analysis';
import { validateTags } from '../../src/case/validate';
import { newCase, upsertMark, withAssumptions } from '../../src/case/marks';
import { defaultAssumptions } from '../../src/case/assumptions';

/* Invented listings: made-up titles, example.test addresses (RFC 2606 reserves .test), made-up names. */
function listing(over: Partial<CaseListing> & { id: string }): CaseListing {
  return {
    pageUrl: `https://clips.example.test/watch/${over.id}`,
    pageTitle: `Invented clip ${over.id}`,
    site: 'clips.example.test',
    createdAt: 1_000,
    updatedAt: 2_000,
    status: 'open',
    tags: [],
    notes: '',
    markCount: 0,
    timestamps: [],
    markedBy: [],
    historyCount: 0,
    ...over,
  };
}

const SAMPLE: CaseListing[] = [
  listing({ id: 'a', pageTitle: 'Hovering light over the ridge', notes: 'Seems to stand still above a mast', tags: ['night', 'hover'], markedBy: ['Moderator Kestrel'], status: 'open', createdAt: 10, updatedAt: 50 }),
  listing({ id: 'b', pageTitle: 'Backwards jet from the motorway', site: 'video.example.test', pageUrl: 'https://video.example.test/v/77', tags: ['backwards'], status: 'explained', createdAt: 20, updatedAt: 40 }),
  listing({ id: 'c', pageTitle: 'clip 10', notes: 'second reviewer wanted', tags: ['Night'], markedBy: ['Reviewer Wren'], status: 'second-look', createdAt: 30, updatedAt: 30 }),
  listing({ id: 'd', pageTitle: 'clip 2', pageUrl: 'file:///home/invented/clip.mp4', site: '', status: 'open', createdAt: 40, updatedAt: 20 }),
];
const q = (over: Partial<LogQuery>): LogQuery => ({ ...DEFAULT_QUERY, ...over });
const ids = (cs: CaseListing[]) => cs.map((c) => c.id);

describe('search', () => {
  it('splits on any whitespace and lower-cases; blank gives no words', () => {
    expect(searchWords('  Night\tHOVER \n')).toEqual(['night', 'hover']);
    expect(searchWords('   ')).toEqual([]);
  });

  it('looks in title, address, site, notes, tags and marked-by names, case-insensitive', () => {
    expect(ids(applyQuery(SAMPLE, q({ text: 'RIDGE' })))).toEqual(['a']); // title
    expect(ids(applyQuery(SAMPLE, q({ text: '/v/77' })))).toEqual(['b']); // address
    expect(ids(applyQuery(SAMPLE, q({ text: 'video.example' })))).toEqual(['b']); // site (also in its address)
    expect(ids(applyQuery(SAMPLE, q({ text: 'mast' })))).toEqual(['a']); // notes
    expect(ids(applyQuery(SAMPLE, q({ text: 'backwards', sort: 'created', descending: false })))).toEqual(['b']); // tag and title
    expect(ids(applyQuery(SAMPLE, q({ text: 'wren' })))).toEqual(['c']); // marked by
  });

  it('every word must match, in any field', () => {
    expect(ids(applyQuery(SAMPLE, q({ text: 'night kestrel' })))).toEqual(['a']);
    expect(ids(applyQuery(SAMPLE, q({ text: 'night nobody' })))).toEqual([]);
  });

  it('a word does not match across two fields', () => {
    // title ends "ridge", notes start "Seems": joined without a separator they would read "ridgeseems"
    expect(applyQuery(SAMPLE, q({ text: 'ridgeseems' }))).toEqual([]);
  });

  it('property: adding a word never widens the result (all words must match)', () => {
    const word = fc.stringMatching(/^[a-z]{1,4}$/);
    fc.assert(
      fc.property(fc.array(word, { maxLength: 3 }), word, (words, extra) => {
        const before = new Set(ids(applyQuery(SAMPLE, q({ text: words.join(' ') }))));
        const after = ids(applyQuery(SAMPLE, q({ text: [...words, extra].join(' ') })));
        return after.every((id) => before.has(id));
      }),
    );
  });
});

describe('filters', () => {
  it('status: empty keeps all, else only those listed', () => {
    expect(applyQuery(SAMPLE, q({}))).toHaveLength(4);
    expect(ids(applyQuery(SAMPLE, q({ statuses: ['second-look'] })))).toEqual(['c']);
    expect(ids(applyQuery(SAMPLE, q({ statuses: ['open', 'explained'], sort: 'created', descending: false })))).toEqual(['a', 'b', 'd']);
  });

  it('tag and site match exactly', () => {
    expect(ids(applyQuery(SAMPLE, q({ tag: 'night' })))).toEqual(['a']);
    expect(ids(applyQuery(SAMPLE, q({ tag: 'Night' })))).toEqual(['c']);
    expect(ids(applyQuery(SAMPLE, q({ site: 'video.example.test' })))).toEqual(['b']);
  });

  it('date range is inclusive at both ends, on the chosen date', () => {
    expect(ids(applyQuery(SAMPLE, q({ dateField: 'createdAt', from: 20, to: 30, sort: 'created', descending: false })))).toEqual(['b', 'c']);
    expect(ids(applyQuery(SAMPLE, q({ dateField: 'updatedAt', from: 40, to: null, sort: 'created', descending: false })))).toEqual(['a', 'b']);
  });

  it('offers each tag and site once, sorted; an address without a host offers no site', () => {
    expect(distinctTags(SAMPLE)).toEqual(['backwards', 'hover', 'night', 'Night']);
    expect(distinctSites(SAMPLE)).toEqual(['clips.example.test', 'video.example.test']);
  });

  it('property: the result is exactly the cases that pass every filter, none lost, none added', () => {
    const arbListing = fc.record({
      id: fc.uuid(),
      status: fc.constantFrom(...CASE_STATUSES),
      tags: fc.subarray(['x', 'y', 'z']),
      site: fc.constantFrom('', 'one.example.test', 'two.example.test'),
      createdAt: fc.integer({ min: 0, max: 100 }),
      updatedAt: fc.integer({ min: 0, max: 100 }),
    });
    const arbQuery = fc.record({
      statuses: fc.subarray([...CASE_STATUSES]),
      tag: fc.constantFrom(null, 'x', 'y'),
      site: fc.constantFrom(null, 'one.example.test'),
      from: fc.option(fc.integer({ min: 0, max: 100 })),
      to: fc.option(fc.integer({ min: 0, max: 100 })),
      dateField: fc.constantFrom('createdAt' as const, 'updatedAt' as const),
      sort: fc.constantFrom<SortKey>('updated', 'created', 'title', 'site', 'status'),
      descending: fc.boolean(),
    });
    fc.assert(
      fc.property(fc.array(arbListing, { maxLength: 30 }), arbQuery, (raw, qq) => {
        const cases = raw.map((r) => listing(r));
        const query = q(qq);
        const got = applyQuery(cases, query);
        // an independent restatement of each filter
        const want = cases.filter(
          (c) =>
            (qq.statuses.length === 0 || qq.statuses.includes(c.status)) &&
            (qq.tag === null || c.tags.includes(qq.tag)) &&
            (qq.site === null || c.site === qq.site) &&
            (qq.from === null || c[qq.dateField] >= qq.from) &&
            (qq.to === null || c[qq.dateField] <= qq.to),
        );
        expect(new Set(got)).toEqual(new Set(want));
        expect(got).toHaveLength(want.length);
        got.forEach((c) => expect(matchesQuery(c, query)).toBe(true));
      }),
    );
  });
});

describe('sort', () => {
  it('by updated, newest first by default', () => {
    expect(ids(applyQuery(SAMPLE, DEFAULT_QUERY))).toEqual(['a', 'b', 'c', 'd']);
  });

  it('by title as people read it: case aside, numbers by value ("clip 2" before "clip 10")', () => {
    expect(ids(sortCases(SAMPLE, 'title', false))).toEqual(['b', 'd', 'c', 'a']);
  });

  it('by status in the listed order: open, explained, needs a second look', () => {
    expect(sortCases(SAMPLE, 'status', false).map((c) => c.status)).toEqual(['open', 'open', 'explained', 'second-look']);
  });

  it('rejects an unknown sort key, naming the field and the allowed keys', () => {
    expect(() => sortCases(SAMPLE, 'colour' as SortKey, false)).toThrow(/sort: got "colour"; allowed: updated, created, title, site, status/);
  });

  it('property: stable in both directions (ties keep their input order), and a permutation of the input', () => {
    const arb = fc.array(fc.record({ status: fc.constantFrom<CaseStatus>(...CASE_STATUSES), updatedAt: fc.integer({ min: 0, max: 3 }) }), { maxLength: 40 });
    fc.assert(
      fc.property(arb, fc.constantFrom<SortKey>('updated', 'status', 'site'), fc.boolean(), (raw, key, desc) => {
        const cases = raw.map((r, i) => listing({ id: String(i), ...r }));
        const sorted = sortCases(cases, key, desc);
        expect(sorted.map((c) => c.id).sort()).toEqual(cases.map((c) => c.id).sort());
        const keyOf = (c: CaseListing) => (key === 'updated' ? c.updatedAt : key === 'status' ? CASE_STATUSES.indexOf(c.status) : c.site);
        for (let i = 1; i < sorted.length; i++) {
          const a = sorted[i - 1]!;
          const b = sorted[i]!;
          const ka = keyOf(a);
          const kb = keyOf(b);
          if (ka === kb) expect(Number(a.id)).toBeLessThan(Number(b.id));
          else expect(desc ? ka > kb : ka < kb).toBe(true);
        }
      }),
    );
  });

  it('does not reorder the array it was given', () => {
    const copy = SAMPLE.slice();
    sortCases(SAMPLE, 'title', true);
    expect(SAMPLE).toEqual(copy);
  });
});

describe('date fields', () => {
  // 2026-03-01T00:00:00Z is 1772323200000 ms: Unix time counts 86 400 s a day (POSIX.1 "Seconds Since the Epoch")
  const MARCH_1_2026 = 1_772_323_200_000;

  it('a day is its first millisecond, or its last for the end of a range, in UTC at offset 0', () => {
    expect(parseDay('2026-03-01', 'from date', false, 0)).toBe(MARCH_1_2026);
    expect(parseDay('2026-03-01', 'to date', true, 0)).toBe(MARCH_1_2026 + 86_400_000 - 1);
    expect(parseDay('2026-03-01', 'from date', false, 0)).toBe(Date.parse('2026-03-01T00:00:00Z')); // ECMA-262 Date Time String Format
  });

  it('follows the time zone: getTimezoneOffset -60 (UTC+1) starts the day an hour earlier in UTC', () => {
    expect(parseDay('2026-03-01', 'from date', false, -60)).toBe(MARCH_1_2026 - 3_600_000);
    expect(parseDay('2026-03-01', 'from date', false, 300)).toBe(Date.parse('2026-03-01T00:00:00-05:00'));
  });

  it('blank leaves that side open', () => {
    expect(parseDay('  ', 'from date', false, 0)).toBeNull();
    expect(parseDayRange('', '', 0)).toEqual({ from: null, to: null });
  });

  it('rejects a malformed or impossible day, naming the field and the allowed form', () => {
    expect(() => parseDay('1/3/2026', 'from date', false, 0)).toThrow(/from date: got "1\/3\/2026"; allowed: a date as YYYY-MM-DD/);
    // 2026 is not a leap year (Gregorian rule: divisible by 4, not by 100 unless by 400)
    expect(() => parseDay('2026-02-29', 'to date', true, 0)).toThrow(InputError);
    expect(parseDay('2024-02-29', 'to date', false, 0)).toBe(Date.parse('2024-02-29T00:00:00Z'));
    expect(() => parseDay('2026-13-01', 'from date', false, 0)).toThrow(/from date/);
    expect(() => parseDay('1969-12-31', 'from date', false, 0)).toThrow(/1970-01-01 to 9999-12-31/);
  });

  it('rejects an end before the start, at the end field', () => {
    expect(() => parseDayRange('2026-03-02', '2026-03-01', 0)).toThrow(/to date: .*on or after the from date \(2026-03-02\)/);
    expect(parseDayRange('2026-03-01', '2026-03-01', 0)).toEqual({ from: MARCH_1_2026, to: MARCH_1_2026 + 86_399_999 });
  });
});

describe('tags as typed', () => {
  it('comma-separated, trimmed, blanks dropped, each once regardless of case (first spelling kept)', () => {
    expect(parseTags(' night , hover,, Night ,  slow   pass ')).toEqual(['night', 'hover', 'slow pass']);
    expect(parseTags('')).toEqual([]);
  });

  it('notes over the stored limit are refused at the notes field; up to it they pass unchanged', () => {
    expect(checkNotes('x'.repeat(20_000))).toHaveLength(20_000);
    expect(() => checkNotes('x'.repeat(20_001))).toThrow(/notes: got "20001 characters"; allowed: at most 20000 characters/);
  });

  it('what parseTags gives passes the store’s own tag validation', () => {
    fc.assert(
      fc.property(fc.array(fc.string({ maxLength: 12 }), { maxLength: 25 }), (raw) => {
        const text = raw.join(',');
        let tags: string[];
        try {
          tags = parseTags(text);
        } catch (e) {
          expect(e).toBeInstanceOf(InputError);
          return;
        }
        expect(validateTags(tags, 'tags')).toEqual(tags);
      }),
    );
  });

  it('rejects a tag too long or too many tags, naming the field and the limit', () => {
    expect(() => parseTags('x'.repeat(41))).toThrow(/tags: .*allowed: tags of 1 to 40 characters/);
    expect(() => parseTags(Array.from({ length: 21 }, (_, i) => `t${i}`).join(','))).toThrow(/tags: got "21 tags"; allowed: at most 20 tags/);
  });
});

describe('virtual list window', () => {
  it('at the top: the rows that meet the viewport plus overscan below', () => {
    // 1000 rows of 40 px in a 400 px viewport: rows 0-9 are seen
    expect(visibleRows({ rowHeight: 40, viewportHeight: 400, scrollTop: 0, count: 1000, overscan: 3 })).toEqual({ start: 0, end: 13, offsetTop: 0, totalHeight: 40_000 });
  });

  it('mid-list with a partly seen row at each edge', () => {
    // scrollTop 1010: row 25 (1000-1040) is partly seen at the top, row 35 (1400-1440) at the bottom
    expect(visibleRows({ rowHeight: 40, viewportHeight: 400, scrollTop: 1010, count: 1000, overscan: 2 })).toEqual({ start: 23, end: 38, offsetTop: 920, totalHeight: 40_000 });
  });

  it('a scroll position past the end (the list just shrank) draws the last rows', () => {
    expect(visibleRows({ rowHeight: 40, viewportHeight: 400, scrollTop: 39_000, count: 5, overscan: 1 })).toEqual({ start: 0, end: 5, offsetTop: 0, totalHeight: 200 });
  });

  it('an empty list draws nothing', () => {
    expect(visibleRows({ rowHeight: 40, viewportHeight: 400, scrollTop: 0, count: 0, overscan: 5 })).toEqual({ start: 0, end: 0, offsetTop: 0, totalHeight: 0 });
  });

  it('rejects bad input naming the field and the allowed range', () => {
    expect(() => visibleRows({ rowHeight: 0, viewportHeight: 400, scrollTop: 0, count: 1, overscan: 0 })).toThrow(/row height: got 0; allowed: a finite number above 0/);
    expect(() => visibleRows({ rowHeight: 40, viewportHeight: Number.NaN, scrollTop: 0, count: 1, overscan: 0 })).toThrow(/viewport height: got NaN/);
    expect(() => visibleRows({ rowHeight: 40, viewportHeight: 400, scrollTop: -1, count: 1, overscan: 0 })).toThrow(/scroll top/);
    expect(() => visibleRows({ rowHeight: 40, viewportHeight: 400, scrollTop: 0, count: 1.5, overscan: 0 })).toThrow(/row count: got 1.5; allowed: a whole number/);
  });

  it('property: every row that meets the viewport is drawn, and no more than overscan beyond it on either side', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 200 }),
        fc.integer({ min: 0, max: 2000 }),
        fc.integer({ min: 0, max: 5000 }),
        fc.integer({ min: 0, max: 1000 }),
        fc.integer({ min: 0, max: 10 }),
        (rowHeight, viewportHeight, scrollTop, count, overscan) => {
          const w = visibleRows({ rowHeight, viewportHeight, scrollTop, count, overscan });
          expect(0 <= w.start && w.start <= w.end && w.end <= count).toBe(true);
          expect(w.offsetTop).toBe(w.start * rowHeight);
          expect(w.totalHeight).toBe(count * rowHeight);
          const top = Math.min(scrollTop, Math.max(0, count * rowHeight - viewportHeight));
          // brute force: rows whose span [i h, (i+1) h) meets [top, top + viewport)
          const seen: number[] = [];
          for (let i = 0; i < count; i++) if (i * rowHeight < top + viewportHeight && (i + 1) * rowHeight > top) seen.push(i);
          for (const i of seen) expect(i >= w.start && i < w.end).toBe(true);
          if (seen.length > 0) {
            expect(seen[0]! - w.start).toBeLessThanOrEqual(overscan);
            expect(w.end - 1 - seen[seen.length - 1]!).toBeLessThanOrEqual(overscan);
          }
        },
      ),
    );
  });
});

/* Headlines: an invented case, marks placed by the pinhole projection below. */
const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 1280, height: 720 }, scale: 1, devicePixelRatio: 1 };
function span(id: string, kind: Mark['kind'], t: number, x1: number, x2: number): Mark {
  return { id, kind, t, points: [{ x: x1, y: 300 }, { x: x2, y: 300 }], edgeSigmaPx: 0.3, mapping, createdAt: 1 };
}
function invented(marks: Mark[], narrow = true): CaseRecord {
  let c = newCase('h1', { pageUrl: 'https://clips.example.test/watch/h1', pageTitle: 'Invented headline case', src: '', width: 1280, height: 720, duration: 10 }, '0.1.0', 1);
  for (const m of marks) c = upsertMark(c, m, 2);
  if (narrow) c = withAssumptions(c, { ...defaultAssumptions(), cameraLabel: 'given', hfovDeg: { lo: 49.9, hi: 50.1 }, sizeLabel: 'given', objectSizeM: { lo: 29.9, hi: 30.1 } }, 3);
  return c;
}

describe('headline figure', () => {
  it('no marks: no figure, and the text says so', () => {
    const c = invented([]);
    expect(caseHeadline(c)).toBeNull();
    expect(headlineText(null, 'metric', 'not enough marks')).toBe('not enough marks');
  });

  it('one object span: the range, matching the pinhole formula R = L / (2 tan(theta/2)), with its interval', () => {
    // a centred span of 40 px in a 1280 px frame with a 50 deg field: f = 640 / tan(25 deg) and
    // theta = 2 atan(20 / f) (pinhole camera, DESIGN.md "Methods"); L = 30 m broadside
    const f = 640 / Math.tan((25 * Math.PI) / 180);
    const theta = 2 * Math.atan(20 / f);
    const expected = 30 / (2 * Math.tan(theta / 2));
    const h = caseHeadline(invented([span('o1', 'object-span', 1.2, 620, 660)]));
    expect(h).not.toBeNull();
    expect(h!.label).toBe('range at 1.200 s');
    expect(h!.quantity).toBe('distance');
    expect(h!.estimate.median).toBeGreaterThan(expected * 0.98);
    expect(h!.estimate.median).toBeLessThan(expected * 1.02);
    expect(h!.estimate.p05).toBeLessThan(h!.estimate.median);
    expect(h!.estimate.p95).toBeGreaterThan(h!.estimate.median);
    const text = headlineText(h, 'metric', 'not enough marks');
    expect(text).toMatch(/^range at 1\.200 s: .+ \(.+-.+, 5-95 %\)$/);
  });

  it('at the log’s draw count, the median agrees with the full 20 000-draw run within 2 %', () => {
    const c = invented([span('o1', 'object-span', 1.2, 600, 680)], false);
    const full = analyseCase(c).timestamps[0]!.result.range.median;
    const quick = caseHeadline(c)!.estimate.median;
    expect(HEADLINE_DRAWS).toBeLessThan(20_000);
    expect(Math.abs(quick - full) / full).toBeLessThan(0.02);
  });

  it('prefers the implied speed when a landmark and the observer speed give one; shown as a magnitude', () => {
    // an upright landmark under the object's centre, its foot lower in the picture
    const mast = { ...span('l1', 'landmark-span', 1, 640, 640), points: [{ x: 640, y: 520 }, { x: 640, y: 420 }] };
    let c = invented([span('o1', 'object-span', 1, 620, 660), mast]);
    c = withAssumptions(c, { ...c.assumptions!, landmarkSizeM: { lo: 10, hi: 12 }, observerSpeedMs: { lo: 24, hi: 26 } }, 4);
    const h = caseHeadline(c)!;
    expect(h.quantity).toBe('speed');
    expect(h.label).toBe('object speed from the landmark at 1.000 s');
    // the same figure the analysis reads as the landmark's: |w| of the signed implied speed
    expect(h.estimate).toEqual(analyseCase(c, { draws: HEADLINE_DRAWS, seriesDraws: 200, trackDraws: 200 }).readings.find((x) => x.basis === 'landmark')!.speed);
    expect(h.estimate.p05).toBeGreaterThanOrEqual(0);
    expect(h.estimate.p05).toBeLessThanOrEqual(h.estimate.median);
    expect(h.estimate.median).toBeLessThanOrEqual(h.estimate.p95);
  });

  it('with three or more timestamps and no speed: the fit’s closest approach', () => {
    const c = invented([span('o1', 'object-span', 0, 630, 650), span('o2', 'object-span', 1, 620, 660), span('o3', 'object-span', 2, 630, 650)]);
    const r = analyseCase(c, { draws: 500, seriesDraws: 100 });
    const h = headlineOf(r);
    expect(r.series).not.toBeNull();
    expect(h!.label).toBe('closest approach');
    expect(h!.estimate).toEqual(r.series!.closestApproach);
  });

  it('the cache key changes with every saved edit, so an edited case is recomputed', () => {
    expect(headlineKey('abc', 1)).not.toBe(headlineKey('abc', 2));
    expect(headlineKey('abc', 1)).toBe(headlineKey('abc', 1));
  });
});

describe('who marked what', () => {
  it('groups marks by timestamp, ascending, each kind and name once; unnamed marks add no name', () => {
    const marks = [
      span('a', 'object-span', 2, 600, 640),
      { ...span('b', 'landmark-span', 1, 500, 560), by: 'Reviewer Wren' },
      { ...span('c', 'object-span', 1, 600, 640), by: ' Moderator Kestrel ' },
      { ...span('d', 'object-span', 1, 601, 641), by: 'Reviewer Wren' },
    ];
    expect(marksByTimestamp(marks)).toEqual([
      { t: 1, kinds: ['landmark-span', 'object-span'], by: ['Reviewer Wren', 'Moderator Kestrel'] },
      { t: 2, kinds: ['object-span'], by: [] },
    ]);
    expect(marksByTimestamp([])).toEqual([]);
  });
});

describe('opening a case’s page', () => {
  it('opens web and file addresses (WHATWG URL parsing), refuses script, data and relative ones naming the field', () => {
    expect(openableUrl('https://clips.example.test/watch/1?t=2')).toBe('https://clips.example.test/watch/1?t=2');
    expect(openableUrl('http://127.0.0.1:8080/plain.html')).toBe('http://127.0.0.1:8080/plain.html');
    expect(openableUrl('file:///home/invented/clip.webm')).toBe('file:///home/invented/clip.webm');
    expect(() => openableUrl('javascript:alert(1)')).toThrow(/page address: got "javascript:alert\(1\)"; allowed: an absolute http, https or file address/);
    expect(() => openableUrl('data:text/html,hello')).toThrow(/page address/);
    expect(() => openableUrl('/watch/1')).toThrow(/page address/);
    // the scheme is case-insensitive (WHATWG URL lower-cases it), so this is refused too
    expect(() => openableUrl('JavaScript:void(0)')).toThrow(/page address/);
  });
});

describe('LRU cache', () => {
  it('drops the least recently used entry beyond its capacity; a read counts as use', () => {
    const c = new LruCache<number>(2);
    c.set('a', 1);
    c.set('b', 2);
    expect(c.get('a')).toBe(1); // a is now newer than b
    c.set('c', 3);
    expect(c.has('b')).toBe(false);
    expect(c.get('a')).toBe(1);
    expect(c.get('c')).toBe(3);
    expect(c.size).toBe(2);
  });

  it('rejects a capacity below 1', () => {
    expect(() => new LruCache(0)).toThrow(/cache capacity: got 0; allowed: a whole number, 1 or more/);
  });
});

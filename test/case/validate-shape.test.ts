import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseCaseFileAll } from '../../src/case/casefile';
import { migrate, readCaseRecord } from '../../src/case/migrate';
import { CaseFormatError, isKeptAddress } from '../../src/case/validate';
import { failure } from './expect-format-error';

/*
 * What a read returns: the known fields only, and page addresses on the schemes a page is opened
 * from. The known fields are those case-file.schema.json lists (the property test in
 * mutated-files.test.ts derives them from that file); here each place a field can hide is tried
 * by hand.
 */
const text = (p: string) => readFileSync(p, 'utf8');
const v2 = () => JSON.parse(text('test/case/fixtures/v2/logged-case.json')) as Record<string, unknown>;
const clone = <T>(x: T): T => JSON.parse(JSON.stringify(x)) as T;
type Obj = Record<string, unknown>;

/** The v2 fixture with an unknown key at every object the schema describes. */
function withJunkEverywhere(): Obj {
  const r = v2();
  const add = (o: unknown) => Object.assign(o as Obj, { junk: { deep: [1, 2, { x: 'invented' }] } });
  add(r);
  add(r.video);
  for (const m of r.marks as Obj[]) {
    add(m);
    add(m.mapping);
    add((m.mapping as Obj).picture);
    for (const p of m.points as Obj[]) add(p);
  }
  const a = r.assumptions as Obj;
  add(a);
  add(a.hfovDeg);
  add(a.fixedCamera);
  add((a.fixedCamera as Obj).axisHeadingDeg);
  for (const h of r.history as Obj[]) {
    add(h);
    add(h.video);
  }
  return r;
}

/** Every key anywhere in a value, by path. */
function keysOf(x: unknown, path = ''): string[] {
  if (Array.isArray(x)) return x.flatMap((v, i) => keysOf(v, `${path}[${i}]`));
  if (typeof x === 'object' && x !== null) return Object.entries(x).flatMap(([k, v]) => [`${path}.${k}`, ...keysOf(v, `${path}.${k}`)]);
  return [];
}

describe('a read keeps the known fields only', () => {
  it('unknown keys at every level of a record (body, video, mark, mapping, picture, point, assumptions, range, fixed camera, history) are dropped', () => {
    const clean = readCaseRecord(v2());
    const dirty = withJunkEverywhere();
    // the fixture really carries the junk at each level before the read
    expect(keysOf(dirty).filter((k) => k.endsWith('.junk')).length).toBeGreaterThanOrEqual(15);
    const read = readCaseRecord(dirty);
    expect(keysOf(read).filter((k) => k.includes('junk'))).toEqual([]);
    expect(read).toStrictEqual(clean);
  });

  it('drops them the same way through a case file, wrapper fields included, and an import stores none', () => {
    const file = { format: 'clip-caliper-case', schema: 2, exportedBy: 'invented', extra: { a: 1 }, cases: [withJunkEverywhere()] };
    const [read] = parseCaseFileAll(JSON.stringify(file));
    expect(read).toStrictEqual(readCaseRecord(v2()));
  });

  it('a "__proto__" key in a file stays data and is dropped, never becoming a prototype', () => {
    const body = JSON.stringify({ format: 'clip-caliper-case', schema: 2, case: v2() });
    const hostile = body.replace('"notes":', '"__proto__": { "polluted": "yes", "status": "explained" }, "notes":');
    expect(hostile).not.toBe(body);
    const [read] = parseCaseFileAll(hostile);
    expect(Object.getPrototypeOf(read)).toBe(Object.prototype);
    expect(Object.hasOwn(read!, '__proto__')).toBe(false);
    expect((read as unknown as Obj).polluted).toBeUndefined();
    expect(({} as Obj).polluted).toBeUndefined();
  });

  it('old files open as before: every v1 and v2 fixture reads to exactly its migrated self (nothing known is dropped)', () => {
    const records: unknown[] = [
      JSON.parse(text('test/case/fixtures/v1/empty-case.json')),
      JSON.parse(text('test/case/fixtures/v1/marked-case.json')),
      (JSON.parse(text('test/case/fixtures/v1/case-file.json')) as Obj).case,
      v2(),
    ];
    for (const raw of records) expect(readCaseRecord(clone(raw))).toStrictEqual(clone(migrate(raw)));
  });

  it('an earlier version that carries a history is still refused, naming it (refusing, not dropping: a version inside a version would hide a case)', () => {
    const r = v2();
    (r.history as Obj[])[0]!.history = [];
    expect(failure(() => readCaseRecord(r)).message).toBe('case.history[0].history: an earlier version holds no history of its own');
  });

  it('a number names its allowed range; Infinity and NaN (never JSON, RFC 8259 section 6, but possible in memory) are not finite', () => {
    for (const bad of [Infinity, -Infinity, NaN]) {
      const r = v2();
      (r.marks as Obj[])[0]!.t = bad;
      expect(failure(() => readCaseRecord(r)).message).toBe('case.marks[0].t: expected a finite number');
    }
    const r = v2();
    (r.marks as Obj[])[0]!.edgeSigmaPx = 50.5;
    expect(failure(() => readCaseRecord(r)).message).toBe('case.marks[0].edgeSigmaPx: expected 0 to 50, got 50.5');
    const s = v2();
    s.notes = '😀'.repeat(20_000); // 40 000 UTF-16 units, 20 000 characters: within
    expect(readCaseRecord(s).notes).toHaveLength(40_000);
    s.notes = `${s.notes as string}x`;
    expect(failure(() => readCaseRecord(s)).message).toBe('case.notes: expected 0 to 20000 characters, got 20001');
  });

  it('a list with a hole (a value in memory, never JSON) is refused at the missing item, not stored with the hole', () => {
    // the hand-written reader mapped over lists, which skips holes: it returned the hole, and
    // JSON.stringify then stored it as null, a record the next read refuses
    const r = v2();
    delete (r.marks as unknown[])[1];
    expect((r.marks as unknown[]).length).toBe(3);
    expect(failure(() => readCaseRecord(r)).message).toBe('case.marks[1]: expected an object');
    const t = v2();
    t.tags = ['night', 'dusk'];
    delete (t.tags as unknown[])[0];
    expect(failure(() => readCaseRecord(t)).message).toBe('case.tags[0]: expected text');
  });

  it('a known field of the wrong type inside the mapping is refused, naming its path; an absent one is fine', () => {
    const r = v2();
    ((r.marks as Obj[])[1]!.mapping as Obj).scale = 'big';
    expect(failure(() => readCaseRecord(r)).path).toBe('case.marks[1].mapping.scale');
    const s = v2();
    (s.marks as Obj[])[0]!.mapping = {};
    expect(readCaseRecord(s).marks[0]!.mapping).toStrictEqual({});
  });
});

describe('page and media addresses', () => {
  const withVideo = (video: Obj, inHistory = false) => {
    const r = v2();
    const target = inHistory ? (r.history as Obj[])[0]! : r;
    target.video = { ...(target.video as Obj), ...video };
    return r;
  };

  // schemes per RFC 3986 section 3.1 (case-insensitive); the allowed set is the project's own choice
  it.each([
    ['javascript:alert(1)'],
    ['JavaScript:alert(1)'],
    ['data:text/html,<p>invented</p>'],
    [' javascript:alert(1)'],
    ['java\tscript:alert(1)'],
    ['about:srcdoc'],
    ['blob:http://127.0.0.1/x'],
    ['//127.0.0.1/no-scheme'],
    ['invented/relative.html'],
  ])('a page address %j is refused, naming the field', (url) => {
    const e = failure(() => readCaseRecord(withVideo({ pageUrl: url })));
    expect(e.path).toBe('case.video.pageUrl');
    expect(e.message).toContain('expected an http, https or file address (or nothing)');
  });

  it('names the field inside an earlier version and inside a file too', () => {
    expect(failure(() => readCaseRecord(withVideo({ pageUrl: 'javascript:void 0' }, true))).path).toBe('case.history[0].video.pageUrl');
    const file = { format: 'clip-caliper-case', schema: 2, cases: [v2(), withVideo({ pageUrl: 'data:,x' })] };
    expect(failure(() => parseCaseFileAll(JSON.stringify(file))).path).toBe('file.cases[1].video.pageUrl');
  });

  it.each(['http://127.0.0.1/invented', 'https://clips.example.test/watch/1', 'HTTPS://clips.example.test/', 'file:///home/invented/clip.html', ''])(
    'a page address %j is kept as it was',
    (url) => {
      expect(readCaseRecord(withVideo({ pageUrl: url })).video.pageUrl).toBe(url);
    },
  );

  it('a media address on another scheme reads as empty (a media with no address of its own); an http one is kept', () => {
    for (const src of ['data:video/webm;base64,AAAA', 'blob:http://127.0.0.1/1f', 'javascript:alert(1)', 'mediastream:x']) {
      expect(readCaseRecord(withVideo({ src })).video.src).toBe('');
      expect(readCaseRecord(withVideo({ src }, true)).history[0]!.video.src).toBe('');
    }
    expect(readCaseRecord(withVideo({ src: 'http://127.0.0.1:8000/clips/invented.webm' })).video.src).toBe('http://127.0.0.1:8000/clips/invented.webm');
  });

  it('isKeptAddress: the rule itself', () => {
    expect(['', 'http:x', 'https://a', 'FILE:///b'].every(isKeptAddress)).toBe(true);
    expect(['httpx://a', 'ftp://a', ' http://a', 'ws://a'].some(isKeptAddress)).toBe(false);
  });

  it('the error is a CaseFormatError (the log and the import show its path)', () => {
    expect(() => readCaseRecord(withVideo({ pageUrl: 'javascript:0' }))).toThrow(CaseFormatError);
  });
});

describe('a followed mark (issue 15)', () => {
  const followed = { from: 'hand-1', run: 'run-1', confidence: 0.8, match: 0.97, settings: { searchPx: 12, minMatch: 0.8, reacquireMatch: 0.9, maxLostFrames: 10, maxSpanChange: 0.04 } };

  it('keeps how it was followed, and a hand mark has none', () => {
    const r = v2();
    (r.marks as Obj[])[0]!.followed = clone(followed);
    const read = readCaseRecord(r);
    expect(read.marks[0]!.followed).toEqual(followed);
    expect(read.marks[1]!.followed).toBeUndefined();
  });

  it('names the field of a bad value, with the allowed range', () => {
    const r = v2();
    (r.marks as Obj[])[0]!.followed = { ...clone(followed), confidence: 1.5 };
    expect(failure(() => readCaseRecord(r)).message).toBe('case.marks[0].followed.confidence: expected 0 to 1, got 1.5');
    (r.marks as Obj[])[0]!.followed = { ...clone(followed), settings: { ...followed.settings, searchPx: 0 } };
    expect(failure(() => readCaseRecord(r)).message).toBe('case.marks[0].followed.settings.searchPx: expected 1 to 100, got 0');
  });
});

import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseCaseFileAll } from '../../src/case/casefile';
import { mergeCase } from '../../src/case/importing';
import { withAnnotation } from '../../src/case/marks';
import type { CaseRecord } from '../../src/case/schema';
import { CaseFormatError } from '../../src/case/validate';
import { recordArb, v1RecordArb, v2RecordArb } from './arbitraries';

/*
 * Property: whatever is done to a valid case file (unknown keys at any depth, junk values, deeper
 * nesting, changed types, other address schemes, fields removed), the import's reader either
 * returns records holding only the fields the published schema lists, with page addresses on http,
 * https or file, or refuses with a CaseFormatError whose path names a real place in the file.
 * The known fields are read from case-file.schema.json here, not from the reader's code.
 */
type Obj = Record<string, unknown>;
type Schema = boolean | Obj;
const root = JSON.parse(readFileSync('src/case/case-file.schema.json', 'utf8')) as Obj;
const defs = root.$defs as Record<string, Schema>;

/** The schema and every schema it pulls in by $ref and allOf (JSON Schema 2020-12 Core 10.2.1.1, 8.2.3.1). */
function expand(s: Schema): Schema[] {
  if (typeof s === 'boolean') return [s];
  const out: Schema[] = [s];
  if (typeof s.$ref === 'string') out.push(...expand(defs[s.$ref.replace('#/$defs/', '')]!));
  for (const sub of (s.allOf as Schema[] | undefined) ?? []) out.push(...expand(sub));
  return out;
}

/** Paths of keys in `x` that the schema does not list (a key the schema lists as `false` counts too). */
function unknownKeys(s: Schema, x: unknown, path: string): string[] {
  const all = expand(s);
  if (Array.isArray(x)) {
    const items = all.flatMap((a) => (typeof a === 'object' && a.items !== undefined ? [a.items as Schema] : []));
    return x.flatMap((v, i) => items.flatMap((it) => unknownKeys(it, v, `${path}[${i}]`)));
  }
  if (typeof x !== 'object' || x === null) return [];
  const found: string[] = [];
  for (const [k, v] of Object.entries(x)) {
    const subs = all.flatMap((a) => (typeof a === 'object' && a.properties !== undefined && Object.hasOwn(a.properties as Obj, k) ? [(a.properties as Record<string, Schema>)[k]!] : []));
    if (subs.length === 0 || subs.includes(false)) found.push(`${path}.${k}`);
    else found.push(...subs.flatMap((sub) => unknownKeys(sub, v, `${path}.${k}`)));
  }
  return found;
}

/** Follows a reader's path (`file.cases[0].marks[3].foo`, `["odd key"]`) into a value; undefined when it leads nowhere. */
function resolve(rootValue: unknown, path: string): { parent: unknown; found: boolean } {
  expect(path.startsWith('file')).toBe(true);
  const seg = /\.([A-Za-z_$][A-Za-z0-9_$]*)|\[(\d+)\]|\[("(?:[^"\\]|\\.)*")\]/y;
  seg.lastIndex = 4;
  let at: unknown = rootValue;
  let parent: unknown = undefined;
  while (seg.lastIndex < path.length) {
    const start = seg.lastIndex;
    const m = seg.exec(path);
    if (!m) throw new Error(`unparsable path ${path} at ${start}`);
    parent = at;
    if (typeof at !== 'object' || at === null) return { parent: undefined, found: false };
    if (m[2] !== undefined) at = (at as unknown[])[Number(m[2])];
    else {
      let key = m[1] ?? (JSON.parse(m[3]!) as string);
      // a long key is shown shortened with an ellipsis: match it by its start
      if (key.endsWith('…')) key = Object.keys(at).find((k) => k.startsWith(key.slice(0, -1))) ?? key;
      at = Object.hasOwn(at, key) ? (at as Obj)[key] : undefined;
    }
  }
  return { parent, found: at !== undefined };
}

const assumptions = { cameraLabel: 'invented camera', hfovDeg: { lo: 60, hi: 70 }, sizeLabel: 'invented size', objectSizeM: { lo: 20, hi: 30 }, aspectDeg: { lo: 80, hi: 90 }, landmarkSizeM: { lo: 5, hi: 9 }, landmarkSizes: [{ id: 'mast', sizeM: { lo: 15, hi: 17 } }], fixedCamera: { mount: 'tripod', axisHeadingDeg: { lo: 80, hi: 100 }, pitchDeg: { lo: 2, hi: 6 } } };
const currentWithHistory = fc.record({ c: recordArb(), a: fc.boolean(), edits: fc.nat(2) }).map(({ c, a, edits }) => {
  let r: CaseRecord = a ? { ...c, assumptions: assumptions as CaseRecord['assumptions'] } : c;
  for (let i = 1; i <= edits; i++) r = mergeCase(r, withAnnotation(r, { notes: `${r.notes} / edit ${i}` }, r.updatedAt + i), 1_700_000_000_000 + i);
  return JSON.parse(JSON.stringify(r)) as unknown;
});
const fixtures = ['test/case/fixtures/v1/empty-case.json', 'test/case/fixtures/v1/marked-case.json', 'test/case/fixtures/v2/logged-case.json'].map((p) => JSON.parse(readFileSync(p, 'utf8')) as unknown);
const validRecord: fc.Arbitrary<unknown> = fc.oneof(currentWithHistory, v2RecordArb(), v1RecordArb, fc.constantFrom(...fixtures));
const validFile = fc.record({ records: fc.array(validRecord, { minLength: 1, maxLength: 3 }), one: fc.boolean() }).map(({ records, one }) =>
  one ? { format: 'clip-caliper-case', schema: 2, exportedBy: 'invented', case: records[0] } : { format: 'clip-caliper-case', schema: 3, cases: records },
);

const BAD_SCHEMES = ['javascript:alert(1)', 'data:text/html,x', 'about:blank', 'blob:http://127.0.0.1/x', 'vbscript:x', 'JAVASCRIPT:0'];
const junk: fc.Arbitrary<unknown> = fc.oneof(fc.jsonValue({ maxDepth: 3 }), fc.constantFrom(null, '', -1, 1e300, [], {}, 'x'.repeat(300), ...BAD_SCHEMES));
const unknownKey = fc.oneof(fc.constantFrom('junk', '__proto__', 'constructor', 'odd key', 'history', 'keptAt', 'x'.repeat(80)), fc.string({ minLength: 1, maxLength: 8 }));

type Mutation =
  | { op: 'add'; pick: number; key: string; value: unknown }
  | { op: 'replace'; pick: number; value: unknown }
  | { op: 'deepen'; pick: number; levels: number }
  | { op: 'retype'; pick: number }
  | { op: 'scheme'; pick: number; url: string; field: 'pageUrl' | 'src' }
  | { op: 'remove'; pick: number };
const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ op: fc.constant('add' as const), pick: fc.nat(), key: unknownKey, value: junk }),
  fc.record({ op: fc.constant('replace' as const), pick: fc.nat(), value: junk }),
  fc.record({ op: fc.constant('deepen' as const), pick: fc.nat(), levels: fc.constantFrom(1, 3, 8, 20, 10_000) }),
  fc.record({ op: fc.constant('retype' as const), pick: fc.nat() }),
  fc.record({ op: fc.constant('scheme' as const), pick: fc.nat(), url: fc.constantFrom(...BAD_SCHEMES), field: fc.constantFrom('pageUrl' as const, 'src' as const) }),
  fc.record({ op: fc.constant('remove' as const), pick: fc.nat() }),
);

type Loc = { holder: Obj | unknown[]; key: string | number };
function locations(x: unknown, out: Loc[] = []): Loc[] {
  if (Array.isArray(x)) x.forEach((v, i) => (out.push({ holder: x, key: i }), locations(v, out)));
  else if (typeof x === 'object' && x !== null) for (const [k, v] of Object.entries(x)) (out.push({ holder: x as Obj, key: k }), locations(v, out));
  return out;
}
function objects(x: unknown, out: Obj[] = []): Obj[] {
  if (Array.isArray(x)) x.forEach((v) => objects(v, out));
  else if (typeof x === 'object' && x !== null) (out.push(x as Obj), Object.values(x).forEach((v) => objects(v, out)));
  return out;
}
const setOwn = (o: Obj, k: string, v: unknown) => Object.defineProperty(o, k, { value: v, enumerable: true, writable: true, configurable: true });

/** Applies the mutations to a copy of the file; deep nesting goes in as text (JSON.stringify itself recurses). */
function mutate(file: unknown, ms: readonly Mutation[]): { text: string; addedUnknown: boolean } {
  const copy = JSON.parse(JSON.stringify(file)) as Obj;
  const deep: string[] = [];
  let addedUnknown = false;
  for (const m of ms) {
    const locs = locations(copy);
    const at = locs[m.pick % locs.length]!;
    const h = at.holder as Obj;
    const k = at.key as string;
    if (m.op === 'add') {
      const obs = objects(copy);
      setOwn(obs[m.pick % obs.length]!, m.key, m.value);
      addedUnknown = true;
    } else if (m.op === 'replace') h[k] = m.value;
    else if (m.op === 'deepen') {
      deep.push(`${'['.repeat(m.levels)}${JSON.stringify(h[k]) ?? 'null'}${']'.repeat(m.levels)}`);
      h[k] = `\u0000deep${deep.length - 1}\u0000`;
    } else if (m.op === 'retype') {
      const v = h[k];
      h[k] = typeof v === 'number' ? String(v) : typeof v === 'string' ? v.length : Array.isArray(v) ? { ...v } : typeof v === 'object' && v !== null ? Object.values(v) : v === null ? 0 : String(v);
    } else if (m.op === 'scheme') {
      const videos = objects(copy).filter((o) => typeof o.pageUrl === 'string' && 'src' in o);
      if (videos.length > 0) videos[m.pick % videos.length]![m.field] = m.url;
    } else if (Array.isArray(at.holder)) at.holder.splice(at.key as number, 1);
    else delete h[k];
  }
  let text = JSON.stringify(copy);
  deep.forEach((d, i) => (text = text.replace(`"\\u0000deep${i}\\u0000"`, () => d)));
  return { text, addedUnknown };
}

const pagesOk = (c: CaseRecord) => [c, ...c.history].every((v) => /^(?:$|https?:|file:)/i.test(v.video.pageUrl) && /^(?:$|https?:|file:)/i.test(v.video.src));

describe('mutated case files through the import reader', () => {
  it('every accepted record holds only fields the published schema lists; every refusal is a CaseFormatError naming a real place', () => {
    const tally = { accepted: 0, acceptedAfterUnknown: 0, refused: 0, refusedTooDeep: 0, refusedAddress: 0 };
    fc.assert(
      fc.property(validFile, fc.array(mutation, { minLength: 1, maxLength: 3 }), (file, ms) => {
        const { text, addedUnknown } = mutate(file, ms);
        let cases: CaseRecord[];
        try {
          cases = parseCaseFileAll(text);
        } catch (e) {
          // a stack overflow or a TypeError would land here as a failure, not as a tally
          expect(e).toBeInstanceOf(CaseFormatError);
          const path = (e as CaseFormatError).path;
          expect(path.length).toBeGreaterThan(0);
          const { parent, found } = resolve(JSON.parse(text), path);
          // the named field exists, or it is missing from an object or list that does (a required field left out)
          expect(found || (typeof parent === 'object' && parent !== null) || path === 'file', `${path} (${(e as Error).message})`).toBe(true);
          tally.refused++;
          if ((e as Error).message.includes('nested too deep')) tally.refusedTooDeep++;
          if (/\.pageUrl$/.test(path)) tally.refusedAddress++;
          return;
        }
        tally.accepted++;
        if (addedUnknown) tally.acceptedAfterUnknown++;
        for (const c of cases) {
          expect(unknownKeys({ $ref: '#/$defs/record' }, c, 'case')).toEqual([]);
          expect(pagesOk(c)).toBe(true);
        }
      }),
      { numRuns: 600, seed: 13 },
    );
    // the property was exercised on both sides, and on each kind of hostile input
    expect(tally.accepted).toBeGreaterThan(50);
    expect(tally.acceptedAfterUnknown).toBeGreaterThan(20);
    expect(tally.refused).toBeGreaterThan(100);
    expect(tally.refusedTooDeep).toBeGreaterThan(5);
    expect(tally.refusedAddress).toBeGreaterThan(5);
  });

  it('the checker itself finds an unknown key at depth, and a key the schema forbids (a version’s history)', () => {
    const c = JSON.parse(readFileSync('test/case/fixtures/v2/logged-case.json', 'utf8')) as Obj;
    expect(unknownKeys({ $ref: '#/$defs/record' }, c, 'case')).toEqual([]);
    ((c.marks as Obj[])[0]!.mapping as Obj).extra = 1;
    ((c.history as Obj[])[0] as Obj).history = [];
    expect(unknownKeys({ $ref: '#/$defs/record' }, c, 'case')).toEqual(['case.marks[0].mapping.extra', 'case.history[0].history']);
  });
});

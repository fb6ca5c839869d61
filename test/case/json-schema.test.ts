import Ajv2020 from 'ajv/dist/2020.js';
import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseCaseFileAll, toCaseFile, toCasesFile } from '../../src/case/casefile';
import { mergeCase } from '../../src/case/importing';
import { caseFileJsonSchemaText } from '../../src/case/json-schema';
import { withAnnotation } from '../../src/case/marks';
import { readCaseRecord } from '../../src/case/migrate';
import type { CaseRecord } from '../../src/case/schema';
import { CaseFormatError } from '../../src/case/validate';
import { recordArb } from './arbitraries';
import { bigCase, limitCaseOptions } from './big-case';

/*
 * The published JSON Schema is made from the one definition (src/case/shape.ts) and checked here
 * by a general-purpose validator that knows nothing of this project: ajv 8 in its draft 2020-12
 * mode and strict mode (which refuses unknown keywords, ill-formed schemas and keywords applied
 * to the wrong type). What it must agree
 * on with the reader: every file the reader accepts, the schema accepts; a file the reader
 * refuses, the schema refuses too, except for the rules its description lists as beyond JSON
 * Schema (points held to their video, a range's ends in order, ids across fields).
 */
type Obj = Record<string, unknown>;
const PATH = 'src/case/case-file.schema.json';
const committed = readFileSync(PATH, 'utf8');
const schema = JSON.parse(committed) as Obj;
// strict mode, less its strictRequired lint: `oneOf: [{ required: ['case'] }, { required: ['cases'] }]`
// names properties defined beside it, not inside, which is valid JSON Schema (Validation 6.5.3)
const ajv = new Ajv2020({ strict: true, strictRequired: false, allErrors: false });
const schemaAccepts = ajv.compile(schema);
const clone = <T>(x: T): T => JSON.parse(JSON.stringify(x)) as T;
const fixture = (p: string) => JSON.parse(readFileSync(`test/case/fixtures/${p}`, 'utf8')) as Obj;

/** What the reader checks and JSON Schema cannot say (the same list as case-file-schema.test.ts, from the schema's description). */
const BEYOND_SCHEMA = [
  /\.points\[\d+\]\.[xy]$/,
  /\.(hfovDeg|objectSizeM|aspectDeg|landmarkSizeM|observerSpeedMs|headwindMs|axisHeadingDeg|sizeM|landmarkAspectDeg|trackAngleDeg|cameraHeightM|elevationDeg|pitchDeg)$/,
  /^file\.case\.history\[\d+\]\.id$/,
  /\.landmarkSizes\[\d+\]\.id$/,
];

function readerOn(file: unknown): { ok: true } | { ok: false; path: string } {
  try {
    parseCaseFileAll(JSON.stringify(file));
    return { ok: true };
  } catch (e) {
    if (!(e instanceof CaseFormatError)) throw e;
    return { ok: false, path: e.path };
  }
}

describe('the published case file JSON Schema', () => {
  it('is the file `npm run schema` makes from the definition (edit shape.ts, then run it)', () => {
    expect(committed).toBe(caseFileJsonSchemaText());
  });

  it('is a well-formed draft 2020-12 schema to ajv in strict mode', () => {
    expect(schema.$schema).toBe('https://json-schema.org/draft/2020-12/schema');
    expect(ajv.validateSchema(schema), JSON.stringify(ajv.errors)).toBe(true);
  });

  it('accepts every fixture once migrated (v1, v2 and a v1 file), alone and together, and the 10 000-mark case', () => {
    const records = [
      readCaseRecord(fixture('v1/empty-case.json')),
      readCaseRecord(fixture('v1/marked-case.json')),
      ...parseCaseFileAll(readFileSync('test/case/fixtures/v1/case-file.json', 'utf8')),
      readCaseRecord(fixture('v2/logged-case.json')),
    ];
    for (const r of records) expect(schemaAccepts(clone(toCaseFile(r, '0.2.0'))), JSON.stringify(schemaAccepts.errors)).toBe(true);
    expect(schemaAccepts(clone(toCasesFile(records, '0.2.0')))).toBe(true);
    const big = bigCase(limitCaseOptions());
    expect(big.marks.length).toBe(10_000);
    expect(schemaAccepts(clone(toCaseFile(big, '0.2.0')))).toBe(true);
  });

  it('refuses hand-made bad files the reader refuses, each for the field the reader names', () => {
    const good = () => clone(toCaseFile(readCaseRecord(fixture('v2/logged-case.json')), '0.2.0')) as unknown as { case: Obj } & Obj;
    const cases: [string, (f: { case: Obj } & Obj) => void, string][] = [
      ['a javascript: page address', (f) => ((f.case.video as Obj).pageUrl = 'javascript:alert(1)'), 'file.case.video.pageUrl'],
      ['an object span of three points', (f) => ((f.case.marks as Obj[])[0]!.points = [{ x: 1, y: 1 }, { x: 2, y: 1 }, { x: 3, y: 1 }]), 'file.case.marks[0].points'],
      ['an unknown mark kind', (f) => ((f.case.marks as Obj[])[0]!.kind = 'invented-kind'), 'file.case.marks[0].kind'],
      ['a repeated tag', (f) => (f.case.tags = ['night', 'night']), 'file.case.tags[1]'],
      ['a tag with a trailing space', (f) => (f.case.tags = ['night ']), 'file.case.tags[0]'],
      ['notes one past the limit', (f) => (f.case.notes = 'n'.repeat(20_001)), 'file.case.notes'],
      ['an earlier version with its own history', (f) => ((f.case.history as Obj[])[0]!.history = []), 'file.case.history[0].history'],
      ['a missing video', (f) => delete f.case.video, 'file.case.video'],
      ['a newer file version', (f) => (f.schema = 4), 'file.schema'],
      ['both case and cases', (f) => (f.cases = [f.case]), 'file'],
      ['a record of version 4', (f) => (f.case.schema = 4), 'file.case.schema'],
    ];
    expect(schemaAccepts(good())).toBe(true);
    for (const [name, spoil, path] of cases) {
      const f = good();
      spoil(f);
      expect(readerOn(f), name).toEqual({ ok: false, path });
      expect(schemaAccepts(f), name).toBe(false);
    }
  });

  it('agrees with the reader on mutated files: never stricter, and looser only where its description says the reader checks more', () => {
    const assumptions = { cameraLabel: 'invented camera', hfovDeg: { lo: 60, hi: 70 }, sizeLabel: 'invented size', objectSizeM: { lo: 20, hi: 30 }, aspectDeg: { lo: 80, hi: 90 }, landmarkSizeM: { lo: 5, hi: 9 }, landmarkSizes: [{ id: 'mast', sizeM: { lo: 15, hi: 17 } }], fixedCamera: { mount: 'tripod' as const, axisHeadingDeg: { lo: 80, hi: 100 }, pitchDeg: { lo: 2, hi: 6 } } };
    const records = fc.record({ c: recordArb(), a: fc.boolean(), edits: fc.nat(2) }).map(({ c, a, edits }) => {
      let r: CaseRecord = a ? { ...c, assumptions } : c;
      for (let i = 1; i <= edits; i++) r = mergeCase(r, withAnnotation(r, { notes: `${r.notes} / edit ${i}` }, r.updatedAt + i), 1_700_000_000_000 + i);
      return clone(r);
    });
    const values: unknown[] = [null, -1, 0, 1.5, 1e20, 30_000, 'x', '', ' padded ', 'open', 'a'.repeat(41), [], {}, true, undefined];
    const tally = { bothAccept: 0, bothRefuse: 0, beyond: 0 };
    fc.assert(
      fc.property(records, fc.nat(), fc.constantFrom(...values), (r, pick, value) => {
        const file = clone(toCaseFile(r, '0.2.0')) as unknown as Obj;
        // every place in the record, then one value replaced (or the field removed, a list item spliced out)
        const places: [Obj | unknown[], string | number][] = [];
        const walk = (x: unknown) => {
          if (Array.isArray(x)) x.forEach((v, i) => (places.push([x, i]), walk(v)));
          else if (typeof x === 'object' && x !== null) for (const [k, v] of Object.entries(x)) (places.push([x as Obj, k]), walk(v));
        };
        walk(file.case);
        const [holder, key] = places[pick % places.length]!;
        if (value !== undefined) (holder as Obj)[key] = value;
        else if (Array.isArray(holder)) holder.splice(key as number, 1);
        else delete holder[key as string];
        const bySchema = schemaAccepts(file);
        const byReader = readerOn(file);
        if (bySchema === byReader.ok) return void tally[bySchema ? 'bothAccept' : 'bothRefuse']++;
        expect(bySchema, `the schema refused what the reader accepts: ${JSON.stringify(schemaAccepts.errors)}`).toBe(true);
        const at = (byReader as { path: string }).path;
        expect(BEYOND_SCHEMA.some((re) => re.test(at)), `the reader refused ${at}, which the schema should say`).toBe(true);
        tally.beyond++;
      }),
      { numRuns: 800, seed: 11 },
    );
    expect(tally.bothRefuse).toBeGreaterThan(100);
    expect(tally.bothAccept).toBeGreaterThan(50);
    expect(tally.beyond).toBeGreaterThan(0);
  });
});

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseCaseFile, parseCaseFileAll } from '../../src/case/casefile';
import { readCaseRecord } from '../../src/case/migrate';
import { LEGIT_FILE_NESTING, MAX_FILE_NESTING, MAX_RECORD_NESTING, checkNesting, pathSegment } from '../../src/case/nesting';
import { failure } from './expect-format-error';

/*
 * The nesting bound: derived from the published schema (how deep can a file it describes go?),
 * and checked on hostile depths that used to overflow the call stack ("Maximum call stack size
 * exceeded", naming no field) or were stored whole.
 */
type Obj = Record<string, unknown>;
const schema = JSON.parse(readFileSync('src/case/case-file.schema.json', 'utf8')) as Obj;
const defs = schema.$defs as Record<string, Obj>;
const v2 = () => JSON.parse(readFileSync('test/case/fixtures/v2/logged-case.json', 'utf8')) as Obj;

/** Deepest nesting of objects and lists an instance of the schema can have (JSON Schema 2020-12: properties, items, allOf, $ref). */
function schemaDepth(s: unknown, seen: readonly string[] = []): number {
  if (typeof s !== 'object' || s === null) return 0;
  const o = s as Obj;
  let inner = 0;
  if (typeof o.$ref === 'string') {
    const name = o.$ref.replace('#/$defs/', '');
    if (seen.includes(name)) throw new Error(`recursive schema at ${name}: no bound`);
    inner = Math.max(inner, schemaDepth(defs[name], [...seen, name]));
  }
  for (const sub of (o.allOf as unknown[] | undefined) ?? []) inner = Math.max(inner, schemaDepth(sub, seen));
  const children = [...Object.values((o.properties as Obj | undefined) ?? {}), ...(o.items !== undefined ? [o.items] : [])];
  const own = children.length > 0 || o.type === 'object' || o.type === 'array' ? 1 + Math.max(0, ...children.map((c) => schemaDepth(c, seen))) : 0;
  return Math.max(inner, own);
}

/** An array nested n deep, built without recursion. */
function deepArray(n: number): unknown[] {
  let a: unknown[] = [];
  for (let i = 1; i < n; i++) a = [a];
  return a;
}
const deepText = (n: number) => `${'['.repeat(n)}${']'.repeat(n)}`;
const fileWithJunk = (junk: string) => `{"format":"clip-caliper-case","schema":2,"cases":[${JSON.stringify(v2()).replace('"notes":', `"junk":${junk},"notes":`)}]}`;
/** Where the bound is passed under a record's `junk` key in a file of several: file (1), cases (2), record (3), junk (4), then one level per [0]. */
const junkPath = `file.cases[0].junk${'[0]'.repeat(MAX_FILE_NESTING - 3)}`;

describe('the nesting bound', () => {
  it('is above the deepest file the published schema describes, which is LEGIT_FILE_NESTING', () => {
    expect(schemaDepth(schema)).toBe(LEGIT_FILE_NESTING);
    expect(MAX_FILE_NESTING).toBeGreaterThan(LEGIT_FILE_NESTING);
    // a record is read two levels into a file (the file, its `cases` list)
    expect(MAX_RECORD_NESTING).toBe(MAX_FILE_NESTING - 2);
  });

  it('a file nested as deep as the schema allows (cases, history, marks, points) reads', () => {
    const r = readCaseRecord(v2());
    r.history[0]!.marks = r.marks;
    const file = JSON.stringify({ format: 'clip-caliper-case', schema: 3, cases: [r] });
    expect(file).toContain('"history":[{');
    expect(parseCaseFileAll(file)[0]!.history[0]!.marks[0]!.points).toHaveLength(2);
  });

  it('extra data up to the bound is dropped; one level past it is refused at the path where it was passed', () => {
    // an array at level 4 nested k deep reaches level 3 + k
    const ok = parseCaseFile(fileWithJunk(deepText(MAX_FILE_NESTING - 3)));
    expect(Object.hasOwn(ok, 'junk')).toBe(false);
    const e = failure(() => parseCaseFile(fileWithJunk(deepText(MAX_FILE_NESTING - 2))));
    expect(e.path).toBe(junkPath);
    expect(e.message).toContain(`more than ${MAX_FILE_NESTING} levels of objects and lists from file`);
    // a file of one case holds its record a level higher: the record's own bound is passed at the same depth below it
    const one = `{"format":"clip-caliper-case","schema":2,"case":${JSON.stringify({ ...v2(), junk: JSON.parse(deepText(MAX_RECORD_NESTING)) })}}`;
    expect(failure(() => parseCaseFile(one)).path).toBe(`file.case.junk${'[0]'.repeat(MAX_RECORD_NESTING - 1)}`);
  });

  it.each([1_000, 10_000, 1_000_000])('a %i-deep array under an unknown key is a clean CaseFormatError naming the path, in a file', (n) => {
    const e = failure(() => parseCaseFileAll(fileWithJunk(deepText(n))));
    expect(e.path).toBe(junkPath);
  });

  it.each([10_000, 1_000_000])('a file that is a %i-deep array, or a deep object, names the path too', (n) => {
    expect(failure(() => parseCaseFileAll(deepText(n))).path).toBe(`file${'[0]'.repeat(MAX_FILE_NESTING)}`);
    const objects = `${'{"a b":'.repeat(n)}1${'}'.repeat(n)}`;
    expect(failure(() => parseCaseFileAll(objects)).path).toBe(`file${'["a b"]'.repeat(MAX_FILE_NESTING)}`);
  });

  it('a stored record (a value, not text) nested a million deep is refused at its path, not by a stack overflow', () => {
    const r = v2();
    ((r.marks as Obj[])[2] as Obj).extra = deepArray(1_000_000);
    const e = failure(() => readCaseRecord(r));
    // case (1), marks (2), marks[2] (3), extra (4): the bound is passed at extra with 11 [0]s
    expect(e.path).toBe(`case.marks[2].extra${'[0]'.repeat(MAX_RECORD_NESTING - 3)}`);
  });

  it('checkNesting walks wide values too, and names keys that are not plain words', () => {
    expect(() => checkNesting(Array.from({ length: 100_000 }, () => [1, [2]]), 'x', 3)).not.toThrow();
    expect(failure(() => checkNesting({ a: [{ 'odd key': [[1]] }] }, 'x', 4)).path).toBe('x.a[0]["odd key"][0]');
    expect(pathSegment('k'.repeat(100))).toBe(`["${'k'.repeat(40)}…"]`);
    expect(pathSegment(3)).toBe('[3]');
  });
});

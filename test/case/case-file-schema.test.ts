import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseCaseFileAll, toCaseFile, toCasesFile } from '../../src/case/casefile';
import { mergeCase } from '../../src/case/importing';
import { withAnnotation } from '../../src/case/marks';
import { CASE_STATUSES, MARK_KINDS, type CaseRecord } from '../../src/case/schema';
import { CaseFormatError, validateCase } from '../../src/case/validate';
import { LANE_CYCLES } from '../../src/engine/lanes';
import { recordArb as currentRecordArb } from './arbitraries';

/*
 * The case file's JSON Schema (src/case/case-file.schema.json, draft 2020-12, made from shape.ts)
 * must agree with the reader. A small interpreter of the keywords the schema uses sits below,
 * written from JSON Schema 2020-12 Core and Validation (sections on $ref, allOf, anyOf, oneOf,
 * if/then, type, const, enum, the numeric, string, array and object keywords). It refuses any
 * keyword it does not know, so the schema cannot quietly grow one that nothing checks.
 * json-schema.test.ts checks the same file with a general-purpose validator (ajv).
 */
type Schema = boolean | Record<string, unknown>;
const root = JSON.parse(readFileSync('src/case/case-file.schema.json', 'utf8')) as Record<string, unknown>;
const ANNOTATIONS = new Set(['$schema', '$id', 'title', 'description', '$defs']);
const KNOWN = new Set([...ANNOTATIONS, 'type', 'const', 'enum', 'minimum', 'maximum', 'minLength', 'maxLength', 'pattern', 'items', 'minItems', 'maxItems', 'uniqueItems', 'required', 'properties', '$ref', 'allOf', 'anyOf', 'oneOf', 'if', 'then']);

const canon = (x: unknown): string =>
  Array.isArray(x) ? `[${x.map(canon).join(',')}]` : typeof x === 'object' && x !== null ? `{${Object.keys(x).sort().map((k) => `${JSON.stringify(k)}:${canon((x as Record<string, unknown>)[k])}`).join(',')}}` : JSON.stringify(x);

function typeOk(t: string, x: unknown): boolean {
  switch (t) {
    case 'object':
      return typeof x === 'object' && x !== null && !Array.isArray(x);
    case 'array':
      return Array.isArray(x);
    case 'string':
      return typeof x === 'string';
    case 'number':
      return typeof x === 'number' && Number.isFinite(x);
    case 'integer':
      return typeof x === 'number' && Number.isInteger(x);
    case 'null':
      return x === null;
    case 'boolean':
      return typeof x === 'boolean';
    default:
      throw new Error(`unknown type ${t}`);
  }
}

function valid(s: Schema, x: unknown): boolean {
  if (s === true) return true;
  if (s === false) return false;
  for (const k of Object.keys(s)) if (!KNOWN.has(k)) throw new Error(`keyword ${k} is not interpreted`);
  if (s.$ref !== undefined) {
    const name = /^#\/\$defs\/(.+)$/.exec(s.$ref as string)?.[1];
    const target = name === undefined ? undefined : (root.$defs as Record<string, Schema>)[name];
    if (target === undefined) throw new Error(`unresolved ${String(s.$ref)}`);
    if (!valid(target, x)) return false;
  }
  if (s.type !== undefined && ![s.type].flat().some((t) => typeOk(t as string, x))) return false;
  if (s.const !== undefined && canon(s.const) !== canon(x)) return false;
  if (s.enum !== undefined && !(s.enum as unknown[]).some((e) => canon(e) === canon(x))) return false;
  if (typeof x === 'number') {
    if (s.minimum !== undefined && x < (s.minimum as number)) return false;
    if (s.maximum !== undefined && x > (s.maximum as number)) return false;
  }
  if (typeof x === 'string') {
    const n = [...x].length; // code points (Validation 6.3.1)
    if (s.minLength !== undefined && n < (s.minLength as number)) return false;
    if (s.maxLength !== undefined && n > (s.maxLength as number)) return false;
    if (s.pattern !== undefined && !new RegExp(s.pattern as string, 'u').test(x)) return false;
  }
  if (Array.isArray(x)) {
    if (s.minItems !== undefined && x.length < (s.minItems as number)) return false;
    if (s.maxItems !== undefined && x.length > (s.maxItems as number)) return false;
    if (s.uniqueItems === true && new Set(x.map(canon)).size !== x.length) return false;
    if (s.items !== undefined && !x.every((v) => valid(s.items as Schema, v))) return false;
  }
  if (typeof x === 'object' && x !== null && !Array.isArray(x)) {
    const o = x as Record<string, unknown>;
    if (s.required !== undefined && !(s.required as string[]).every((k) => Object.hasOwn(o, k))) return false;
    if (s.properties !== undefined) {
      for (const [k, sub] of Object.entries(s.properties as Record<string, Schema>)) if (Object.hasOwn(o, k) && !valid(sub, o[k])) return false;
    }
  }
  if (s.allOf !== undefined && !(s.allOf as Schema[]).every((sub) => valid(sub, x))) return false;
  if (s.anyOf !== undefined && !(s.anyOf as Schema[]).some((sub) => valid(sub, x))) return false;
  if (s.oneOf !== undefined && (s.oneOf as Schema[]).filter((sub) => valid(sub, x)).length !== 1) return false;
  if (s.if !== undefined && valid(s.if as Schema, x) && s.then !== undefined && !valid(s.then as Schema, x)) return false;
  return true;
}

const recordSchema: Schema = { $ref: '#/$defs/record' };
const readerAccepts = (x: unknown): { ok: true } | { ok: false; path: string } => {
  try {
    validateCase(x);
    return { ok: true };
  } catch (e) {
    if (!(e instanceof CaseFormatError)) throw e;
    return { ok: false, path: e.path };
  }
};
/** What the reader checks and JSON Schema cannot say (the schema's description lists them). */
const BEYOND_SCHEMA = [
  /\.points\[\d+\]\.[xy]$/,
  /\.(hfovDeg|objectSizeM|aspectDeg|landmarkSizeM|observerSpeedMs|headwindMs|axisHeadingDeg|sizeM|landmarkAspectDeg|trackAngleDeg|cameraHeightM|elevationDeg|pitchDeg)$/,
  /^case\.history\[\d+\]\.id$/,
  /\.landmarkSizes\[\d+\]\.id$/,
];

const assumptions = { cameraLabel: 'invented camera', hfovDeg: { lo: 60, hi: 70 }, sizeLabel: 'invented size', objectSizeM: { lo: 20, hi: 30 }, sizeDimension: 'length' as const, aspectDeg: { lo: 80, hi: 90 }, landmarkSizeM: { lo: 5, hi: 9 }, observerSpeedMs: { lo: 20, hi: 25 }, laneCycleId: 'nz-lane', objectKind: 'unknown' as const, direction: 'same-faster' as const, headwindMs: { lo: -5, hi: 5 }, fixedCamera: { mount: 'tripod' as const, axisHeadingDeg: { lo: 80, hi: 100 }, pitchDeg: { lo: 2, hi: 6 } }, landmarkSizes: [{ id: 'mast', sizeM: { lo: 15, hi: 17 } }], landmarkAspectDeg: { lo: 70, hi: 90 }, trackAngleDeg: { lo: 10, hi: 30 }, cameraHeightM: { lo: 1.2, hi: 1.6 }, elevationDeg: { lo: 5, hi: 20 } };
const recordArb: fc.Arbitrary<CaseRecord> = fc
  .record({ c: currentRecordArb(), withAssumptions: fc.boolean(), edits: fc.nat(3) })
  .map(({ c, withAssumptions, edits }) => {
    let r: CaseRecord = withAssumptions ? { ...c, assumptions } : c;
    // a few imports of edited copies give the record a history
    for (let i = 1; i <= edits; i++) r = mergeCase(r, withAnnotation(r, { notes: `${r.notes} / edit ${i}` }, r.updatedAt + i), 1_700_000_000_000 + i);
    return JSON.parse(JSON.stringify(r)) as CaseRecord;
  });

const values: unknown[] = [null, -1, 0, 1, 2, 1.5, 60, 1e20, 30_000, 'x', '', ' padded ', 'open', 'nz-lane', 'wingspan', 'a'.repeat(41), [], [1], {}, true, undefined];

function mutateAt(rootValue: unknown, pick: number, value: unknown): { mutated: unknown; path: string } {
  const paths: (string | number)[][] = [];
  const walk = (x: unknown, p: (string | number)[]) => {
    paths.push(p);
    if (Array.isArray(x)) x.forEach((v, i) => walk(v, [...p, i]));
    else if (typeof x === 'object' && x !== null) for (const k of Object.keys(x)) walk((x as Record<string, unknown>)[k], [...p, k]);
  };
  walk(rootValue, []);
  const path = paths[pick % paths.length]!;
  const copy = JSON.parse(JSON.stringify(rootValue)) as Record<string | number, unknown>;
  if (path.length === 0) return { mutated: value, path: '' };
  let at = copy;
  for (const k of path.slice(0, -1)) at = at[k] as Record<string | number, unknown>;
  const last = path.at(-1)!;
  // a list item removed is spliced out: JSON has no holes, and a hole is no case file
  if (value === undefined) Array.isArray(at) ? at.splice(last as number, 1) : delete at[last];
  else if (Array.isArray(value) && value.length === 1 && Array.isArray(at)) at.push(at[last as number]); // a repeated item
  else at[last] = value;
  return { mutated: copy, path: path.join('.') };
}

describe('the case file JSON Schema (draft 2020-12)', () => {
  it('is draft 2020-12, describes every field, and lists the same words as the code', () => {
    expect(root.$schema).toBe('https://json-schema.org/draft/2020-12/schema');
    const defs = root.$defs as Record<string, { properties?: Record<string, false | { description?: string; $ref?: string }> }>;
    for (const [name, def] of Object.entries(defs)) {
      // `false` is no field: it forbids one (an earlier version's own history)
      for (const [field, sub] of Object.entries(def.properties ?? {})) if (sub !== false) expect(sub.description ?? sub.$ref, `${name}.${field}`).toBeTruthy();
    }
    expect(defs.version!.properties!.history).toBe(false);
    const body = defs.record!.properties as Record<string, { enum?: unknown[] }>;
    expect(body.status!.enum).toEqual([...CASE_STATUSES]);
    expect((defs.mark!.properties as Record<string, { enum?: unknown[] }>).kind!.enum).toEqual([...MARK_KINDS]);
    expect((defs.assumptions!.properties as Record<string, { enum?: unknown[] }>).laneCycleId!.enum).toEqual(LANE_CYCLES.map((l) => l.id));
  });

  it('accepts every generated record, in a file of one and of many, as the reader does', () => {
    fc.assert(
      fc.property(fc.array(recordArb, { minLength: 1, maxLength: 3 }), (cases) => {
        for (const c of cases) {
          expect(valid(recordSchema, c)).toBe(true);
          expect(readerAccepts(c)).toEqual({ ok: true });
        }
        const one = toCaseFile(cases[0]!, '0.2.0');
        const many = toCasesFile(cases, '0.2.0');
        expect(valid(root, one)).toBe(true);
        expect(valid(root, many)).toBe(true);
        expect(() => parseCaseFileAll(JSON.stringify(many))).not.toThrow();
      }),
      { numRuns: 100 },
    );
  });

  it('agrees with validateCase on mutated records: never stricter, and looser only where the schema says the reader checks more', () => {
    const tally = { bothReject: 0, bothAccept: 0, beyond: 0 };
    fc.assert(
      fc.property(recordArb, fc.nat(), fc.constantFrom(...values), (c, pick, value) => {
        const { mutated, path } = mutateAt(c, pick, value);
        const bySchema = valid(recordSchema, mutated);
        const byReader = readerAccepts(mutated);
        if (bySchema === byReader.ok) {
          tally[bySchema ? 'bothAccept' : 'bothReject']++;
          return;
        }
        // the only disagreement allowed: the schema accepts, the reader refuses a rule beyond it
        expect(bySchema, `schema refused what the reader accepts at ${path}`).toBe(true);
        const failedAt = (byReader as { path: string }).path;
        expect(BEYOND_SCHEMA.some((re) => re.test(failedAt)), `reader refused ${failedAt} (mutated ${path})`).toBe(true);
        tally.beyond++;
      }),
      { numRuns: 1500, seed: 7 },
    );
    expect(tally.bothReject).toBeGreaterThan(100);
    expect(tally.bothAccept).toBeGreaterThan(50);
    expect(tally.beyond).toBeGreaterThan(0);
  });

  it('agrees with the file reader on the file’s own fields', () => {
    const c = JSON.parse(JSON.stringify(fc.sample(recordArb, { numRuns: 1, seed: 3 })[0]));
    const cases: [string, unknown][] = [
      ['one case', { format: 'clip-caliper-case', schema: 3, exportedBy: 'x', case: c }],
      ['several', { format: 'clip-caliper-case', schema: 3, cases: [c, c] }],
      ['schema 1 wrapper of a current record', { format: 'clip-caliper-case', schema: 1, case: c }],
      ['both case and cases', { format: 'clip-caliper-case', schema: 3, case: c, cases: [c] }],
      ['neither', { format: 'clip-caliper-case', schema: 2 }],
      ['another format', { format: 'other', schema: 3, case: c }],
      ['a newer schema', { format: 'clip-caliper-case', schema: 3, case: c }],
      ['a fractional schema', { format: 'clip-caliper-case', schema: 1.5, case: c }],
      ['no schema', { format: 'clip-caliper-case', case: c }],
      ['an empty list', { format: 'clip-caliper-case', schema: 3, cases: [] }],
      ['a long exportedBy', { format: 'clip-caliper-case', schema: 3, exportedBy: 'x'.repeat(201), case: c }],
      ['a list', [c]],
    ];
    for (const [name, file] of cases) {
      let reader = true;
      try {
        parseCaseFileAll(JSON.stringify(file));
      } catch (e) {
        expect(e).toBeInstanceOf(CaseFormatError);
        reader = false;
      }
      expect(valid(root, file), name).toBe(reader);
    }
  });
});

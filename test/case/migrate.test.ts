import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseCaseFile } from '../../src/case/casefile';
import { MIGRATIONS, migrate, readCaseRecord } from '../../src/case/migrate';
import { SCHEMA_VERSION } from '../../src/case/schema';
import { validateCase } from '../../src/case/validate';
import { recordArb, v1RecordArb } from './arbitraries';
import { failure } from './expect-format-error';

const fixture = (name: string) => readFileSync(`test/case/fixtures/v1/${name}`, 'utf8');
const clone = <T>(x: T): T => JSON.parse(JSON.stringify(x)) as T;


describe('the migration list', () => {
  it('climbs one version at a time from 1 to the current schema', () => {
    expect(MIGRATIONS.map((m) => [m.from, m.to])).toEqual(Array.from({ length: SCHEMA_VERSION - 1 }, (_, i) => [i + 1, i + 2]));
  });
});

describe('version 2 records (a fixture in the shape the version 2 code wrote, read by it)', () => {
  it('logged-case.json migrates to a valid current record, keeping every field it had, its history too', () => {
    const raw = JSON.parse(readFileSync('test/case/fixtures/v2/logged-case.json', 'utf8'));
    const before = clone(raw);
    const c = readCaseRecord(raw);
    expect(c.schema).toBe(SCHEMA_VERSION);
    const { schema: _s, history: _h, ...v2Fields } = before;
    expect(c).toMatchObject(v2Fields);
    expect(c.history).toHaveLength(1);
    expect(c.history[0]!.schema).toBe(SCHEMA_VERSION);
    expect(c.history[0]).toMatchObject({ notes: '', status: 'open', keptAt: 1764000100000 });
    // a version 2 direction reads as it was: "same" still means one of the two ways, not said which
    expect(c.assumptions!.direction).toBe('same');
    expect(raw).toEqual(before);
  });
});

describe('version 1 records (fixture files as the version 1 code wrote them)', () => {
  it.each(['empty-case.json', 'marked-case.json'])('%s migrates to a valid current record, keeping every field it had', (name) => {
    const raw = JSON.parse(fixture(name));
    const before = clone(raw);
    const c = readCaseRecord(raw);
    expect(c.schema).toBe(SCHEMA_VERSION);
    expect(c.status).toBe('open');
    expect(c.tags).toEqual([]);
    expect(c.history).toEqual([]);
    // nothing the user entered changed: every version 1 field is there, equal
    const { schema: _s, ...v1Fields } = before;
    expect(c).toMatchObject(v1Fields);
    expect(raw).toEqual(before); // the stored value is not mutated
  });

  it('a version 1 case file reads through parseCaseFile (what npm run solve uses)', () => {
    const c = parseCaseFile(fixture('case-file.json'));
    expect(c.schema).toBe(SCHEMA_VERSION);
    expect(c.marks).toHaveLength(4);
    expect(c.video.duration).toBeNull();
    expect(c.assumptions?.observerSpeedMs).toEqual({ lo: 24, hi: 26 });
  });

  it('validation runs after migration and names the bad field of the migrated record', () => {
    const raw = JSON.parse(fixture('marked-case.json'));
    raw.marks[2].kind = 'banana';
    expect(failure(() => readCaseRecord(raw)).path).toBe('case.marks[2].kind');
    const noVideo = { schema: 1, id: 'x' };
    expect(failure(() => readCaseRecord(noVideo)).message).toBe('case.video: expected an object');
  });

  it('a version 1 record with notes past the new limit is refused (and so quarantined, not cut)', () => {
    const raw = JSON.parse(fixture('empty-case.json'));
    raw.notes = 'n'.repeat(20_001);
    expect(failure(() => readCaseRecord(raw)).message).toBe('case.notes: expected 0 to 20000 characters, got 20001');
  });
});

describe('migrate', () => {
  it('refuses a version newer than this release, saying so and naming the field', () => {
    const e = failure(() => migrate({ schema: SCHEMA_VERSION + 1, id: 'x' }));
    expect(e.path).toBe('case.schema');
    expect(e.message).toContain('newer');
    expect(e.message).toContain(`versions 1 to ${SCHEMA_VERSION}`);
  });

  it.each([
    ['no version', {}],
    ['version 0', { schema: 0 }],
    ['a version in text', { schema: '1' }],
    ['a fractional version', { schema: 1.5 }],
  ])('refuses %s, naming case.schema', (_n, raw) => {
    expect(failure(() => migrate(raw)).path).toBe('case.schema');
  });

  it('refuses what is not an object', () => {
    for (const raw of [null, 3, 'case', [1]]) expect(failure(() => migrate(raw, 'file.case')).path).toBe('file.case');
  });

  it('property: any version 1 record migrates to a valid record, once and for all (idempotent, non-mutating)', () => {
    fc.assert(
      fc.property(v1RecordArb, (v1) => {
        const before = clone(v1);
        const once = migrate(v1);
        expect(v1).toEqual(before);
        expect(() => validateCase(once)).not.toThrow();
        expect(migrate(once)).toEqual(once);
        expect(migrate(clone(once))).toEqual(once);
        // every mark survives, in order, unchanged
        expect((once as { marks: unknown[] }).marks).toEqual(before.marks);
      }),
      { numRuns: 200 },
    );
  });

  it('property: a current record is returned as it is', () => {
    fc.assert(
      fc.property(recordArb(), (c) => {
        expect(migrate(c)).toBe(c);
        expect(readCaseRecord(clone(c))).toEqual(c);
      }),
      { numRuns: 100 },
    );
  });
});

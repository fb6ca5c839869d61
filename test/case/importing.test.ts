import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CASE_FILE_FORMAT, MAX_CASE_FILE_BYTES, MAX_CASES_PER_FILE, parseCaseFile, parseCaseFileAll, toCaseFile, toCasesFile } from '../../src/case/casefile';
import { contentKey, exportFileName, mergeCase, planImport } from '../../src/case/importing';
import { newCase, upsertMark, withAnnotation } from '../../src/case/marks';
import { MAX_HISTORY, type CaseRecord } from '../../src/case/schema';
import { CaseFormatError, MAX_MARKS_PER_CASE, validateCase } from '../../src/case/validate';
import { markArb, recordArb } from './arbitraries';
import { failure } from './expect-format-error';

const video = { pageUrl: 'http://127.0.0.1:8000/plain.html', pageTitle: 'Invented clip', src: '', width: 640, height: 360, duration: 4 };
const mapping = { objectFit: 'fill', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };
const ID = '0123456789abcdef';
const clone = <T>(x: T): T => JSON.parse(JSON.stringify(x)) as T;
const markAt = (id: string, x: number) => ({ id, kind: 'object-span' as const, t: 1, points: [{ x, y: 1 }, { x: x + 9, y: 1 }], edgeSigmaPx: 0.5, mapping, createdAt: 1 });

const base = upsertMark(newCase(ID, video, '0.1.0', 100), markAt('m1', 10), 200);
const edited = withAnnotation(upsertMark(base, markAt('m2', 50), 300), { status: 'explained' }, 300);


describe('merging one case', () => {
  it('the newer by updatedAt stays in front, the other goes into history', () => {
    const m = mergeCase(base, edited, 999);
    expect(m.updatedAt).toBe(300);
    expect(m.marks.map((x) => x.id)).toEqual(['m1', 'm2']);
    expect(m.history).toHaveLength(1);
    const { history: _h, ...baseBody } = base;
    expect(m.history[0]).toEqual({ ...baseBody, keptAt: 999 });
    expect(validateCase(m)).toStrictEqual(m);
    // whichever side is stored, the same front and the same history
    const other = mergeCase(edited, base, 999);
    expect(contentKey(other)).toBe(contentKey(m));
    expect(other.history.map(contentKey)).toEqual(m.history.map(contentKey));
  });

  it('an import of what is already stored changes nothing (the stored record itself comes back)', () => {
    expect(mergeCase(edited, clone(edited), 999)).toBe(edited);
    const merged = mergeCase(base, edited, 999);
    expect(mergeCase(merged, clone(edited), 1000)).toBe(merged);
    expect(mergeCase(merged, clone(base), 1000)).toBe(merged); // the older version is already in history
  });

  it('on a tie of updatedAt the stored record stays in front', () => {
    const rival = withAnnotation(base, { notes: 'another reviewer (invented)' }, base.updatedAt);
    const m = mergeCase(base, rival, 5);
    expect(m.notes).toBe('');
    expect(m.history[0]!.notes).toBe('another reviewer (invented)');
  });

  it('histories of both sides are kept, newest first, without repeats', () => {
    const v3 = withAnnotation(edited, { tags: ['night'] }, 400);
    const a = mergeCase(base, edited, 10); // front edited(300), history base(200)
    const b = mergeCase(v3, base, 11); // front v3(400), history base(200)
    const m = mergeCase(a, b, 12);
    expect(m.updatedAt).toBe(400);
    expect(m.history.map((h) => h.updatedAt)).toEqual([300, 200]);
  });

  it('more than MAX_HISTORY versions is refused, not trimmed', () => {
    let c: CaseRecord = base;
    for (let i = 1; i <= MAX_HISTORY; i++) c = mergeCase(c, withAnnotation(base, { notes: `v${i}` }, 200 + i), i);
    expect(c.history).toHaveLength(MAX_HISTORY);
    const e = failure(() => mergeCase(c, withAnnotation(base, { notes: 'one more' }, 10_000), 0));
    expect(e.message).toContain(`more than the ${MAX_HISTORY} a case holds; nothing was imported`);
  });
});

describe('planning an import', () => {
  it('a new id is added, a stored id merged; only changed records are written', () => {
    const other = newCase('fedcba9876543210', video, '0.1.0', 5);
    const stored = new Map([[ID, base]]);
    const plan = planImport(stored, [edited, other], 50);
    expect(plan.added).toEqual(['fedcba9876543210']);
    expect(plan.merged).toEqual([ID]);
    expect(plan.writes.map((c) => c.id).sort()).toEqual([ID, 'fedcba9876543210'].sort());
    const again = planImport(new Map(plan.writes.map((c) => [c.id, c])), [clone(edited), clone(other)], 60);
    expect(again.writes).toEqual([]);
    expect(again.merged.sort()).toEqual([ID, 'fedcba9876543210'].sort());
  });

  it('two records of one id in a file merge in turn', () => {
    const plan = planImport(new Map(), [base, edited], 1);
    expect(plan.added).toEqual([ID]);
    expect(plan.merged).toEqual([]);
    expect(plan.writes).toHaveLength(1);
    expect(plan.writes[0]!.updatedAt).toBe(300);
    expect(plan.writes[0]!.history).toHaveLength(1);
  });
});

describe('case files of one or many cases', () => {
  it('one case round-trips; several round-trip; the recompute reads a one-case file only', () => {
    expect(parseCaseFile(JSON.stringify(toCaseFile(edited, '0.2.0')))).toEqual(edited);
    const other = newCase('fedcba9876543210', video, '0.1.0', 5);
    const many = JSON.stringify(toCasesFile([edited, other], '0.2.0'));
    expect(parseCaseFileAll(many)).toEqual([edited, other]);
    expect(failure(() => parseCaseFile(many)).message).toBe('file.cases: holds 2 cases; this reads one (export that case alone)');
    expect(parseCaseFile(JSON.stringify(toCasesFile([edited], '0.2.0')))).toEqual(edited);
  });

  it('a bad file is refused whole, naming the first bad field by its path', () => {
    const file = clone(toCasesFile([base, edited, base], '0.2.0'));
    (file.cases[1]!.marks[1]!.points[0] as { x: unknown }).x = 'left';
    (file.cases[2] as { status: unknown }).status = 'closed';
    expect(failure(() => parseCaseFileAll(JSON.stringify(file))).path).toBe('file.cases[1].marks[1].points[0].x');
    expect(failure(() => parseCaseFileAll(JSON.stringify({ format: CASE_FILE_FORMAT, schema: 3, case: base, cases: [base] }))).path).toBe('file');
    expect(failure(() => parseCaseFileAll(JSON.stringify({ format: CASE_FILE_FORMAT, schema: 3, cases: [] }))).path).toBe('file.cases');
    expect(failure(() => parseCaseFileAll(JSON.stringify({ format: CASE_FILE_FORMAT, schema: 4, case: base }))).message).toContain('newer');
    expect(failure(() => parseCaseFileAll(JSON.stringify({ format: CASE_FILE_FORMAT, schema: 3, case: { ...base, schema: 4 } }))).path).toBe('file.case.schema');
    expect(failure(() => parseCaseFileAll('[]')).path).toBe('file');
  });

  it('size limits: whole file bytes (counted in UTF-8), cases per file, marks per case', () => {
    // 7 million three-byte characters: under the limit in length, over it in bytes
    expect(failure(() => parseCaseFileAll('€'.repeat(7_000_000))).message).toBe(`file: larger than ${MAX_CASE_FILE_BYTES} bytes (the limit for a case file)`);
    const tooMany = { format: CASE_FILE_FORMAT, schema: 3, cases: Array.from({ length: MAX_CASES_PER_FILE + 1 }, () => 0) };
    expect(failure(() => parseCaseFileAll(JSON.stringify(tooMany))).message).toBe(`file.cases: expected at most ${MAX_CASES_PER_FILE} cases, got ${MAX_CASES_PER_FILE + 1}`);
    const big = { ...base, marks: Array.from({ length: MAX_MARKS_PER_CASE + 1 }, (_, i) => markAt(`m${i}`, 1)) };
    expect(failure(() => parseCaseFileAll(JSON.stringify({ format: CASE_FILE_FORMAT, schema: 3, case: big }))).message).toBe(
      `file.case.marks: expected at most ${MAX_MARKS_PER_CASE} marks, got ${MAX_MARKS_PER_CASE + 1}`,
    );
  });

  it('strings stay data: markup and a "__proto__" key are kept as text and do not touch any prototype', () => {
    const spoiled = clone(toCaseFile(base, '0.2.0')) as unknown as { case: Record<string, unknown> };
    spoiled.case.notes = '<img src=x onerror="alert(1)"><script>globalThis.ran = 1</script>';
    const text = JSON.stringify(spoiled).replace('"notes"', '"__proto__":{"polluted":true},"notes"');
    const [c] = parseCaseFileAll(text);
    expect(c!.notes).toBe('<img src=x onerror="alert(1)"><script>globalThis.ran = 1</script>');
    expect((globalThis as { ran?: unknown }).ran).toBeUndefined();
    expect(({} as { polluted?: unknown }).polluted).toBeUndefined();
    expect(Object.getPrototypeOf(c)).toBe(Object.prototype);
  });
});

describe('file names by case and date', () => {
  it('one case: the first 8 of its id and the UTC date; several: the count', () => {
    const t = Date.UTC(2026, 11, 2, 23, 59);
    expect(exportFileName([ID], t)).toBe('clip-caliper-01234567-2026-12-02.json');
    expect(exportFileName([ID, 'x'], t)).toBe('clip-caliper-2-cases-2026-12-02.json');
    expect(exportFileName(['a/b:c'], t, 'csv')).toBe('clip-caliper-a_b_c-2026-12-02.csv');
  });
});

/*
 * Property-based: random and mutated files never corrupt what is stored and always give either
 * a merge or a clear rejection. "Stored" is a map the import may only read; what it would write
 * comes back as a plan, and applying the plan must keep every stored version somewhere.
 */
const storedArb = fc.uniqueArray(recordArb(), { selector: (c) => c.id, maxLength: 4 });

function applyPlan(stored: Map<string, CaseRecord>, text: string, now: number) {
  const incoming = parseCaseFileAll(text);
  const plan = planImport(stored, incoming, now);
  const after = new Map(stored);
  for (const c of plan.writes) after.set(c.id, validateCase(c));
  return { plan, after, incoming };
}

/** Every stored record's content is still there after the import: in front, or in its history. */
function keepsEverything(before: Map<string, CaseRecord>, after: Map<string, CaseRecord>) {
  for (const [id, c] of before) {
    const now = after.get(id)!;
    const kept = [contentKey(now), ...now.history.map(contentKey)];
    expect(kept).toContain(contentKey(c));
    for (const h of c.history) expect(kept).toContain(contentKey(h));
  }
}

const mutation = fc.oneof(
  fc.constant<unknown>(null),
  fc.constant<unknown>(-1),
  fc.constant<unknown>('x'),
  fc.constant<unknown>(1e20),
  fc.constant<unknown>([]),
  fc.constant<unknown>({}),
  fc.constant<unknown>(true),
  fc.constant<unknown>(undefined),
);

/** Replaces the value at a random path in a JSON value (an index into its flattened paths). */
function mutateAt(root: unknown, pick: number, value: unknown): unknown {
  const paths: (string | number)[][] = [];
  const walk = (x: unknown, p: (string | number)[]) => {
    paths.push(p);
    if (Array.isArray(x)) x.forEach((v, i) => walk(v, [...p, i]));
    else if (typeof x === 'object' && x !== null) for (const k of Object.keys(x)) walk((x as Record<string, unknown>)[k], [...p, k]);
  };
  walk(root, []);
  const path = paths[pick % paths.length]!;
  if (path.length === 0) return value;
  const copy = clone(root) as Record<string | number, unknown>;
  let at = copy;
  for (const k of path.slice(0, -1)) at = at[k] as Record<string | number, unknown>;
  const last = path.at(-1)!;
  if (value === undefined) delete at[last];
  else at[last] = value;
  return copy;
}

describe('import, property-based (fast-check)', () => {
  it('a good file merges: every stored and every imported version is kept, and the result is valid', () => {
    fc.assert(
      fc.property(storedArb, fc.array(fc.nat(10), { maxLength: 4 }), fc.array(recordArb(), { maxLength: 3 }), (stored, pickIds, fresh) => {
        const before = new Map(stored.map((c) => [c.id, c]));
        const frozen = clone([...before.entries()]);
        // the file holds edited copies of some stored cases and some new ones
        const copies = pickIds.filter((i) => i < stored.length).map((i) => withAnnotation(stored[i]!, { notes: `edit ${i}` }, stored[i]!.updatedAt + 1 + i));
        const text = JSON.stringify(toCasesFile([...copies, ...fresh].length ? [...copies, ...fresh] : [stored[0] ?? newCase(ID, video, '0.1.0', 1)], '0.2.0'));
        const { after, incoming } = applyPlan(before, text, 5);
        expect(clone([...before.entries()])).toEqual(frozen); // the stored map was only read
        keepsEverything(before, after);
        for (const c of incoming) {
          const now = after.get(c.id)!;
          expect([contentKey(now), ...now.history.map(contentKey)]).toContain(contentKey(c));
        }
        // importing the same file again changes nothing
        expect(applyPlan(after, text, 6).plan.writes).toEqual([]);
      }),
      { numRuns: 150 },
    );
  });

  it('a mutated file gives either a merge that keeps everything or a rejection naming a field; never a throw of another kind', () => {
    const seen = { merged: 0, rejected: 0 };
    fc.assert(
      fc.property(storedArb, fc.nat(), mutation, fc.boolean(), (stored, pick, value, asText) => {
        const before = new Map(stored.map((c) => [c.id, c]));
        const frozen = clone([...before.entries()]);
        const file = toCasesFile(stored.length ? stored.map((c) => withAnnotation(c, { notes: 'imported' }, c.updatedAt + 1)) : [newCase(ID, video, '0.1.0', 1)], '0.2.0');
        let text = JSON.stringify(mutateAt(file, pick, value)) ?? '';
        if (asText) text = text.slice(0, Math.max(0, text.length - 1 - (pick % 20))); // a truncated file
        let result: ReturnType<typeof applyPlan> | null = null;
        try {
          result = applyPlan(before, text, 7);
          seen.merged++;
        } catch (e) {
          seen.rejected++;
          expect(e).toBeInstanceOf(CaseFormatError);
          expect((e as CaseFormatError).path).toMatch(/^(file|case [0-9a-f]{16}\.history)/);
          expect((e as Error).message.length).toBeGreaterThan((e as CaseFormatError).path.length + 2);
        }
        expect(clone([...before.entries()])).toEqual(frozen);
        if (result) keepsEverything(before, result.after);
      }),
      { numRuns: 400, seed: 42 },
    );
    // both outcomes were exercised (a fixed seed keeps this from depending on luck)
    expect(seen.merged).toBeGreaterThan(10);
    expect(seen.rejected).toBeGreaterThan(10);
  });

  it('random text is refused with a message, never crashes the parser', () => {
    fc.assert(
      fc.property(fc.oneof(fc.string(), fc.json()), (text) => {
        expect(() => parseCaseFileAll(text)).toThrow(CaseFormatError);
      }),
      { numRuns: 300 },
    );
  });

  it('generated marks round-trip through a file unchanged', () => {
    fc.assert(
      fc.property(fc.array(markArb('g'), { maxLength: 20 }), (marks) => {
        const c = clone({ ...base, marks: marks.map((m, i) => ({ ...m, id: `g${i}` })) });
        expect(parseCaseFile(JSON.stringify(toCaseFile(c, '0.2.0')))).toEqual(c);
      }),
    );
  });
});

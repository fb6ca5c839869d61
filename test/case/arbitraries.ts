import fc from 'fast-check';
import { CASE_STATUSES, MARK_KINDS, POINTS_PER_KIND, type CaseRecord, type CaseVersion, type Mark, type MarkKind } from '../../src/case/schema';

/*
 * fast-check generators of well-formed records: version 1 (as the version 1 code wrote them),
 * version 2, and the current version 3 (with its new mark kinds and a landmark's dimension). Every
 * value stays inside the bounds validate.ts documents, so a generated record is valid by
 * construction; tests spoil them on purpose.
 */

const W = 640;
const H = 360;
const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: W, height: H }, scale: 1, devicePixelRatio: 1 };
const time = fc.integer({ min: 1_600_000_000_000, max: 1_900_000_000_000 });
const text = (max: number) => fc.string({ maxLength: max, unit: 'grapheme' });

/** The kinds versions 1 and 2 knew. */
const OLD_KINDS: readonly MarkKind[] = ['object-span', 'landmark-span', 'frame-edges', 'lane-dash', 'object-centre'];

export const markArb = (idPrefix: string, kinds: readonly MarkKind[] = MARK_KINDS): fc.Arbitrary<Mark> =>
  fc
    .record({
      n: fc.nat(1_000_000),
      kind: fc.constantFrom<MarkKind>(...kinds),
      t: fc.double({ min: 0, max: 600, noNaN: true }),
      xs: fc.array(fc.double({ min: -W, max: 2 * W, noNaN: true }), { minLength: 2, maxLength: 2 }),
      ys: fc.array(fc.double({ min: -H, max: 2 * H, noNaN: true }), { minLength: 2, maxLength: 2 }),
      sigma: fc.double({ min: 0, max: 50, noNaN: true }),
      by: fc.option(fc.string({ minLength: 1, maxLength: 30 }), { nil: undefined }),
      createdAt: time,
    })
    .map(({ n, kind, t, xs, ys, sigma, by, createdAt }) => {
      const points = Array.from({ length: POINTS_PER_KIND[kind] }, (_, i) => ({ x: xs[i]!, y: ys[i]! }));
      return {
        id: `${idPrefix}${n}`,
        kind,
        t,
        points,
        edgeSigmaPx: sigma,
        ...(kind === 'object-span' ? { dimension: 'wingspan' as const } : {}),
        ...(kind === 'landmark-span' && kinds.includes('horizon') && n % 2 === 0 ? { landmarkDimension: n % 4 === 0 ? ('height' as const) : ('width' as const) } : {}),
        ...(by !== undefined ? { by } : {}),
        mapping,
        createdAt,
      };
    });

const videoArb = fc.record({
  pageUrl: fc.constantFrom('http://127.0.0.1:8000/plain.html', 'http://127.0.0.1:8000/several.html?clip=2', 'http://localhost:8001/invented'),
  pageTitle: text(60),
  src: fc.constantFrom('', 'http://127.0.0.1:8000/clips/invented.webm'),
  width: fc.constant(W),
  height: fc.constant(H),
  duration: fc.option(fc.double({ min: 0, max: 3600, noNaN: true }), { nil: null }),
});

const idArb = fc.stringMatching(/^[0-9a-f]{16}$/);

/** A version 1 record exactly as the version 1 code wrote it (no status, tags or history). */
export const v1RecordArb = fc
  .record({ id: idArb, video: videoArb, marks: fc.array(markArb('m', OLD_KINDS), { maxLength: 6 }), created: time, later: fc.nat(1_000_000) })
  .map(({ id, video, marks, created, later }) => ({
    schema: 1,
    id,
    video,
    marks,
    notes: '',
    createdAt: created,
    updatedAt: created + later,
    toolVersion: '0.1.0',
  }))
  // what storage and files hold is JSON: -0 becomes 0, absent options vanish
  .map((r) => JSON.parse(JSON.stringify(r)) as typeof r);

const tagsArb = fc.uniqueArray(fc.stringMatching(/^[a-z0-9][a-z0-9 -]{0,30}[a-z0-9]$/), { maxLength: 5 });

/** A version 2 record with no history, for an id (or any id). */
export const v2RecordArb = (id?: string): fc.Arbitrary<CaseRecord> =>
  fc
    .record({
      base: v1RecordArb,
      notes: text(200),
      status: fc.constantFrom(...CASE_STATUSES),
      tags: tagsArb,
    })
    .map(({ base, notes, status, tags }) => ({ ...base, id: id ?? base.id, schema: 2, notes, status, tags, history: [] as CaseVersion[] }));

/** A current (version 3) record with no history, for an id (or any id): every mark kind. */
export const recordArb = (id?: string): fc.Arbitrary<CaseRecord> =>
  fc
    .record({ base: v2RecordArb(id), marks: fc.array(markArb('m'), { maxLength: 6 }) })
    .map(({ base, marks }) => JSON.parse(JSON.stringify({ ...base, schema: 3, marks })) as CaseRecord);

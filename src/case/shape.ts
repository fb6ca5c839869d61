import * as v from 'valibot';
import { LANE_CYCLES } from '../engine/lanes';
import { pathSegment } from './nesting';
import {
  CASE_STATUSES,
  MARK_KINDS,
  MAX_HISTORY,
  MAX_MARKS_PER_CASE,
  MAX_NOTES_CHARS,
  MAX_TAG_CHARS,
  MAX_TAGS,
  POINTS_PER_KIND,
  SCHEMA_VERSION,
} from './case-limits';
import { JSON_EXTRA, at, codePoints, describe, num, obj, oneOf, range, text, withJson, type Issue, type Step } from './shape-parts';

export { JSON_EXTRA, codePoints, describe };

/*
 * The case file's shape, written once. The types (schema.ts), the reader (validate.ts) and the
 * published JSON Schema (case-file.schema.json, made by `npm run schema` through json-schema.ts)
 * all come from the definitions below. valibot validates by walking these objects (no eval, no
 * new Function: extension pages' CSP forbids both) and each check is a separate import, so a
 * bundle carries only the ones used here.
 *
 * Rules every definition keeps (the reader's promises):
 * - a field the definition does not list is dropped, never stored (v.object builds its output
 *   from the listed keys only); a listed field given as undefined counts as absent;
 * - a known field that is wrong is refused, its message naming the allowed range, and the reader
 *   names its path (validate.ts);
 * - the checks JSON Schema cannot say (a range's ends in order, points within their video,
 *   distinct ids) sit here too, as rawChecks beside the shape they look at.
 *
 * JSON_EXTRA (shape-parts.ts) records what a check means in JSON Schema when the converter cannot
 * see it (a custom check): json-schema.ts merges it in, so the published file says what the reader does.
 */

// ---- the case ---------------------------------------------------------------------------------

/** Largest video side in pixels a case accepts. */
export const MAX_PX = 20_000;

/**
 * A page or media address kept as it is: http, https or file, or empty (a scheme is
 * case-insensitive, RFC 3986 section 3.1). Anchored at the first character: a URL parser strips
 * leading spaces and drops tabs inside a scheme ("java\tscript:"), this does not.
 */
export const KEPT_ADDRESS_PATTERN = '^(?:[Hh][Tt][Tt][Pp][Ss]?:|[Ff][Ii][Ll][Ee]:|$)';
const KEPT_ADDRESS = new RegExp(KEPT_ADDRESS_PATTERN);
export const KEPT_SCHEMES = ['http', 'https', 'file'] as const;
export const isKeptAddress = (s: string): boolean => KEPT_ADDRESS.test(s);

export const videoSchema = v.pipe(
  obj({
    pageUrl: v.pipe(
      text(0, 8192),
      v.regex(KEPT_ADDRESS, (i: Issue) => `expected an http, https or file address (or nothing), got ${describe(i.input)}`),
      v.description('The page address, without its fragment: an http, https or file address, or empty. Another scheme (javascript:, data:, about:) is refused.'),
    ),
    pageTitle: text(0, 2000, "The page's title when the case was made (plain text)."),
    // the media address only informs (the case id was made from it): one on another scheme (data:,
    // blob:) is what an empty address already means, a media with no address of its own
    src: v.pipe(
      text(0, 8192),
      v.transform((s: string) => (isKeptAddress(s) ? s : '')),
      v.description(
        'The media’s own address, or empty for a stream object. An address on another scheme than http, https or file (a data: or blob: address) is read as empty: the media has no address of its own to keep.',
      ),
    ),
    width: num(1, MAX_PX, "The video's intrinsic width, pixels: marks are in this pixel space."),
    height: num(1, MAX_PX, "The video's intrinsic height, pixels."),
    duration: v.pipe(v.nullable(num(0, 1e7)), v.description('Seconds; null for a live stream with no duration.')),
  }),
  v.description('The video the case measures.'),
);

export const pointSchema = v.pipe(
  obj({
    x: num(-MAX_PX, 2 * MAX_PX, 'Column, pixels; the reader also holds it within -width..2 x width of its video (a snapped end may sit a little past the picture).'),
    y: num(-MAX_PX, 2 * MAX_PX, 'Row, pixels; the reader also holds it within -height..2 x height of its video.'),
  }),
  v.description('A point in intrinsic video pixels, x right, y down.'),
);

const coord = (description: string) => v.optional(num(-1e7, 1e7, description));
const mappingSchema = v.pipe(
  obj({
    objectFit: v.optional(text(0, 200, "The video element's CSS object-fit.")),
    objectPosition: v.optional(text(0, 200, "The video element's CSS object-position.")),
    picture: v.optional(
      v.pipe(
        obj({ x: coord('left edge'), y: coord('top edge'), width: coord('width'), height: coord('height') }),
        v.description("The drawn picture's rectangle in CSS pixels, relative to the element's content box."),
      ),
    ),
    scale: coord("The element's CSS transform scale (1 when none)."),
    devicePixelRatio: coord("The window's device pixel ratio."),
  }),
  v.description('How CSS pixels were mapped to intrinsic pixels when the mark was made: kept for audit, not used by the figures. Every field is optional; other fields are dropped.'),
);

/** How a followed mark was found (issue 15): from which hand mark, in which run, with which settings. */
const followedSchema = v.pipe(
  obj({
    from: text(1, 100, 'The id of the hand-placed mark the follow started from.'),
    run: text(1, 100, 'The id of the follow run that placed it (every mark of one run shares it).'),
    confidence: num(0, 1, "The follow's confidence in this frame, 0 to 1."),
    match: num(-1, 10, "The weaker end's template match over what the picture's noise lets it reach."),
    settings: obj({
      searchPx: num(1, 100, 'Search radius per frame, pixels.'),
      minMatch: num(0, 1, 'Least match for a frame to be followed.'),
      reacquireMatch: num(0, 1, 'Least match to pick the object up again after a lost frame.'),
      maxLostFrames: num(0, 1000, 'Frames tried after a loss before giving up.'),
      maxSpanChange: num(0, 1, 'Largest change of the span per frame, as a share of its length.'),
    }),
  }),
  v.description('Present when the mark was found by following the object from a hand-placed mark, not placed by hand.'),
);

/** Kinds grouped by how many points they take, for the JSON Schema's if/then. */
const kindsByCount = [...new Set(Object.values(POINTS_PER_KIND))].map((n) => ({ n, kinds: MARK_KINDS.filter((k) => POINTS_PER_KIND[k] === n) }));
const markFields = obj({
    id: text(1, 100, "The mark's id, unique in its case."),
    kind: oneOf(
      MARK_KINDS as unknown as readonly [(typeof MARK_KINDS)[number], ...(typeof MARK_KINDS)[number][]],
      'What was marked: object-span (the object’s two ends), landmark-span (a landmark’s two ends), frame-edges (the camera frame’s left and right edges), lane-dash (a lane dash passing the reference line: one point), object-centre (the object’s centre: one point), frame-top-bottom (the camera frame’s top and bottom edges), horizon (two points on the true horizon), road-ahead (where the road ahead vanishes: one point).',
    ),
    t: num(0, 1e7, "The video's currentTime when the mark was taken, seconds."),
    points: v.pipe(v.array(pointSchema, 'expected a list'), v.description('Two points for the span, edge and horizon kinds, one for lane-dash, object-centre and road-ahead.')),
    edgeSigmaPx: num(0, 50, 'Standard deviation of each point along the span, pixels.'),
    dimension: v.optional(oneOf(['wingspan', 'length', 'height', 'other'], 'Which dimension of the object an object span is.')),
    landmarkId: v.optional(text(1, 100, 'Which landmark, when several are marked.')),
    landmarkDimension: v.optional(
      oneOf(['height', 'width'], "Which of the landmark's dimensions its span is (landmark spans): a height stands on the ground, its lower end the foot; a width is level. Absent: a height."),
    ),
    by: v.optional(text(1, 100, 'Who marked it, if the user gave a name (no accounts).')),
    followed: v.optional(followedSchema),
    mapping: mappingSchema,
    createdAt: num(0, 1e14, 'When the mark was made, milliseconds since 1970-01-01 UTC.'),
});
const pointsPerKind = withJson(
  v.rawCheck<v.InferOutput<typeof markFields>>(({ dataset, addIssue }) => {
    if (!dataset.typed) return;
    const { kind, points } = dataset.value;
    if (points.length !== POINTS_PER_KIND[kind]) at(addIssue, dataset.value, ['points'], `expected ${POINTS_PER_KIND[kind]} points for ${kind}`);
  }),
  {
    allOf: kindsByCount.map(({ n, kinds }) => ({
      if: { properties: { kind: { enum: kinds } } },
      then: { properties: { points: { type: 'array', minItems: n, maxItems: n } } },
    })),
  },
);

export const markSchema = v.pipe(
  markFields,
  pointsPerKind,
  v.description('One mark on a paused frame.'),
);

export const hfovRange = range(0.01, 179.9, 'Horizontal field of view of the camera, degrees.');
export const sizeRange = range(0.001, 1000, 'A length in metres.');
export const aspectRange = range(0.01, 179.99, 'Aspect angle between the sight line and the marked dimension, degrees (90 = broadside).');
export const speedRange = range(0, 1000, "The observer's ground speed, metres per second.");
// a headwind beyond hurricane force (Beaufort 12 starts at 32.7 m/s, WMO) is a typing slip
export const headwindRange = range(-60, 60, "Wind component against the object's motion, metres per second (negative: a tailwind).");
export const headingRange = range(-180, 180, "The camera's optical axis against the observer's direction of travel, degrees (0 ahead, 90 to the right, -90 to the left).");

const landmarkSizes = v.pipe(
  v.array(obj({ id: text(1, 100, 'The landmarkId of its marks.'), sizeM: sizeRange }), 'expected a list of at most 100 landmarks'),
  v.maxLength(100, 'expected a list of at most 100 landmarks'),
  v.rawCheck(({ dataset, addIssue }) => {
    if (!dataset.typed) return;
    const ids = new Set<string>();
    for (const [i, l] of dataset.value.entries()) {
      if (ids.has(l.id)) return at(addIssue, dataset.value, [i, 'id'], `"${l.id}" has a size already`);
      ids.add(l.id);
    }
  }),
  v.description('Sizes of particular landmarks by their landmarkId; ids are distinct (checked by the reader).'),
);

const LANE_CYCLE_IDS = LANE_CYCLES.map((l) => l.id) as unknown as readonly [string, ...string[]];

export const assumptionsSchema = v.pipe(
  obj({
    cameraLabel: text(0, 200, 'What camera the field of view stands for (plain text).'),
    hfovDeg: hfovRange,
    sizeLabel: text(0, 200, 'What size class the object’s size stands for (plain text).'),
    objectSizeM: sizeRange,
    sizeDimension: v.optional(oneOf(['wingspan', 'length'], "Which of the object's dimensions objectSizeM is, so its spans are marked as the same one; absent: not said.")),
    aspectDeg: aspectRange,
    landmarkSizeM: sizeRange,
    landmarkSizes: v.optional(landmarkSizes),
    landmarkAspectDeg: v.optional(aspectRange),
    observerSpeedMs: v.optional(speedRange),
    laneCycleId: v.optional(oneOf(LANE_CYCLE_IDS, "The broken lane-line pattern on the road (src/engine/lanes.ts), when the observer's speed is measured from lane dashes.")),
    objectKind: v.optional(oneOf(['fixed-wing-transport', 'fixed-wing-light', 'light-sport', 'rotorcraft', 'unknown'], 'What the object is taken to be, for the plausibility verdict.')),
    direction: v.optional(
      oneOf(
        ['opposite', 'same', 'same-slower', 'same-faster', 'unknown'],
        "Which way the object moves against the observer's travel; absent or unknown: every reading is shown. same-slower: the observer passes it; same-faster: it passes the observer; same: one of the two.",
      ),
    ),
    trackAngleDeg: v.optional(range(-80, 80, "The object's track against the road, degrees (0 parallel). Absent: parallel.")),
    cameraHeightM: v.optional(range(0, 1000, "The camera's height above the ground, m. Absent: 1 to 3 m.")),
    elevationDeg: v.optional(range(-30, 85, "The object's elevation above the horizontal, degrees, seen square to the road; used only when nothing in the frame gives it.")),
    headwindMs: v.optional(headwindRange),
    fixedCamera: v.optional(
      v.pipe(
        obj({
          mount: oneOf(['tripod', 'vehicle'], 'What held the camera.'),
          axisHeadingDeg: headingRange,
          pitchDeg: v.optional(range(-89, 89, 'The optical axis above the horizontal, degrees; a marked horizon measures it instead. Absent and no horizon: level.')),
        }),
        v.description('The camera kept its aim (a tripod, or a mount fixed to the vehicle): marks then give bearings.'),
      ),
    ),
  }),
  v.description('The assumptions behind the case’s figures; absent means the tool’s defaults.'),
);

const time = (description: string) => num(0, 1e14, description);

export const notesSchema = text(0, MAX_NOTES_CHARS, `The moderator's notes, plain text (never rendered as markup). At most ${MAX_NOTES_CHARS} characters (MAX_NOTES_CHARS).`);
export const statusSchema = oneOf(
  CASE_STATUSES as unknown as readonly [(typeof CASE_STATUSES)[number], ...(typeof CASE_STATUSES)[number][]],
  'Where the moderator stands on the case: open (not yet judged), explained (the picture is accounted for), second-look (someone else should look).',
  true,
);
export const tagsSchema = v.pipe(
  v.array(
    v.pipe(
      text(1, MAX_TAG_CHARS),
      // JavaScript's \s is exactly the set String.prototype.trim removes
      v.regex(/^\S(?:[\s\S]*\S)?$/, 'expected no spaces at either end'),
      v.description(`One tag: no spaces at either end, 1 to ${MAX_TAG_CHARS} characters.`),
    ),
    'expected a list',
  ),
  v.maxLength(MAX_TAGS, (i: Issue) => `expected at most ${MAX_TAGS} tags, got ${(i.input as unknown[]).length}`),
  withJson(
    v.rawCheck<string[]>(({ dataset, addIssue }) => {
      if (!dataset.typed) return;
      const seen = new Set<string>();
      for (const [i, t] of dataset.value.entries()) {
        if (seen.has(t)) return at(addIssue, dataset.value, [i], `"${t}" is already a tag of this case`);
        seen.add(t);
      }
    }),
    { uniqueItems: true },
  ),
  v.description(`The moderator's tags, distinct, at most ${MAX_TAGS}.`),
);

/** What a record and an earlier version of it share, in the order they are checked. */
const bodyEntries = {
  // a number that must equal the current version (not a literal type: records of older versions are typed alike before migration)
  schema: v.pipe(
    v.number((i: Issue) => `expected ${SCHEMA_VERSION}, got ${String(i.input)}`),
    v.value(SCHEMA_VERSION, (i: Issue) => `expected ${SCHEMA_VERSION}, got ${String(i.input)}`),
    v.description(`The record's schema version. This file describes version ${SCHEMA_VERSION}; older records are migrated when read (src/case/migrate.ts).`),
  ),
  id: text(1, 200, 'The case id: one per video on one page (src/case/ids.ts), stable across reloads.'),
  video: videoSchema,
  marks: v.pipe(
    v.array(markSchema, 'expected a list'),
    v.maxLength(MAX_MARKS_PER_CASE, (i: Issue) => `expected at most ${MAX_MARKS_PER_CASE} marks, got ${(i.input as unknown[]).length}`),
    v.description(`The marks, in the order they were made. At most ${MAX_MARKS_PER_CASE} (MAX_MARKS_PER_CASE).`),
  ),
  notes: notesSchema,
  status: statusSchema,
  tags: tagsSchema,
  assumptions: v.optional(assumptionsSchema),
  createdAt: time('When the case was created, milliseconds since 1970-01-01 UTC.'),
  updatedAt: time('When the case last changed, milliseconds since 1970-01-01 UTC. An import keeps the newer of two versions in front by this field.'),
  toolVersion: text(1, 50, 'The version of the tool that created the case.'),
};

/** Every point within -width..2 x width and -height..2 x height of its video (a snapped end may sit a little past the picture). */
export function pointsWithinVideo(
  marks: readonly { points: readonly { x: number; y: number }[] }[],
  width: number,
  height: number,
): { steps: [Step, ...Step[]]; message: string } | undefined {
  for (let i = 0; i < marks.length; i++) {
    const points = marks[i]!.points;
    for (let j = 0; j < points.length; j++) {
      const p = points[j]!;
      if (p.x < -width || p.x > 2 * width) return { steps: [i, 'points', j, 'x'], message: `expected ${-width} to ${2 * width}, got ${p.x}` };
      if (p.y < -height || p.y > 2 * height) return { steps: [i, 'points', j, 'y'], message: `expected ${-height} to ${2 * height}, got ${p.y}` };
    }
  }
  return undefined;
}

const pointsInVideo = <T extends { video: { width: number; height: number }; marks: { points: { x: number; y: number }[] }[] }>() =>
  v.rawCheck<T>(({ dataset, addIssue }) => {
    if (!dataset.typed) return;
    const bad = pointsWithinVideo(dataset.value.marks, dataset.value.video.width, dataset.value.video.height);
    if (bad) at(addIssue, dataset.value, ['marks', ...bad.steps], bad.message);
  });

const versionFields = obj({
    ...bodyEntries,
    // refused, not dropped: a version inside a version would hide a case
    history: v.optional(v.never('an earlier version holds no history of its own')),
    keptAt: time('When an import set this version aside, milliseconds since 1970-01-01 UTC.'),
});
export const versionSchema = v.pipe(
  versionFields,
  pointsInVideo<v.InferOutput<typeof versionFields>>(),
  v.description('An earlier version of the case: the record’s fields without its own history, plus when it was set aside.'),
);

const recordFields = obj({
    ...bodyEntries,
    history: v.pipe(
      v.array(versionSchema, 'expected a list'),
      v.maxLength(MAX_HISTORY, (i: Issue) => `expected at most ${MAX_HISTORY} earlier versions, got ${(i.input as unknown[]).length}`),
      v.description(`Earlier versions of this same case kept by an import, newest first, at most ${MAX_HISTORY} (MAX_HISTORY).`),
    ),
});
export const recordSchema = v.pipe(
  recordFields,
  pointsInVideo<v.InferOutput<typeof recordFields>>(),
  v.rawCheck<v.InferOutput<typeof recordFields>>(({ dataset, addIssue }) => {
    if (!dataset.typed) return;
    // a version of another case would be a different case hidden inside this one
    const { id, history } = dataset.value;
    const i = history.findIndex((h) => h.id !== id);
    if (i >= 0) at(addIssue, dataset.value, ['history', i, 'id'], `expected the case's own id ${id}, got ${history[i]!.id}`);
  }),
  v.description('A case: one measured video.'),
);

// ---- the file ---------------------------------------------------------------------------------

export const CASE_FILE_FORMAT = 'clip-caliper-case';
/** Five times the thousand cases the log is built to stay quick with. */
export const MAX_CASES_PER_FILE = 5_000;
/** Twice the whole local storage quota (10 MiB), so no file that could be imported is refused for its size alone. */
export const MAX_CASE_FILE_BYTES = 20 * 1024 * 1024;

/**
 * The file's own fields around its records. `record` is what a record is checked against: the
 * reader passes anything (each record is migrated from its own version before it is checked),
 * the published schema passes recordSchema.
 */
export function caseFileShape<R extends v.GenericSchema>(record: R) {
  const newer = (i: Issue) =>
    typeof i.input === 'number' && Number.isInteger(i.input) && i.input > SCHEMA_VERSION
      ? `version ${i.input} was written by a newer Clip Caliper; this one reads versions 1 to ${SCHEMA_VERSION}`
      : `expected a whole number from 1 to ${SCHEMA_VERSION}`;
  const exportedBy = withJson(
    v.check((s: string) => codePoints(s) <= 200, 'expected text of at most 200 characters'),
    { maxLength: 200 },
  );
  const fields = obj({
      format: v.pipe(v.literal(CASE_FILE_FORMAT, `expected "${CASE_FILE_FORMAT}"`), v.description('Marks the file as a Clip Caliper case file.')),
      schema: v.pipe(
        v.number(newer),
        v.integer(newer),
        v.minValue(1, newer),
        v.maxValue(SCHEMA_VERSION, newer),
        v.description(`The schema version the file was written with. A version above ${SCHEMA_VERSION} is refused: it was written by a newer release.`),
      ),
      exportedBy: v.optional(v.pipe(v.string('expected text of at most 200 characters'), exportedBy, v.description("Which release wrote the file, for the reader's information."))),
      // the one case of a single-case file (what npm run solve reads); a bare reference, so the published schema points at its definition
      case: v.optional(record),
      cases: v.optional(
        v.pipe(
          v.array(record, 'expected a list'),
          v.minLength(1, 'expected at least one case'),
          v.maxLength(MAX_CASES_PER_FILE, (i: Issue) => `expected at most ${MAX_CASES_PER_FILE} cases, got ${(i.input as unknown[]).length}`),
          v.description(`The cases of a file of several, at most ${MAX_CASES_PER_FILE} (MAX_CASES_PER_FILE).`),
        ),
      ),
    });
  return v.pipe(
    fields,
    withJson(
      v.rawCheck<v.InferOutput<typeof fields>>(({ dataset, addIssue }) => {
        if (dataset.typed && ('case' in dataset.value) === ('cases' in dataset.value)) {
          addIssue({ message: 'expected either "case" (one case) or "cases" (a list), not both or neither' });
        }
      }),
      { oneOf: [{ required: ['case'] }, { required: ['cases'] }] },
    ),
  );
}

/** The reader's file check: the wrapper only; each record is read on its own after. */
export const caseFileWrapper = caseFileShape(v.unknown());

/** Turns valibot's first issue into the reader's error text: the path from `root`, then the problem. */
export function issuePath(issue: Issue, root: string): string {
  return root + (issue.path ?? []).map((p) => pathSegment(p.key as string | number)).join('');
}

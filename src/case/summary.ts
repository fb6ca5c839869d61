import { InputError } from '../engine/errors';
import { CLASS_ENVELOPES, VERDICT_SENTENCES } from '../engine/plausibility';
import type { Estimate } from '../engine/stats';
import type { RegimeShares } from '../engine/uncertainty';
import { formatEstimate, formatQuantity, type Quantity, type UnitSystem } from '../engine/units';
import { finite, inRange } from '../engine/validate';
import { magnitude, type CaseAnalysis, type JudgedReading, type SpeedReading, type TimestampFigures } from './analysis';
import { defaultAssumptions } from './assumptions';
import type { CaseAssumptions, CaseRecord, Mark } from './schema';

/*
 * The shareable summary of a case, as plain text or Markdown. Both formats render one document
 * model built once from the case and its analysis, so they cannot drift apart in content or in any
 * number; the command-line recompute prints the same text byte for byte, which is why nothing here
 * reads the clock, the locale or the environment.
 */

export type SummaryFormat = 'text' | 'markdown';

export interface SummaryOptions {
  format: SummaryFormat;
  system: UnitSystem;
  /** The version of the tool printing the summary (the case records the one that made it). */
  toolVersion: string;
}

/** The caution lines, always printed: the summary travels without the tool's own screens around it. */
export const SUMMARY_CAUTIONS: readonly string[] = Object.freeze([
  'Never operate this tool, or film, while driving.',
  'These figures are estimates from a picture, not evidence of an incident.',
  'Real aviation safety concerns go to the aviation authority.',
  'A finding about a clip is not a finding about the person who posted it.',
]);

/* ----------------------------------------------------------------------------------------------
 * Document model. Leaves are plain strings; each renderer escapes or wraps them its own way.
 */

type Block =
  | { kind: 'para'; text: string }
  | { kind: 'list'; items: string[] }
  | { kind: 'fields'; rows: Row[] }
  | { kind: 'sub'; title: string; blocks: Block[] }
  | { kind: 'table'; head: string[]; rows: string[][] };

/** A label and its value; 'address' marks a web address, which Markdown shows as a link. */
type Row = [string, string] | [string, string, 'address'];

interface Section {
  title: string;
  blocks: Block[];
}

interface Doc {
  title: string;
  sections: Section[];
  closing: string;
}

const DOC_TITLE = 'Clip Caliper case summary';
const TOOL_NAME = 'Clip Caliper';
// the case schema's own bound on a video's duration (src/case/validate.ts)
const MAX_DURATION_S = 1e7;
// the latest instant a JavaScript Date can represent, ms since 1970
const MAX_DATE_MS = 8.64e15;
/** Marks within half a frame at 24 fps belong to one paused frame (as frames.ts marksAt). */
const SAME_FRAME_S = 1 / 48;

/**
 * The case's summary: where the clip is, the cautions, what was marked, every assumption with its
 * spread, every figure with its 5-95 % interval, the fit, the verdict and the method. Pure and
 * deterministic: the same case, analysis and options give the same text.
 */
export function summaryText(c: CaseRecord, analysis: CaseAnalysis, options: SummaryOptions): string {
  const { format, system, toolVersion } = checkOptions(options);
  checkCase(c);
  checkAnalysis(c, analysis);
  const doc = buildDoc(c, analysis, system, toolVersion);
  return format === 'markdown' ? renderMarkdown(doc) : renderText(doc);
}

/** A timestamp as m:ss.sss with its seconds, e.g. "1:02.500 (62.500 s)". */
export function formatStamp(t: number): string {
  inRange('timestamp', t, 0, MAX_DURATION_S, ' s');
  // round to the millisecond first, so 59.9996 s reads 1:00.000, not 0:60.000
  const ms = Math.round(t * 1000);
  const m = Math.floor(ms / 60_000);
  const s = ((ms - m * 60_000) / 1000).toFixed(3).padStart(6, '0');
  return `${m}:${s} (${(ms / 1000).toFixed(3)} s)`;
}

/* ---------------------------------------------------------------------------------------------- */

function checkOptions(o: SummaryOptions): SummaryOptions {
  if (typeof o !== 'object' || o === null) throw new InputError('summary options', o, 'an object with format, system and toolVersion');
  if (o.format !== 'text' && o.format !== 'markdown') throw new InputError('summary format', o.format, 'text or markdown');
  if (o.system !== 'metric' && o.system !== 'imperial' && o.system !== 'aviation') {
    throw new InputError('unit system', o.system, 'metric, imperial or aviation');
  }
  if (typeof o.toolVersion !== 'string' || o.toolVersion.trim() === '' || o.toolVersion.length > 50) {
    throw new InputError('tool version', o.toolVersion, 'a non-empty text of at most 50 characters');
  }
  return o;
}

function checkCase(c: CaseRecord): void {
  if (typeof c !== 'object' || c === null) throw new InputError('case', c, 'a case record');
  if (typeof c.video !== 'object' || c.video === null) throw new InputError('case video', c.video, 'the video details of the case');
  if (!Array.isArray(c.marks)) throw new InputError('case marks', c.marks, 'a list of marks');
  inRange('case created time', c.createdAt, 0, MAX_DATE_MS, ' ms since 1970');
  inRange('case updated time', c.updatedAt, 0, MAX_DATE_MS, ' ms since 1970');
  finite('video width', c.video.width);
  finite('video height', c.video.height);
  if (c.video.duration !== null) inRange('video duration', c.video.duration, 0, MAX_DURATION_S, ' s');
  c.marks.forEach((m, i) => {
    inRange(`mark ${i + 1} time`, m.t, 0, MAX_DURATION_S, ' s');
    finite(`mark ${i + 1} edge uncertainty`, m.edgeSigmaPx);
    if (!Array.isArray(m.points)) throw new InputError(`mark ${i + 1} points`, m.points, 'a list of points');
    m.points.forEach((p, j) => {
      finite(`mark ${i + 1} point ${j + 1} x`, p.x);
      finite(`mark ${i + 1} point ${j + 1} y`, p.y);
    });
  });
}

function checkAnalysis(c: CaseRecord, a: CaseAnalysis): void {
  if (typeof a !== 'object' || a === null || !Array.isArray(a.timestamps) || typeof a.assumptions !== 'object') {
    throw new InputError('analysis', a, 'the result of analyseCase for this case');
  }
  // a summary that pairs one case's marks with another's figures would be worse than none
  const ids = new Set(c.marks.map((m) => m.id));
  for (const ts of a.timestamps) {
    if (!ids.has(ts.objectMark?.id)) {
      throw new InputError('analysis', `figures for mark ${String(ts.objectMark?.id)}`, 'the analysis of this same case (analyseCase of it)');
    }
  }
}

/* ---------------------------------------------------------------------------------------------- */

const REGIME_TEXT: Readonly<Record<keyof RegimeShares, string>> = {
  between: 'between the road and the object’s track',
  beyond: 'beyond the object',
  behind: 'behind the observer (out of view)',
  none: 'none (constant bearing)',
};

const KIND_TEXT: Readonly<Record<Mark['kind'], string>> = {
  'object-span': 'object ends',
  'landmark-span': 'landmark ends',
  'frame-edges': 'camera frame edges',
  'lane-dash': 'lane dash leading edge',
  'object-centre': 'object centre',
  'frame-top-bottom': 'camera frame top and bottom edges',
  horizon: 'horizon',
  'road-ahead': 'road ahead vanishing point',
};

const INTERVAL_NOTE = 'median and 5-95 % interval';

const DIRECTION_TEXT: Readonly<Record<CaseAnalysis['assumptions']['direction'], string>> = {
  opposite: 'against the observer’s travel',
  same: 'the same way as the observer',
  'same-slower': 'the same way as the observer, slower (the observer passes it)',
  'same-faster': 'the same way as the observer, faster (it passes the observer)',
  unknown: 'not known, so every reading the picture allows is shown',
};

/** What a speed reading rests on, as a sentence fragment. */
function readingText(x: SpeedReading): string {
  switch (x.basis) {
    case 'landmark':
      return `the implied ground speed at ${formatStamp(x.t!)} (a landmark on the sight line)`;
    case 'track':
      return 'the fixed camera’s ground track';
    case 'fit-opposite':
      return 'the range-over-time fit, if the object moves against the observer';
    case 'fit-same-slower':
      return 'the range-over-time fit, if the object moves the same way, slower';
    case 'fit-same-faster':
      return 'the range-over-time fit, if the object moves the same way, faster';
  }
}

function buildDoc(c: CaseRecord, r: CaseAnalysis, system: UnitSystem, toolVersion: string): Doc {
  return {
    title: DOC_TITLE,
    sections: [
      clipSection(c),
      { title: 'Cautions', blocks: [{ kind: 'list', items: [...SUMMARY_CAUTIONS] }] },
      marksSection(c, r),
      assumptionsSection(c, r, system),
      resultsSection(r, system),
      methodSection(r),
    ],
    closing: `Summary by ${TOOL_NAME} ${toolVersion.trim()}, from the case file alone.`,
  };
}

function clipSection(c: CaseRecord): Section {
  const v = c.video;
  const duration = v.duration === null ? 'none (a live stream)' : formatStamp(v.duration);
  return {
    title: 'The clip',
    blocks: [
      {
        kind: 'fields',
        rows: [
          v.pageUrl ? ['Page address', v.pageUrl, 'address'] : ['Page address', '(none recorded)'],
          ['Page title', v.pageTitle || '(none recorded)'],
          ['Video size', `${v.width} x ${v.height} px (intrinsic)`],
          ['Duration', duration],
          ['Case', c.id],
          ['Created', isoUtc(c.createdAt)],
          ['Last changed', isoUtc(c.updatedAt)],
          ['Recorded with', `${TOOL_NAME} ${c.toolVersion}`],
        ],
      },
    ],
  };
}

function isoUtc(ms: number): string {
  return new Date(ms).toISOString();
}

const px = (v: number) => v.toFixed(1);
const point = (p: { x: number; y: number }) => `(${px(p.x)}, ${px(p.y)})`;

function describeMark(m: Mark): [string, string] {
  let label = KIND_TEXT[m.kind] ?? m.kind;
  if (m.kind === 'object-span' && m.dimension) label += ` (${m.dimension})`;
  if (m.kind === 'landmark-span' && m.landmarkId) label += ` (${m.landmarkId})`;
  const pts = m.points.map(point).join(' to ');
  const [p, q] = m.points;
  const span = p && q ? `, span ${px(Math.hypot(q.x - p.x, q.y - p.y))} px` : '';
  return [label, `${pts}${span}, edge uncertainty ${px(m.edgeSigmaPx)} px`];
}

/** Marks grouped by paused frame, in time order (stable for marks at the same time). */
function frameGroups(marks: readonly Mark[]): Mark[][] {
  const sorted = marks.map((m, i) => ({ m, i })).sort((a, b) => a.m.t - b.m.t || a.i - b.i);
  const groups: Mark[][] = [];
  let start = -Infinity;
  for (const { m } of sorted) {
    if (m.t - start >= SAME_FRAME_S || groups.length === 0) {
      groups.push([]);
      start = m.t;
    }
    groups[groups.length - 1]!.push(m);
  }
  return groups;
}

function marksSection(c: CaseRecord, r: CaseAnalysis): Section {
  const f = r.frame;
  const edges = c.marks.some((m) => m.kind === 'frame-edges');
  const frameText = edges
    ? `the marked picture edges: left ${px(f.left)} px, right ${px(f.right)} px (${px(f.right - f.left)} px wide), full height ${px(f.bottom - f.top)} px`
    : `the whole video, ${px(f.right - f.left)} x ${px(f.bottom - f.top)} px`;
  const blocks: Block[] = [
    {
      kind: 'para',
      text: 'Points are in the video’s intrinsic pixels (x right, y down from the top left); the edge uncertainty is the standard deviation (1 sd) of each end along its span.',
    },
    { kind: 'fields', rows: [['Camera frame used', frameText]] },
  ];
  const groups = frameGroups(c.marks);
  if (groups.length === 0) blocks.push({ kind: 'para', text: 'Nothing has been marked yet.' });
  for (const g of groups) blocks.push({ kind: 'sub', title: formatStamp(g[0]!.t), blocks: [{ kind: 'fields', rows: g.map(describeMark) }] });
  return { title: 'What was marked', blocks };
}

/* ---------------------------------------------------------------------------------------------- */

type Stored = CaseAssumptions[keyof CaseAssumptions];

function sameStored(x: Stored, y: Stored): boolean {
  // stored values are plain data (strings, ranges, a small object of them): compare them as data
  return JSON.stringify(x) === JSON.stringify(y);
}

function assumptionsSection(c: CaseRecord, r: CaseAnalysis, system: UnitSystem): Section {
  const a = r.assumptions;
  const given = c.assumptions;
  const defaults = defaultAssumptions();
  // "default" when the case holds the tool's own value: nobody should take a default for a measurement
  const origin = (key: keyof CaseAssumptions): string => {
    if (a.defaults || !given) return 'default';
    const v = given[key];
    if (v === undefined) return 'not given';
    return sameStored(v, defaults[key]) ? 'the tool’s default value' : 'given';
  };
  const bandText = (b: { lo: number; hi: number }, kind: Quantity) =>
    b.lo === b.hi ? `${formatQuantity(b.lo, kind, system)} exactly` : `${formatQuantity(b.lo, kind, system)} to ${formatQuantity(b.hi, kind, system)}`;
  const kindLabel = a.objectKind === 'unknown' ? 'unknown' : CLASS_ENVELOPES[a.objectKind].label;
  const rows: [string, string][] = [
    ['Camera label', `${a.cameraLabel} (${origin('cameraLabel')})`],
    ['Horizontal field of view', `${bandText(a.hfov, 'angle')} (${origin('hfovDeg')})`],
    ['Size label', `${a.sizeLabel} (${origin('sizeLabel')})`],
    ['Object size', `${bandText(a.objectSize, 'length')} (${origin('objectSizeM')})`],
    ['Aspect angle', `${bandText(a.aspect, 'angle')}, where 90° is broadside (${origin('aspectDeg')})`],
    ['Landmark size', `${bandText(a.landmarkSize, 'length')} (${origin('landmarkSizeM')})`],
    [
      'Observer speed',
      r.laneSpeed
        ? `${bandText(a.observerSpeed!, 'speed')}, measured from ${r.laneSpeed.passes} lane-dash passes between ${formatStamp(r.laneSpeed.t1)} and ${formatStamp(r.laneSpeed.t2)} on a ${formatQuantity(r.laneSpeed.cycleM, 'length', system)} cycle (${r.laneSpeed.cycleLabel}; ${r.laneSpeed.source})`
        : a.observerSpeed
          ? `${bandText(a.observerSpeed, 'speed')} (${origin('observerSpeedMs')})`
          : `not given; there is no default, so no implied speed and no verdict${r.laneSpeedMissing ? ` (${r.laneSpeedMissing})` : ''}`,
    ],
    ['Kind of object', `${kindLabel} (${origin('objectKind')})`],
    ['Direction of travel', `${DIRECTION_TEXT[a.direction]} (${origin('direction')})`],
    ['Wind', a.headwind ? `${bandText(a.headwind, 'speed')} against the object’s motion, negative for a tailwind (${origin('headwindMs')})` : `none assumed (${origin('headwindMs')})`],
    [
      'Camera aim',
      a.fixedCamera
        ? `kept fixed (${a.fixedCamera.mount === 'tripod' ? 'a tripod' : 'a mount fixed to the vehicle'}), the optical axis ${bandText(a.fixedCamera.axisHeading, 'angle')} from the observer’s direction of travel, positive to the right (${origin('fixedCamera')})`
        : `hand-held or turning: no ground track (${origin('fixedCamera')})`,
    ],
  ];
  const lead = a.defaults
    ? 'Nothing was entered for this case: every assumption below is the tool’s default.'
    : 'Assumptions entered for this case; values equal to the tool’s defaults say so.';
  return {
    title: 'Assumptions',
    blocks: [
      { kind: 'para', text: `${lead} Each range is drawn uniformly between its ends in every Monte Carlo draw.` },
      { kind: 'fields', rows },
      // said beside the size it contradicts: a reader recomputing the figures should see it first
      ...(r.dimensionMismatch ? [{ kind: 'para' as const, text: `Warning: ${r.dimensionMismatch}` }] : []),
    ],
  };
}

/* ---------------------------------------------------------------------------------------------- */

/** A share as a percentage to 3 significant figures, plain decimal. */
function pct(x: number): string {
  finite('share', x);
  const v = 100 * x;
  const s = v.toPrecision(3);
  return s.includes('e') ? String(Math.round(v)) : Object.is(Number(s), -0) ? s.replace('-', '') : s;
}

function fractionText(e: Estimate): string {
  const lo = pct(e.p05);
  const hi = pct(e.p95);
  const between = lo.startsWith('-') || hi.startsWith('-') ? ' to ' : '-';
  return `${pct(e.median)} % (${lo}${between}${hi} %, 5-95 %)`;
}

function speedText(e: Estimate, system: UnitSystem): string {
  if (e.p95 < 0) return `${formatEstimate(magnitude(e), 'speed', system)}, opposite to the observer’s travel`;
  if (e.p05 > 0) return `${formatEstimate(e, 'speed', system)}, the same way as the observer`;
  return `${formatEstimate(e, 'speed', system)}, signed along the observer’s travel: the direction is not settled`;
}

const NO_LANDMARK = 'no landmark marked on this frame';

function fixedPointText(ts: TimestampFigures, r: CaseAnalysis): string {
  const f = ts.result.fixedPointFraction;
  if (f && ts.regime) {
    const share = ts.result.regimeShares ? ` in ${pct(ts.result.regimeShares[ts.regime])} % of draws` : '';
    return `${fractionText(f)} of the way to the object; ${REGIME_TEXT[ts.regime]}${share}`;
  }
  if (!ts.landmarkMark) return NO_LANDMARK;
  return r.assumptions.observerSpeed ? 'not determined by the draws' : 'needs the observer’s speed';
}

function impliedText(ts: TimestampFigures, r: CaseAnalysis, system: UnitSystem): string {
  if (ts.result.impliedSpeed) return speedText(ts.result.impliedSpeed, system);
  if (!ts.landmarkMark) return NO_LANDMARK;
  return r.assumptions.observerSpeed ? 'not determined by the draws' : 'needs the observer’s speed';
}

function resultsSection(r: CaseAnalysis, system: UnitSystem): Section {
  const blocks: Block[] = [
    { kind: 'para', text: `Each figure is the ${INTERVAL_NOTE} over the Monte Carlo draws; a span in pixels is as marked.` },
  ];

  const perTime: Block[] = [];
  if (r.timestamps.length === 0) {
    perTime.push({ kind: 'para', text: 'No figures: the object’s ends have not been marked on any frame that could be solved.' });
  } else {
    // landmark columns only when some frame has a landmark: a column of "none" says nothing
    const landmarks = r.timestamps.some((ts) => ts.landmarkMark);
    const head = ['Time', 'Object span', 'Angular size', 'Range'];
    if (landmarks) head.push('Landmark range', 'Motionless point', 'Implied object speed');
    perTime.push({
      kind: 'table',
      head,
      rows: r.timestamps.map((ts) => {
        const row = [formatStamp(ts.t), `${px(ts.spanPx)} px`, formatEstimate(ts.result.angularSize, 'angle', system), formatEstimate(ts.result.range, 'distance', system)];
        if (landmarks) {
          const lr = ts.result.landmarkRange;
          row.push(lr ? formatEstimate(lr, 'distance', system) : NO_LANDMARK, fixedPointText(ts, r), impliedText(ts, r, system));
        }
        return row;
      }),
    });
    if (!landmarks) {
      perTime.push({
        kind: 'para',
        text: 'No landmark was marked on these frames, so there is no landmark range, motionless point or implied object speed.',
      });
    }
    const dropped = r.timestamps.filter((ts) => ts.result.keptShare < 1);
    if (dropped.length > 0) {
      perTime.push({
        kind: 'list',
        items: dropped.map((ts) => `At ${formatStamp(ts.t)} ${pct(ts.result.keptShare)} % of draws gave a range; the rest were degenerate and left out.`),
      });
    }
  }
  blocks.push({ kind: 'sub', title: 'Per timestamp', blocks: perTime });
  blocks.push({ kind: 'sub', title: 'Range over time', blocks: seriesBlocks(r, system) });
  blocks.push({ kind: 'sub', title: 'Ground track (fixed camera)', blocks: trackBlocks(r, system) });
  blocks.push({ kind: 'sub', title: 'Verdict on the picture', blocks: verdictBlocks(r, system) });
  if (r.problems.length > 0) blocks.push({ kind: 'sub', title: 'Marks that could not be solved', blocks: [{ kind: 'list', items: [...r.problems] }] });
  return { title: 'Results', blocks };
}

function seriesBlocks(r: CaseAnalysis, system: UnitSystem): Block[] {
  const s = r.series;
  if (!s) return [{ kind: 'para', text: r.seriesMissing ?? 'No range-over-time fit.' }];
  const rows: [string, string][] = [
    ['Closest approach', formatEstimate(s.closestApproach, 'distance', system)],
    ['Relative speed', formatEstimate(s.relativeSpeed, 'speed', system)],
    ['Time of closest approach', formatEstimate(s.tClosest, 'time', system)],
  ];
  const fit = r.readings.filter((x) => x.basis.startsWith('fit-'));
  if (!s.objectSpeed) rows.push(['Object speed', 'needs the observer’s speed']);
  else if (fit.length === 0) rows.push(['Object speed', `no reading fits both the draws and the direction assumed (${DIRECTION_TEXT[r.assumptions.direction]})`]);
  else {
    for (const x of fit) {
      const label = x.basis === 'fit-opposite' ? 'Object speed, if opposite' : x.basis === 'fit-same-slower' ? 'Object speed, if same way, slower' : 'Object speed, if same way, faster';
      rows.push([label, formatEstimate(x.speed, 'speed', system)]);
    }
  }
  if (r.window) {
    rows.push(['Observation window', `${formatEstimate(r.window.estimate, 'time', system)} within ${formatQuantity(r.window.halfAngle, 'angle', system)} of abeam (half the field of view)`]);
    rows.push(['Against the clip', r.window.clipLength === null ? 'a live stream, of no fixed length' : `${formatQuantity(r.window.clipLength, 'time', system)} long, exactly (the video’s duration)`]);
  }
  rows.push(['Failed fits', `${pct(s.failedShare)} % of draws (left out of the figures)`]);
  return [
    {
      kind: 'para',
      text: 'Closest approach includes the height difference; the object speed is given for each direction of travel the draws and the direction assumed allow, since the picture alone does not say which. The observation window is 2 D tan(A) / V, its ends from the ends of D and V.',
    },
    { kind: 'fields', rows },
  ];
}

function trackBlocks(r: CaseAnalysis, system: UnitSystem): Block[] {
  const t = r.track;
  if (!t) return [{ kind: 'para', text: r.trackMissing ?? 'No ground track.' }];
  const rows: [string, string][] = [
    ['Object ground speed', formatEstimate(t.speed, 'speed', system)],
    ['Heading', `${formatEstimate(t.heading, 'angle', system)} from the observer’s direction of travel, positive to the right`],
    ['Closest approach', `${formatEstimate(t.closestApproach, 'distance', system)} horizontally`],
  ];
  if (t.residualRms !== null) rows.push(['Scatter about a straight track', `${formatEstimate(t.residualRms, 'distance', system)} RMS`]);
  return [
    { kind: 'para', text: 'Each timestamp places the object by its bearing (the span’s midpoint) and range; a straight, steady track is fitted through the places.' },
    { kind: 'fields', rows },
  ];
}

function verdictBlocks(r: CaseAnalysis, system: UnitSystem): Block[] {
  if (r.verdicts.length === 0) return [{ kind: 'para', text: r.verdictMissing ?? 'No verdict.' }];
  const kindLabel = r.assumptions.objectKind === 'unknown' ? 'an object of unknown kind' : `a ${CLASS_ENVELOPES[r.assumptions.objectKind].label}`;
  const blocks: Block[] = [];
  if (r.verdicts.length > 1) {
    blocks.push({ kind: 'para', text: `The direction of travel is not settled, so there is one verdict for each reading (${r.verdicts.length}).` });
  }
  for (const j of r.verdicts) blocks.push(...oneVerdict(j, r, kindLabel, system));
  blocks.push({ kind: 'para', text: 'The verdict is about the figures this picture gives under the assumptions above, not about anyone.' });
  return blocks;
}

function oneVerdict(j: JudgedReading, r: CaseAnalysis, kindLabel: string, system: UnitSystem): Block[] {
  const v = j.verdict;
  const wind = r.assumptions.headwind
    ? `with the wind assumed, an airspeed of ${formatEstimate(j.airspeed, 'speed', system)}`
    : 'no wind given';
  const rows: [string, string][] = [
    ['Finding', VERDICT_SENTENCES[v.level]],
    ['Judged on', `${readingText(j.reading)}, ${formatEstimate(j.reading.speed, 'speed', system)}, as ${kindLabel}; ${wind}; no altitude or flight phase given`],
    ['Rule', `${v.rule.text} (rule ${v.rule.id})`],
    ['Source', v.rule.source],
  ];
  if (v.hover) {
    rows.push([
      'Hovering',
      `would need a headwind of about ${formatQuantity(v.hover.headwindNeededMs, 'speed', system)} (from the median speed): Beaufort force ${v.hover.beaufort.force}, ${v.hover.beaufort.description}`,
    ]);
  }
  const blocks: Block[] = [{ kind: 'fields', rows }];
  if (v.notes.length > 0) blocks.push({ kind: 'list', items: [...v.notes] });
  return blocks;
}

function methodSection(r: CaseAnalysis): Section {
  const runs = (xs: { draws: number; seed: number }[]) =>
    [...new Set(xs.map((x) => `${x.draws} draws, seed ${x.seed}`))].join('; ');
  const frameRuns = r.timestamps.length > 0 ? runs(r.timestamps.map((ts) => ts.result)) : 'none run (nothing solved)';
  const seriesRuns = r.series ? runs([r.series]) : 'none run (no fit)';
  const trackRuns = r.track ? runs([r.track]) : 'none run (no ground track)';
  return {
    title: 'Method',
    blocks: [
      {
        kind: 'list',
        items: [
          'Pinhole camera with exact ray angles: a pixel (x, y) looks along the ray (x - W/2, y - H/2, f), f = (W/2) / tan(HFOV/2); the angle between two ends is the angle between their rays, exact anywhere in the frame.',
          'Range from angular size: R = L sin(a) / (2 tan(theta/2)) for true size L, aspect angle a and angular size theta.',
          'Sight-line fixed point by the intercept theorem (Euclid, Elements VI.2): the landmark the object seems pinned over lies d / R of the way along the sight line.',
          'Implied speed from a landmark on the same sight line: w = u (1 - R/d), u the observer’s speed, d the landmark’s range.',
          'Weighted least-squares range-over-time fit, R(t)^2 = D^2 + V^2 (t - t0)^2, with a parametric bootstrap.',
          'Fixed-camera ground track: each place is the camera’s place plus the horizontal range along the aim plus the bearing; a least-squares straight line through the places gives speed and heading.',
          `Seeded Monte Carlo, median and 5-95 % interval: single-frame figures ${frameRuns}; range-over-time fit ${seriesRuns}; ground track ${trackRuns}.`,
        ],
      },
    ],
  };
}

/* ----------------------------------------------------------------------------------------------
 * Plain text: underlined headings, aligned label columns, prose wrapped under 100 characters.
 */

const WIDTH = 99;

function renderText(doc: Doc): string {
  const out: string[] = [doc.title, '='.repeat(doc.title.length), ''];
  for (const s of doc.sections) {
    out.push(s.title, '-'.repeat(s.title.length), '');
    for (const b of s.blocks) textBlock(b, '', out);
  }
  out.push(...wrap(clean(doc.closing), '', ''));
  return `${out.join('\n')}\n`;
}

function textBlock(b: Block, indent: string, out: string[]): void {
  switch (b.kind) {
    case 'para':
      out.push(...wrap(clean(b.text), indent, indent), '');
      return;
    case 'list':
      for (const item of b.items) out.push(...wrap(clean(item), `${indent}- `, `${indent}  `));
      out.push('');
      return;
    case 'fields':
      textFields(b.rows, indent, out);
      out.push('');
      return;
    case 'sub':
      out.push(`${indent}${clean(b.title)}`, `${indent}${'~'.repeat(clean(b.title).length)}`);
      for (const inner of b.blocks) textBlock(inner, `${indent}  `, out);
      return;
    case 'table':
      // one aligned block per row, the first column as its heading: a seven-column table does not fit 100 characters
      for (const row of b.rows) {
        out.push(`${indent}${clean(row[0] ?? '')}`);
        textFields(b.head.slice(1).map((h, i) => [h, row[i + 1] ?? ''] as [string, string]), `${indent}  `, out);
        out.push('');
      }
      return;
  }
}

function textFields(rows: readonly Row[], indent: string, out: string[]): void {
  const w = Math.min(34, Math.max(...rows.map(([l]) => clean(l).length)));
  for (const [label, value] of rows) {
    const l = clean(label);
    const head = `${indent}${l}${' '.repeat(Math.max(1, w - l.length + 2))}`;
    out.push(...wrap(clean(value), head, ' '.repeat(head.length)));
  }
}

/** Control characters and line breaks from a page's title or a free text become single spaces. */
function clean(s: string): string {
  return String(s).replace(/[\u0000-\u001f\u007f\u2028\u2029]+/g, ' ').replace(/ {2,}/g, ' ').trim();
}

/*
 * Greedy word wrap that keeps a figure whole: no break inside parentheses (an interval) and none
 * right after a number (its unit follows), so a wrapped line never separates a median from its
 * interval. A word longer than the line (an address) stays whole on a line of its own.
 */
function wrap(text: string, first: string, rest: string): string[] {
  const words = text.split(' ');
  const chunks: string[] = [];
  let depth = 0;
  let cur = '';
  for (const w of words) {
    const glue = cur !== '' && (depth > 0 || /\d$/.test(cur));
    if (glue) cur += ` ${w}`;
    else {
      if (cur !== '') chunks.push(cur);
      cur = w;
    }
    for (const ch of w) {
      if (ch === '(') depth++;
      else if (ch === ')') depth = Math.max(0, depth - 1);
    }
  }
  if (cur !== '') chunks.push(cur);
  const lines: string[] = [];
  let line = first;
  let empty = true;
  for (const c of chunks) {
    if (empty) {
      line += c;
      empty = false;
    } else if (line.length + 1 + c.length <= WIDTH) line += ` ${c}`;
    else {
      lines.push(line);
      line = rest + c;
    }
  }
  lines.push(line);
  return lines.map((l) => l.replace(/\s+$/, ''));
}

/* ----------------------------------------------------------------------------------------------
 * Markdown: ## headings, lists, one table for the per-timestamp figures. Every leaf is escaped, so
 * a page title cannot turn into a link, an image, HTML or a broken table.
 */

function md(s: string): string {
  return clean(s).replace(/[\\`*_[\]<>|&~#]/g, (ch) => `\\${ch}`);
}

/*
 * A web address as an autolink, inside which backslash escapes would not be undone; one that could
 * break out of the angle brackets (spaces, < or >) is shown as escaped text instead.
 */
function mdAddress(url: string): string {
  const u = clean(url);
  return /^https?:\/\/[^\s<>]+$/i.test(u) ? `<${u}>` : md(u);
}

function renderMarkdown(doc: Doc): string {
  const out: string[] = [`# ${md(doc.title)}`, ''];
  for (const s of doc.sections) {
    out.push(`## ${md(s.title)}`, '');
    for (const b of s.blocks) mdBlock(b, 3, out);
  }
  out.push(md(doc.closing));
  return `${out.join('\n')}\n`;
}

function mdBlock(b: Block, level: number, out: string[]): void {
  switch (b.kind) {
    case 'para':
      out.push(md(b.text), '');
      return;
    case 'list':
      for (const item of b.items) out.push(`- ${md(item)}`);
      out.push('');
      return;
    case 'fields':
      for (const [label, value, type] of b.rows) out.push(`- **${md(label)}:** ${type === 'address' ? mdAddress(value) : md(value)}`);
      out.push('');
      return;
    case 'sub':
      out.push(`${'#'.repeat(level)} ${md(b.title)}`, '');
      for (const inner of b.blocks) mdBlock(inner, level + 1, out);
      return;
    case 'table':
      out.push(`| ${b.head.map(md).join(' | ')} |`, `|${b.head.map(() => ' --- |').join('')}`);
      for (const row of b.rows) out.push(`| ${b.head.map((_, i) => md(row[i] ?? '')).join(' | ')} |`);
      out.push('');
      return;
  }
}

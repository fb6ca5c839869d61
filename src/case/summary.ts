import { InputError } from '../engine/errors';
import { CLASS_ENVELOPES } from '../engine/plausibility';
import { formatQuantity, type Quantity, type UnitSystem } from '../engine/units';
import { finite, inRange } from '../engine/validate';
import { renderMarkdown, renderText, type Block, type Doc, type Section } from './summary-render';
import { DIRECTION_TEXT, formatStamp, methodSection, resultsSection } from './summary-results';
import type { CaseAnalysis } from './analysis';
import { defaultAssumptions, markedDimension } from './assumptions';
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
export { formatStamp } from './summary-results';

export function summaryText(c: CaseRecord, analysis: CaseAnalysis, options: SummaryOptions): string {
  const { format, system, toolVersion } = checkOptions(options);
  checkCase(c);
  checkAnalysis(c, analysis);
  const doc = buildDoc(c, analysis, system, toolVersion);
  return format === 'markdown' ? renderMarkdown(doc) : renderText(doc);
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
  const rows = c.marks.some((m) => m.kind === 'frame-top-bottom');
  const across = edges ? `left ${px(f.left)} px, right ${px(f.right)} px (${px(f.right - f.left)} px wide)` : `the full width, ${px(f.right - f.left)} px`;
  const down = rows ? `top ${px(f.top)} px, bottom ${px(f.bottom)} px (${px(f.bottom - f.top)} px high)` : `the full height, ${px(f.bottom - f.top)} px`;
  const frameText = edges || rows ? `the marked picture edges: ${across}; ${down}` : `the whole video, ${px(f.right - f.left)} x ${px(f.bottom - f.top)} px`;
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
    ['Horizontal field of view', `${bandText(a.hfov, 'angle')} (${origin('hfovDeg')})${r.field.portrait ? `; across the portrait picture's width, ${bandText(r.field.hfov, 'angle')}` : ''}`],
    ['Size label', `${a.sizeLabel} (${a.defaultSize ? (markedDimension(c.marks) ? 'follows the marked dimension; default' : 'default') : origin('sizeLabel')})`],
    ['Object size', `${bandText(a.objectSize, 'length')} (${a.defaultSize ? 'default' : origin('objectSizeM')})`],
    ['Aspect angle', `${bandText(a.aspect, 'angle')}, where 90° is broadside; a frame alone only (${origin('aspectDeg')})`],
    ['Landmark size', `${bandText(a.landmarkSize, 'length')} (${origin('landmarkSizeM')})`],
    ...[...a.landmarkSizes].map(([id, b]): [string, string] => [`Landmark ${id}`, `${bandText(b, 'length')} (given)`]),
    ['Landmark width’s aspect', a.landmarkAspect ? `${bandText(a.landmarkAspect, 'angle')} (given)` : 'square on; an upright landmark has none (default)'],
    ['Track against the road', `${bandText(a.trackAngle, 'angle')}${a.trackAngleGiven ? ' (given)' : ', parallel (default)'}`],
    ['Camera height', `${bandText(a.cameraHeight, 'length')} above the ground (${a.cameraHeightGiven ? 'given' : 'default'})`],
    ['Object elevation', a.elevation ? `${bandText(a.elevation, 'angle')}, used only where the frame does not give it (given)` : 'from the frame (a horizon, a landmark’s foot or a fixed pitch); else 0° to 60° (default)'],
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
        ? `kept fixed (${a.fixedCamera.mount === 'tripod' ? 'a tripod' : 'a mount fixed to the vehicle'}), the optical axis ${c.marks.some((m) => m.kind === 'road-ahead') ? 'measured from the marked road ahead' : `${bandText(a.fixedCamera.axisHeading, 'angle')} from the observer’s direction of travel, positive to the right`}, pitch ${c.marks.some((m) => m.kind === 'horizon') ? 'measured from the marked horizon' : a.fixedCamera.pitch ? bandText(a.fixedCamera.pitch, 'angle') : 'level (default)'} (${origin('fixedCamera')})`
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


import { Axis, type AxisCode } from '../engine/pass-model';
import type { PassReading } from '../engine/pass-series';
import { CLASS_ENVELOPES, VERDICT_SENTENCES } from '../engine/plausibility';
import type { Estimate } from '../engine/stats';
import type { RegimeShares } from '../engine/uncertainty';
import { formatEstimate, formatQuantity, type UnitSystem } from '../engine/units';
import { finite, inRange } from '../engine/validate';
import { magnitude, type CaseAnalysis, type JudgedReading, type SpeedReading, type TimestampFigures, type WarningCode } from './analysis';
import type { Block, Section } from './summary-render';

/*
 * The summary's results and method: every figure with its 5-95 % interval, each distance named as
 * slant, horizontal or from the road, and every warning by name before the figures it weakens.
 */

/** A timestamp as m:ss.sss with its seconds, e.g. "1:02.500 (62.500 s)". */
export function formatStamp(t: number): string {
  inRange('timestamp', t, 0, 1e7, ' s');
  // round to the millisecond first, so 59.9996 s reads 1:00.000, not 0:60.000
  const ms = Math.round(t * 1000);
  const m = Math.floor(ms / 60_000);
  const s = ((ms - m * 60_000) / 1000).toFixed(3).padStart(6, '0');
  return `${m}:${s} (${(ms / 1000).toFixed(3)} s)`;
}

const INTERVAL_NOTE = 'median and 5-95 % interval';

export const REGIME_TEXT: Readonly<Record<keyof RegimeShares, string>> = {
  between: 'between the road and the object’s track',
  beyond: 'beyond the object',
  behind: 'behind the observer (out of view)',
  none: 'none (constant bearing)',
};

export const DIRECTION_TEXT: Readonly<Record<CaseAnalysis['assumptions']['direction'], string>> = {
  opposite: 'against the observer’s travel',
  same: 'the same way as the observer',
  'same-slower': 'the same way as the observer, slower (the observer passes it)',
  'same-faster': 'the same way as the observer, faster (it passes the observer)',
  unknown: 'not known, so every reading the picture allows is shown',
};

const WARNING_NAMES: Readonly<Record<WarningCode, string>> = {
  landmark: 'Landmark set aside',
  'ill-conditioned': 'Pass barely settled',
  'elevation-assumed': 'Elevation not measured',
  'portrait-field': 'Portrait picture',
  'direction-unsupported': 'Direction not allowed by the marks',
  'mixed-dimensions': 'Spans of several dimensions',
  'large-case': 'Fewer draws for a large case',
};

const AXIS_TEXT: Readonly<Record<AxisCode, string>> = {
  [Axis.LENGTH]: 'lengths (nose to tail): a span goes as L |e x s| / R, which on a straight level pass is L rho / R^2',
  [Axis.WINGSPAN]: 'wingspans (tip to tip, level and square to the track): a span goes as L |e x s| / R with e across the track',
  [Axis.HEIGHT]: 'heights (upright): a span goes as L |e x s| / R with e vertical',
  [Axis.SQUARE]: 'spans kept square to the line of sight (a ball, a disc facing the camera): 2 atan(L / 2R) from any direction',
};

const DIRECTION_HEADING: Readonly<Record<PassReading['direction'], string>> = {
  opposite: 'If the object flies the other way',
  'same-slower': 'If it flies the same way, slower',
  'same-faster': 'If it flies the same way, faster',
};

function readingText(x: SpeedReading): string {
  switch (x.basis) {
    case 'landmark':
      return `the implied ground speed at ${formatStamp(x.t!)} (a landmark on the sight line)`;
    case 'track':
      return 'the fixed camera’s ground track';
    case 'fit-opposite':
      return 'the pass over the marked frames, if the object moves against the observer';
    case 'fit-same-slower':
      return 'the pass over the marked frames, if the object moves the same way, slower';
    case 'fit-same-faster':
      return 'the pass over the marked frames, if the object moves the same way, faster';
  }
}

/** A share as a percentage to 3 significant figures, plain decimal. */
export function pct(x: number): string {
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
    return `${fractionText(f)} of the way to the object, on the ground; ${REGIME_TEXT[ts.regime]}${share}`;
  }
  if (!ts.landmarkMark) return NO_LANDMARK;
  return r.assumptions.observerSpeed ? 'not determined by the draws' : 'needs the observer’s speed';
}

function impliedText(ts: TimestampFigures, r: CaseAnalysis, system: UnitSystem): string {
  if (ts.result.impliedSpeed) return speedText(ts.result.impliedSpeed, system);
  if (!ts.landmarkMark) return NO_LANDMARK;
  return r.assumptions.observerSpeed ? 'not determined by the draws' : 'needs the observer’s speed';
}

export function resultsSection(r: CaseAnalysis, system: UnitSystem): Section {
  const blocks: Block[] = [
    { kind: 'para', text: `Each figure is the ${INTERVAL_NOTE} over the Monte Carlo draws; a span in pixels is as marked. Slant distances run from the camera to the object; horizontal ones lie on the ground.` },
  ];
  if (r.warnings.length > 0) {
    blocks.push({ kind: 'sub', title: 'Warnings', blocks: [{ kind: 'list', items: r.warnings.map((w) => `${WARNING_NAMES[w.code]}: ${w.text}`) }] });
  }
  blocks.push({ kind: 'sub', title: 'Per timestamp', blocks: perTimestamp(r, system) });
  blocks.push({ kind: 'sub', title: 'The pass over the marked frames', blocks: passBlocks(r, system) });
  blocks.push({ kind: 'sub', title: 'Ground track (fixed camera)', blocks: trackBlocks(r, system) });
  blocks.push({ kind: 'sub', title: 'Verdict on the picture', blocks: verdictBlocks(r, system) });
  if (r.problems.length > 0) blocks.push({ kind: 'sub', title: 'Marks that could not be solved', blocks: [{ kind: 'list', items: [...r.problems] }] });
  return { title: 'Results', blocks };
}

function perTimestamp(r: CaseAnalysis, system: UnitSystem): Block[] {
  const out: Block[] = [];
  if (r.timestamps.length === 0) {
    return [{ kind: 'para', text: 'No figures: the object’s ends have not been marked on any frame that could be solved.' }];
  }
  // columns only where some frame has them: a column of "none" says nothing
  const landmarks = r.timestamps.some((ts) => ts.landmarkMark);
  const fitted = r.timestamps.some((ts) => ts.fitted);
  const head = ['Time', 'Object span', 'Angular size', 'Range (slant), frame alone'];
  if (fitted) head.push('Range (slant), the pass', 'Range (horizontal), the pass', 'Elevation, the pass', 'Aspect, the pass');
  if (landmarks) head.push('Landmark to its foot (horiz.)', 'Motionless point, frame alone', 'Implied speed, frame alone');
  out.push({
    kind: 'table',
    head,
    rows: r.timestamps.map((ts) => {
      const row = [formatStamp(ts.t), `${ts.spanPx.toFixed(1)} px`, formatEstimate(ts.result.angularSize, 'angle', system), formatEstimate(ts.result.range, 'distance', system)];
      if (fitted) {
        const f = ts.fitted;
        const none = 'not in the pass';
        row.push(
          f ? formatEstimate(f.range, 'distance', system) : none,
          f ? formatEstimate(f.horizontalRange, 'distance', system) : none,
          f ? formatEstimate(f.elevation, 'angle', system) : none,
          f ? `${formatEstimate(f.aspect, 'angle', system)} (90° is square on)` : none,
        );
      }
      if (landmarks) {
        const lr = ts.result.landmarkHorizontalRange ?? ts.result.landmarkRange;
        row.push(lr ? formatEstimate(lr, 'distance', system) : NO_LANDMARK, fixedPointText(ts, r), impliedText(ts, r, system));
      }
      return row;
    }),
  });
  const notes: string[] = [];
  if (fitted) notes.push('A frame alone takes the aspect assumed; the pass takes each frame’s aspect from the fitted geometry, so where they differ the pass is the one to read.');
  if (!landmarks) notes.push('No landmark was marked on these frames, so there is no landmark distance, motionless point or implied object speed from a frame alone.');
  const dropped = r.timestamps.filter((ts) => ts.result.keptShare < 1);
  for (const ts of dropped) notes.push(`At ${formatStamp(ts.t)} ${pct(ts.result.keptShare)} % of draws gave a range; the rest were degenerate and left out.`);
  if (notes.length > 0) out.push({ kind: 'list', items: notes });
  return out;
}

function passBlocks(r: CaseAnalysis, system: UnitSystem): Block[] {
  const s = r.series;
  if (!s) return [{ kind: 'para', text: r.seriesMissing ?? 'No pass.' }];
  const sources = new Set(s.result.elevationSources);
  const rows: [string, string][] = [
    ['Spans fitted as', AXIS_TEXT[s.axis]],
    ['Closest approach, slant', formatEstimate(s.closestApproach, 'distance', system)],
    ['Closest approach, horizontal', formatEstimate(s.closestHorizontal, 'distance', system)],
    ['Time of closest approach', formatEstimate(s.tClosest, 'time', system)],
    ['Relative speed', formatEstimate(s.relativeSpeed, 'speed', system)],
    ['Elevation from', [...sources].map((x) => (x === 'assumed' ? 'the elevation assumed' : x === 'pitch' ? 'the camera’s pitch' : x === 'landmark' ? 'a landmark’s foot' : 'the marked horizon')).join(', ')],
  ];
  if (r.window) {
    rows.push(['Observation window', `${formatEstimate(r.window.estimate, 'time', system)} within ${formatQuantity(r.window.halfAngle, 'angle', system)} of abeam (half the field of view)`]);
    rows.push(['Against the clip', r.window.clipLength === null ? 'a live stream, of no fixed length' : `${formatQuantity(r.window.clipLength, 'time', system)} long, exactly (the video’s duration)`]);
  }
  rows.push(['Fits that failed', `${pct(1 - s.lead.keptShare)} % of draws (left out of the figures)`]);
  const blocks: Block[] = [
    {
      kind: 'para',
      text: 'A straight, level pass fitted to the object’s spans, each frame seen at the aspect its geometry gives. Spans alone cannot tell whether the object drifts back past the camera or pulls ahead of it; each reading the marks and the direction assumed allow is given.',
    },
    { kind: 'fields', rows },
  ];
  const readings = r.readings.filter((x) => x.pass);
  if (!r.assumptions.observerSpeed) blocks.push({ kind: 'para', text: 'Object speeds and the motionless point need the observer’s speed.' });
  else if (readings.length === 0) blocks.push({ kind: 'para', text: `No reading fits both the draws and the direction assumed (${DIRECTION_TEXT[r.assumptions.direction]}).` });
  for (const x of readings) blocks.push({ kind: 'sub', title: DIRECTION_HEADING[x.pass!.direction], blocks: [{ kind: 'fields', rows: readingRows(x.pass!, system) }] });
  return blocks;
}

function readingRows(p: PassReading, system: UnitSystem): [string, string][] {
  const rows: [string, string][] = [
    ['Object ground speed', formatEstimate(p.speed, 'speed', system)],
    ['Share of draws', `${pct(p.share)} %`],
  ];
  const regime = (Object.keys(p.regimeShares) as (keyof RegimeShares)[]).reduce((a, b) => (p.regimeShares[b] > p.regimeShares[a] ? b : a));
  rows.push(['Motionless point', `${REGIME_TEXT[regime]} in ${pct(p.regimeShares[regime])} % of draws`]);
  if (p.fixedPoint) {
    rows.push(['Point along the sight line', `${fractionText(p.fixedPoint.fraction)} of the way to the object at ${formatStamp(p.fixedPoint.t)}`]);
    rows.push(['Point from the camera, horizontal', `${formatEstimate(p.fixedPoint.horizontalDistance, 'distance', system)}${p.fixedPoint.horizontalDistance.median < 0 ? ' (behind)' : ''}`]);
    rows.push(['Point from the road, horizontal', `${formatEstimate(p.fixedPoint.fromRoad, 'distance', system)}${p.fixedPoint.fromRoad.median < 0 ? ' (on the far side of the road from the object)' : ''}`]);
  }
  if (p.wander) {
    rows.push(['Point’s wander over the marks', `from ${formatEstimate(p.wander.first, 'distance', system)} to ${formatEstimate(p.wander.last, 'distance', system)} from the camera, horizontal`]);
  }
  return rows;
}

function trackBlocks(r: CaseAnalysis, system: UnitSystem): Block[] {
  const t = r.track;
  if (!t) return [{ kind: 'para', text: r.trackMissing ?? 'No ground track.' }];
  const rows: [string, string][] = [
    ['Object ground speed', formatEstimate(t.speed, 'speed', system)],
    ['Heading', `${formatEstimate(t.heading, 'angle', system)} from the observer’s direction of travel, positive to the right`],
    ['Closest approach, horizontal', formatEstimate(t.closestApproach, 'distance', system)],
  ];
  return [
    { kind: 'para', text: 'The camera kept its aim, so each mark’s place in the picture gives its bearing: the same pass, fitted to spans and bearings together, gives the track’s angle too.' },
    { kind: 'fields', rows },
  ];
}

function verdictBlocks(r: CaseAnalysis, system: UnitSystem): Block[] {
  const kindLabel = r.assumptions.objectKind === 'unknown' ? 'an object of unknown kind' : `a ${CLASS_ENVELOPES[r.assumptions.objectKind].label}`;
  const blocks: Block[] = [];
  if (r.setAside.length > 0) {
    blocks.push({ kind: 'para', text: `${r.setAside.length === 1 ? 'One landmark reading was' : `${r.setAside.length} landmark readings were`} set aside: the landmark cannot be the motionless point (see the warnings), so no verdict rests on it.` });
  }
  if (r.verdicts.length === 0) return [...blocks, { kind: 'para', text: r.verdictMissing ?? 'No verdict.' }];
  if (r.verdicts.length > 1) {
    blocks.push({ kind: 'para', text: `The direction of travel is not settled, so there is one verdict for each reading (${r.verdicts.length}).` });
  }
  for (const j of r.verdicts) blocks.push(...oneVerdict(j, r, kindLabel, system));
  blocks.push({ kind: 'para', text: 'The verdict is about the figures this picture gives under the assumptions above, not about anyone.' });
  return blocks;
}

function oneVerdict(j: JudgedReading, r: CaseAnalysis, kindLabel: string, system: UnitSystem): Block[] {
  const v = j.verdict;
  const wind = r.assumptions.headwind ? `with the wind assumed, an airspeed of ${formatEstimate(j.airspeed, 'speed', system)}` : 'no wind given';
  const rows: [string, string][] = [
    ['Finding', VERDICT_SENTENCES[v.level]],
    ['Judged on', `${readingText(j.reading)}, ${formatEstimate(j.reading.speed, 'speed', system)}, as ${kindLabel}; ${wind}; no altitude or flight phase given`],
    ['Rule', `${v.rule.text} (rule ${v.rule.id})`],
    ['Source', v.rule.source],
  ];
  if (v.hover) {
    rows.push(['Hovering', `would need a headwind of about ${formatQuantity(v.hover.headwindNeededMs, 'speed', system)} (from the median speed): Beaufort force ${v.hover.beaufort.force}, ${v.hover.beaufort.description}`]);
  }
  const blocks: Block[] = [{ kind: 'fields', rows }];
  if (v.notes.length > 0) blocks.push({ kind: 'list', items: [...v.notes] });
  return blocks;
}

export function methodSection(r: CaseAnalysis): Section {
  const runs = (xs: { draws: number; seed: number }[]) => [...new Set(xs.map((x) => `${x.draws} draws, seed ${x.seed}`))].join('; ');
  const frameRuns = r.timestamps.length > 0 ? runs(r.timestamps.map((ts) => ts.result)) : 'none run (nothing solved)';
  const seriesRuns = r.series ? runs([r.series]) : 'none run (no pass)';
  return {
    title: 'Method',
    blocks: [
      {
        kind: 'list',
        items: [
          'Pinhole camera with exact ray angles: a pixel (x, y) looks along the ray (x - W/2, y - H/2, f), f = (W/2) / tan(HFOV/2); the angle between two ends is the angle between their rays, exact anywhere in the frame.',
          'Range from one frame: R = L sin(a) / (2 tan(theta/2)) for true size L, aspect angle a and angular size theta.',
          'The pass: a straight, level track fitted by weighted least squares (Levenberg-Marquardt) to the spans, a span of length L along axis e subtending atan2(L |r x e|, R^2 - L^2/4) at relative place r; elevations from a marked horizon, a landmark’s foot or a fixed camera’s pitch, and a fixed camera’s bearings, fitted with it.',
          'An upright landmark’s foot distance from tan(theta) = L d / (d^2 - (L - h) h), h the camera’s height; its foot gives the camera’s pitch.',
          'Sight-line fixed point by the intercept theorem (Euclid, Elements VI.2), on the ground: s* = -(n . u) / (n . (w - u)) along the horizontal sight line; a landmark there lies d / (R cos e) of the way, e the object’s elevation.',
          'A landmark is set aside when it is not on the object’s sight line, leaves it between frames, lies where the direction given cannot put the point, or when the pass puts the point elsewhere.',
          `Seeded Monte Carlo, median and 5-95 % interval: single-frame figures ${frameRuns}; the pass ${seriesRuns} (a parametric bootstrap: each draw moves every mark by its uncertainty and refits).`,
        ],
      },
    ],
  };
}

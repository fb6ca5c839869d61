import { solvePass } from '../engine/pass-series';
import { judgeSpeed } from '../engine/plausibility';
import { cautiousTail, type Estimate } from '../engine/stats';
import { passBins } from '../engine/pass-bins';
import type { RegimeShares } from '../engine/uncertainty';
import { engineAssumptions, type EngineAssumptions } from './assumptions';
import { cameraFrame, marksIndex, type FrameRect } from './frames';
import { frameFigures, type FrameBasis } from './frame-figures';
import { checkLandmarks } from './landmark-checks';
import { allowedReadings, axisOf, fieldOfView, passInputs, signsFor } from './pass-scene';
import type { CaseRecord, Mark } from './schema';
import { dimensionMismatch, mismatchText } from './size-match';
import { workingAssumptions, type measuredObserverSpeed, type LaneSpeed } from './lane-speed';
import { observation, passWarnings, trackSummary } from './pass-figures';

export type { LaneSpeed };
export type {
  AnalysisOptions,
  CaseAnalysis,
  CaseWarning,
  JudgedReading,
  PassSummary,
  SpeedReading,
  TimestampFigures,
  TrackSummary,
  WarningCode,
} from './analysis-types';
import type { AnalysisOptions, CaseAnalysis, CaseWarning, JudgedReading, PassSummary, SpeedReading, TimestampFigures, TrackSummary } from './analysis-types';

/*
 * A case's figures from its marks and assumptions: what the popup shows and what the summary and
 * the command-line recompute will print. Pure: the same case and options give the same numbers.
 *
 * Two kinds of figure. Each marked frame alone gives a slant range from the span and an assumed
 * aspect, and, with a landmark the object seems pinned over, that landmark's reading. Marks on
 * several frames give the pass (pass-series.ts): a straight pass fitted to the spans with the aspect
 * each frame's geometry gives, so ranges, the closest approach, the relative speed, the motionless
 * point and the object's speed for each direction the marks and the user leave open. A landmark is
 * weighed against all the rest (landmark-checks.ts) before its reading may settle anything.
 */

const SAME_FRAME_S = 1 / 48;

/*
 * A case near the mark limit (validate.ts MAX_MARKS_PER_CASE) would take each frame's 20 000 draws
 * and the pass's 2 000 on thousands of frames: minutes, and a frozen page. Past these budgets the
 * draws per frame (and per pass) shrink so that the whole stays within them, never below
 * MIN_CAPPED_DRAWS, and every interval is widened for its draws' Monte Carlo error (stats.ts
 * cautiousTail) so that it still holds at least the central 90 %. Ordinary cases (up to 128 marked
 * frames, up to 512 frames in the pass) are under both budgets and keep their figures exactly.
 */
export const FRAME_DRAW_BUDGET = 128 * 20_000;
export const PASS_DRAW_BUDGET = 512 * 2_000;
export const MIN_CAPPED_DRAWS = 300;

/** The draws for `units` solves of `full` draws each within `budget` draws in all, in hundreds; with the interval's tail. */
export function cappedDraws(units: number, full: number, budget: number): { draws: number; tail: number; capped: boolean } {
  if (units * full <= budget) return { draws: full, tail: 0.05, capped: false };
  const draws = Math.max(MIN_CAPPED_DRAWS, Math.floor(budget / units / 100) * 100);
  return { draws, tail: cautiousTail(draws), capped: true };
}

/**
 * What every part of a case's analysis starts from, found once: the assumptions (a speed measured
 * from lane dashes standing in for the one given), the camera frame, the field of view, the object's
 * marks in time order and the draws. The same case gives the same plan on any thread.
 */
export interface AnalysisPlan {
  c: CaseRecord;
  a: EngineAssumptions;
  lanes: ReturnType<typeof measuredObserverSpeed>;
  frame: FrameRect;
  field: ReturnType<typeof fieldOfView>;
  basis: FrameBasis;
  frameDraws: ReturnType<typeof cappedDraws>;
  seed: number;
  allObjects: Mark[];
  /** Steps of the progress bar until the pass knows its own: each frame, then each draw of each sign. */
  total: number;
  report: AnalysisOptions['onProgress'];
  passDrawsOption: number | undefined;
}

export function planAnalysis(c: CaseRecord, options: AnalysisOptions = {}): AnalysisPlan {
  const { a, lanes } = workingAssumptions(engineAssumptions(c.assumptions, c.marks), c);
  const frame = cameraFrame(c.marks, c.video.width, c.video.height);
  const field = fieldOfView(a, frame);
  const allObjects = c.marks.filter((m) => m.kind === 'object-span').sort((x, y) => x.t - y.t);
  const frameDraws = options.draws === undefined ? cappedDraws(allObjects.length, 20_000, FRAME_DRAW_BUDGET) : { draws: options.draws, tail: 0.05, capped: false };
  // steps: each frame, then each draw of each sign of the pass (counted as if the pass will run)
  const total = allObjects.length + cappedDraws(allObjects.length, 2_000, PASS_DRAW_BUDGET).draws * signsFor(a.direction).length;
  return { c, a, lanes, frame, field, basis: { a, frame, hfov: field.hfov }, frameDraws, seed: options.seed ?? 1, allObjects, total, report: options.onProgress, passDrawsOption: options.seriesDraws };
}

/** Each marked frame alone, for the object's marks [from, to) of the plan: independent of the pass, so another thread may solve them. */
/** The frames' figures, in the object's time order, and the marks that could not be solved. */
export interface FramesPart {
  timestamps: TimestampFigures[];
  problems: string[];
}

export interface PassPart {
  series: PassSummary | null;
  seriesMissing: string | null;
  trackMissing: string | null;
  /** The marks the pass was fitted on (one dimension, one a frame). */
  objects: Mark[];
  passDraws: ReturnType<typeof cappedDraws> | null;
  warnings: CaseWarning[];
  /** The progress bar's steps, the pass's own draws counted. */
  total: number;
}

export function solveFrames(plan: AnalysisPlan, from = 0, to = plan.allObjects.length): FramesPart {
  const { allObjects, basis, seed, frameDraws, report, total } = plan;
  const near = marksIndex(plan.c.marks);
  const timestamps: TimestampFigures[] = [];
  const problems: string[] = [];
  for (let i = from; i < to; i++) {
    const m = allObjects[i]!;
    report?.(i, total);
    try {
      // the overlay's live readout solves a frame with this same function (frame-figures.ts)
      const f = frameFigures(m, near(m.t), m.t, basis, { draws: frameDraws.draws, seed, tail: frameDraws.tail });
      timestamps.push({ t: m.t, objectMark: m, spanPx: f.spanPx, result: f.result, landmarkMark: f.landmark, regime: majority(f.result.regimeShares), fitted: null });
    } catch (err) {
      problems.push(`object ends at ${m.t.toFixed(3)} s: ${(err as Error).message}`);
    }
  }
  return { timestamps, problems };
}

export function analyseCase(c: CaseRecord, options: AnalysisOptions = {}): CaseAnalysis {
  const plan = planAnalysis(c, options);
  return finishAnalysis(plan, solveFrames(plan), solvePassPart(plan));
}

/** The pass over the object's marks, with what it warns of; fitted figures go to the frames in finishAnalysis. */
export function solvePassPart(plan: AnalysisPlan): PassPart {
  const { a, allObjects, frame, field, seed, report } = plan;
  const warnings: CaseWarning[] = [];
  let total = plan.total;
  // the pass: one span per frame, all of the dimension most of them were marked as
  const counts = new Map<Mark['dimension'], number>();
  for (const m of allObjects) counts.set(m.dimension, (counts.get(m.dimension) ?? 0) + 1);
  const dimension = [...counts.entries()].reduce<[Mark['dimension'], number] | null>((best, e) => (!best || e[1] > best[1] ? e : best), null)?.[0];
  if (counts.size > 1) {
    warnings.push({ code: 'mixed-dimensions', text: `The object's spans were marked as ${counts.size} different dimensions: the pass uses only the ${dimension ?? 'unnamed'} spans (${counts.get(dimension)} of ${allObjects.length}).` });
  }
  const objects = allObjects.filter((m, i, arr) => m.dimension === dimension && (i === 0 || m.t - arr[i - 1]!.t >= SAME_FRAME_S));
  const needed = a.fixedCamera ? 2 : 3;
  let series: PassSummary | null = null;
  let seriesMissing: string | null = null;
  let trackMissing: string | null = a.fixedCamera ? null : 'A ground track needs a camera that kept its aim (a tripod, or a mount fixed to the vehicle): say so in the assumptions.';
  const axis = axisOf(dimension);
  let passDraws: ReturnType<typeof cappedDraws> | null = null;
  if (objects.length < needed) {
    seriesMissing = `The pass needs the object's ends marked at ${needed} or more timestamps (${objects.length} so far).`;
    if (a.fixedCamera) trackMissing = `A ground track needs the object’s ends marked at 2 or more timestamps (${objects.length} so far).`;
  } else if (a.fixedCamera?.mount === 'vehicle' && !a.observerSpeed) {
    seriesMissing = trackMissing = 'A ground track from a moving vehicle needs the observer’s speed (given, or measured from lane dashes).';
  } else {
    const inputs = passInputs(objects, plan.c.marks, a, field.hfov, frame, axis);
    passDraws = plan.passDrawsOption === undefined ? cappedDraws(objects.length, 2_000, PASS_DRAW_BUDGET) : { draws: plan.passDrawsOption, tail: 0.05, capped: false };
    try {
      total = allObjects.length + passDraws.draws * signsFor(a.direction).length;
      const result = solvePass(inputs.scene, signsFor(a.direction), { draws: passDraws.draws, seed, tail: passDraws.tail }, report && ((done) => report(allObjects.length + done, total)));
      const lead = result.hypotheses.find((h) => !h.ruledOut) ?? result.hypotheses[0]!;
      series = {
        closestApproach: lead.closestSlant,
        closestHorizontal: lead.closestHorizontal,
        relativeSpeed: lead.relativeSpeed,
        tClosest: lead.tClosest,
        axis,
        lead,
        result,
        conditioning: result.conditioning,
        draws: result.draws,
        seed: result.seed,
      };
      warnings.push(...passWarnings(series, a, objects));
    } catch (err) {
      seriesMissing = `No pass: ${(err as Error).message}`;
      if (a.fixedCamera) trackMissing = `No ground track: ${(err as Error).message}`;
    }
  }
  return { series, seriesMissing, trackMissing, objects, passDraws, warnings, total };
}

/** The rest of the analysis from the frames alone and the pass: landmark checks, readings, verdicts. */
export function finishAnalysis(plan: AnalysisPlan, frames: FramesPart, pass: PassPart): CaseAnalysis {
  const { c, a, lanes, frame, field, frameDraws, allObjects, report } = plan;
  const { timestamps, problems } = frames;
  const { series, seriesMissing, trackMissing, objects, passDraws, total } = pass;
  let track: TrackSummary | null = null;
  const mismatch = dimensionMismatch(c.marks, c.assumptions);
  const warnings: CaseWarning[] = [];
  if (field.note) warnings.push({ code: 'portrait-field', text: field.note });
  warnings.push(...pass.warnings);
  if (series) {
    const place = new Map<string, number>();
    objects.forEach((m, k) => {
      if (!place.has(m.id)) place.set(m.id, k);
    });
    for (const ts of timestamps) {
      const k = place.get(ts.objectMark.id) ?? -1;
      if (k >= 0) ts.fitted = series.lead.marks[k] ?? null;
    }
  }

  // landmarks, each weighed before its reading may settle anything
  const pinned = timestamps
    .filter((ts) => ts.landmarkMark)
    .map((ts) => ({ ts, fit: series?.lead.landmarks.find((l) => Math.abs(l.t - ts.t) < SAME_FRAME_S) }));
  const landmarkChecks = checkLandmarks(
    pinned.map(({ ts, fit }) => ({
      landmark: ts.landmarkMark!,
      object: ts.objectMark,
      ...(ts.result.regimeShares ? { regimeShares: ts.result.regimeShares } : {}),
      ...(fit ? { fit } : {}),
    })),
    a.direction,
  );
  const readings: SpeedReading[] = [];
  const setAside: CaseAnalysis['setAside'] = [];
  for (const [i, check] of landmarkChecks.entries()) {
    const { ts, fit } = pinned[i]!;
    // with a pass, the landmark's reading takes each frame's range from it (its aspect from the geometry)
    const fitSpeed = fit?.impliedSpeed ?? null;
    const signed = fitSpeed ?? ts.result.impliedSpeed;
    if (!signed) continue;
    const reading: SpeedReading = { basis: 'landmark', t: ts.t, speed: magnitude(signed) };
    if (check.problems.length > 0) {
      setAside.push({ reading, check });
      warnings.push({ code: 'landmark', text: `The landmark at ${ts.t.toFixed(3)} s cannot be the motionless point, so its reading is set aside: ${check.problems.map((p) => p.text).join(' ')}` });
    } else readings.push(reading);
  }
  if (series) {
    const allowed = allowedReadings(a.direction);
    for (const h of series.result.hypotheses) {
      if (h.ruledOut) continue;
      for (const r of h.readings) {
        if (!allowed.includes(r.direction)) continue;
        if (a.fixedCamera) {
          if (!track) track = trackSummary(r, series);
          readings.push({ basis: 'track', speed: r.speed, pass: r });
        } else readings.push({ basis: `fit-${r.direction}`, speed: r.speed, pass: r });
      }
    }
    if (a.observerSpeed && !readings.some((r) => r.basis !== 'landmark')) {
      warnings.push({
        code: 'direction-unsupported',
        text: `The ranges over time do not allow the direction you gave (${a.direction}): the relative speed ${fmt(series.relativeSpeed)} m/s and the observer's ${(((a.observerSpeed.lo + a.observerSpeed.hi) / 2)).toFixed(1)} m/s do not combine that way. Check the direction, the observer's speed and the size.`,
      });
    }
  }

  report?.(total, total);
  const large = largeCaseNote(frameDraws, allObjects.length, passDraws, objects.length);
  if (large) warnings.push({ code: 'large-case', text: large });

  const verdicts: JudgedReading[] = [];
  let verdictMissing: string | null = null;
  if (readings.length === 0) {
    verdictMissing = setAside.length > 0
      ? 'No verdict: the only landmark reading was set aside (it cannot be the motionless point), and the marks give no other speed.'
      : !a.observerSpeed && !a.fixedCamera
        ? 'A verdict needs the observer’s speed (given, or measured from lane dashes).'
        : 'A verdict needs an object speed: a landmark the object seems pinned over (marked on the same frame as its ends), 3 or more timestamps for the pass, or a fixed camera’s ground track.';
  } else {
    // a landmark that passed every check, or a ground track, settles the direction; the pass's readings come one per direction
    const judged = readings[0]!.basis === 'landmark' || readings[0]!.basis === 'track' ? [readings[0]!] : readings;
    for (const reading of judged) {
      const airspeed = withHeadwind(reading.speed, a.headwind);
      try {
        verdicts.push({ reading, airspeed, verdict: judgeSpeed({ groundSpeed: airspeed, kind: a.objectKind }) });
      } catch (err) {
        verdictMissing = `No verdict: ${(err as Error).message}`;
      }
    }
  }
  return {
    assumptions: a,
    laneSpeed: lanes.speed,
    laneSpeedMissing: lanes.missing,
    frame,
    field,
    timestamps,
    series,
    seriesMissing,
    track,
    trackMissing,
    readings,
    setAside,
    landmarkChecks,
    verdicts,
    verdictMissing,
    window: observation(series, field, c.video.duration),
    problems,
    warnings,
    dimensionMismatch: mismatch ? mismatchText(mismatch) : null,
  };
}

/** What a case past the budgets gave up, in plain words, with the interval's widened ends. */
function largeCaseNote(frames: ReturnType<typeof cappedDraws>, frameCount: number, pass: ReturnType<typeof cappedDraws> | null, passCount: number): string | null {
  const parts: string[] = [];
  const ends = (x: { tail: number }) => `${(100 * x.tail).toFixed(1)} % to ${(100 - 100 * x.tail).toFixed(1)} %`;
  if (frames.capped) parts.push(`each of its ${frameCount} frames alone from ${frames.draws} draws instead of 20 000, its intervals from the ${ends(frames)} points`);
  if (pass?.capped) {
    const bins = passBins(passCount);
    parts.push(
      `the pass from ${pass.draws} draws instead of 2 000, its intervals from the ${ends(pass)} points${bins ? `, each draw fitted on ${bins.count} bins of up to ${bins.start[1]} consecutive frames` : ''}`,
    );
  }
  if (parts.length === 0) return null;
  return `A case this large is computed with fewer draws, so it recomputes in seconds: ${parts.join('; ')}. The intervals are widened for the fewer draws' Monte Carlo error, so each still holds at least the central 90 % (with 95 % confidence at each end).`;
}

function fmt(e: Estimate): string {
  return `${e.median.toFixed(1)} (5-95 %: ${e.p05.toFixed(1)} to ${e.p95.toFixed(1)})`;
}

/**
 * The speed through the air: ground speed plus the headwind. The wind band's ends widen the
 * interval's ends (cautious: the two are not combined as independent draws).
 */
export function withHeadwind(ground: Estimate, headwind: { lo: number; hi: number } | null): Estimate {
  if (!headwind) return ground;
  const mid = (headwind.lo + headwind.hi) / 2;
  return {
    p05: Math.max(ground.p05 + headwind.lo, 0),
    median: Math.max(ground.median + mid, 0),
    p95: Math.max(ground.p95 + headwind.hi, 0),
  };
}

/**
 * The interval of |w| from that of the signed speed w. When the signed interval straddles zero,
 * the magnitude's lower end is 0 and its upper end the larger of the two ends: wider than the true
 * quantiles of |w|, never narrower (an honest interval is allowed to be cautious, not bold).
 */
export function magnitude(e: Estimate): Estimate {
  if (e.p05 >= 0) return e;
  if (e.p95 <= 0) return { p05: -e.p95, median: -e.median, p95: -e.p05 };
  return { p05: 0, median: Math.abs(e.median), p95: Math.max(-e.p05, e.p95) };
}

function majority(s: RegimeShares | undefined): keyof RegimeShares | null {
  if (!s) return null;
  return (Object.entries(s) as [keyof RegimeShares, number][]).reduce((best, cur) => (cur[1] > best[1] ? cur : best))[0];
}

import { laneCycleById, observerSpeedFromDashes } from '../engine/lanes';
import { judgeSpeed, type Verdict } from '../engine/plausibility';
import { observationWindow } from '../engine/speed';
import { solveSeries, type SeriesResult } from '../engine/series';
import { solveTrack, type TrackResult } from '../engine/track-series';
import type { Estimate } from '../engine/stats';
import { solveFrame, type FrameResult, type RegimeShares } from '../engine/uncertainty';
import { engineAssumptions, type EngineAssumptions } from './assumptions';
import { cameraFrame, marksAt, spanInFrame, type FrameRect } from './frames';
import type { CaseRecord, Mark } from './schema';
import { dimensionMismatch, mismatchText } from './size-match';

/*
 * A case's figures from its marks and assumptions: what the popup shows and what the summary and
 * the command-line recompute will print. Pure: the same case and options give the same numbers.
 */

export interface TimestampFigures {
  t: number;
  objectMark: Mark;
  spanPx: number;
  result: FrameResult;
  landmarkMark: Mark | null;
  /** The regime most draws agree on, when a fixed point was computed. */
  regime: keyof RegimeShares | null;
}

/** The observer's speed measured from lane-dash passes, when a cycle is chosen and passes are marked. */
export interface LaneSpeed {
  cycleLabel: string;
  cycleM: number;
  source: string;
  passes: number;
  t1: number;
  t2: number;
  speed: { lo: number; median: number; hi: number };
}

/** One reading of the object's ground speed, with what it rests on. */
export interface SpeedReading {
  /** Where the reading comes from: a pinned landmark, the range-over-time fit (per direction), or the ground track. */
  basis: 'landmark' | 'fit-opposite' | 'fit-same-slower' | 'fit-same-faster' | 'track';
  /** The timestamp of a landmark reading. */
  t?: number;
  speed: Estimate;
}

/** A verdict on one reading (with the wind assumed, if any). */
export interface JudgedReading {
  reading: SpeedReading;
  /** The speed through the air the verdict judged: the ground speed plus the headwind band. */
  airspeed: Estimate;
  verdict: Verdict;
}

export interface CaseAnalysis {
  assumptions: EngineAssumptions;
  /** Set when the observer speed in `assumptions` was measured from lane dashes. */
  laneSpeed: LaneSpeed | null;
  laneSpeedMissing: string | null;
  frame: FrameRect;
  timestamps: TimestampFigures[];
  series: SeriesResult | null;
  /** Why there is no range-over-time fit, in one line, when there is none. */
  seriesMissing: string | null;
  /** Fixed-camera ground track, when the camera kept its aim and 2 or more timestamps are marked. */
  track: TrackResult | null;
  /** Why there is no ground track, in one line. */
  trackMissing: string | null;
  /**
   * The object's ground speed readings, in order of what they rest on: a landmark first (it settles
   * the direction), then the ground track, then the fit's readings for each direction of travel the
   * direction assumption leaves open ("unknown" keeps them all: both answers).
   */
  readings: SpeedReading[];
  /** A verdict per reading that can be judged: several when the direction is not settled. */
  verdicts: JudgedReading[];
  verdictMissing: string | null;
  /**
   * How long the pass keeps the object within half the field of view of abeam, 2 D' tan(A) / V,
   * against the clip's length. Its ends combine the ends of D' and V, so the interval is wider
   * than the draws' own would be (cautious, never bold).
   */
  window: { halfAngle: number; estimate: Estimate; clipLength: number | null } | null;
  /** Marks that could not be solved, with the reason (an end outside the camera frame, say). */
  problems: string[];
  /** When the object's spans were marked as another dimension than the size assumed (size-match.ts), in one sentence. */
  dimensionMismatch: string | null;
}

export interface AnalysisOptions {
  draws?: number;
  seriesDraws?: number;
  trackDraws?: number;
  seed?: number;
}

export function analyseCase(c: CaseRecord, options: AnalysisOptions = {}): CaseAnalysis {
  const given = engineAssumptions(c.assumptions);
  const mismatch = dimensionMismatch(c.marks, c.assumptions);
  const lanes = measuredObserverSpeed(c, given.laneCycleId);
  // a speed measured from the clip stands in for the one given
  const a = lanes.speed ? { ...given, observerSpeed: { lo: lanes.speed.speed.lo, hi: lanes.speed.speed.hi } } : given;
  const frame = cameraFrame(c.marks, c.video.width, c.video.height);
  const draws = options.draws ?? 20_000;
  const seed = options.seed ?? 1;
  const frameSize = { widthPx: frame.right - frame.left, heightPx: frame.bottom - frame.top };
  const objects = c.marks.filter((m) => m.kind === 'object-span').sort((x, y) => x.t - y.t);
  const problems: string[] = [];
  const timestamps: TimestampFigures[] = [];
  for (const m of objects) {
    const landmark = marksAt(c.marks, m.t).find((x) => x.kind === 'landmark-span') ?? null;
    try {
      const result = solveFrame(
        {
          frame: frameSize,
          hfov: a.hfov,
          object: { span: spanInFrame(m, frame), size: a.objectSize, aspect: a.aspect },
          ...(landmark ? { landmark: { span: spanInFrame(landmark, frame), size: a.landmarkSize, aspect: a.aspect } } : {}),
          ...(a.observerSpeed ? { observerSpeed: a.observerSpeed } : {}),
        },
        { draws, seed },
      );
      const [p, q] = m.points;
      timestamps.push({ t: m.t, objectMark: m, spanPx: Math.hypot(q!.x - p!.x, q!.y - p!.y), result, landmarkMark: landmark, regime: majority(result.regimeShares) });
    } catch (err) {
      problems.push(`object ends at ${m.t.toFixed(3)} s: ${(err as Error).message}`);
    }
  }

  let series: SeriesResult | null = null;
  let seriesMissing: string | null = null;
  const distinct = objects.filter((m, i) => i === 0 || m.t - objects[i - 1]!.t >= 1 / 48);
  if (distinct.length < 3) {
    seriesMissing = `A range-over-time fit needs the object's ends marked at 3 or more timestamps (${distinct.length} so far).`;
  } else {
    try {
      series = solveSeries(
        {
          frame: frameSize,
          hfov: a.hfov,
          object: { size: a.objectSize, aspect: a.aspect },
          marks: distinct.map((m) => ({ t: m.t, span: spanInFrame(m, frame) })),
          ...(a.observerSpeed ? { observerSpeed: a.observerSpeed } : {}),
        },
        { draws: options.seriesDraws ?? 2_000, seed },
      );
    } catch (err) {
      seriesMissing = `No range-over-time fit: ${(err as Error).message}`;
    }
  }

  let track: TrackResult | null = null;
  let trackMissing: string | null = null;
  if (!a.fixedCamera) trackMissing = 'A ground track needs a camera that kept its aim (a tripod, or a mount fixed to the vehicle): say so in the assumptions.';
  else if (distinct.length < 2) trackMissing = `A ground track needs the object’s ends marked at 2 or more timestamps (${distinct.length} so far).`;
  else if (a.fixedCamera.mount === 'vehicle' && !a.observerSpeed) trackMissing = 'A ground track from a moving vehicle needs the observer’s speed (given, or measured from lane dashes).';
  else {
    try {
      track = solveTrack(
        {
          frame: frameSize,
          hfov: a.hfov,
          object: { size: a.objectSize, aspect: a.aspect },
          marks: distinct.map((m) => ({ t: m.t, span: spanInFrame(m, frame) })),
          axisHeading: a.fixedCamera.axisHeading,
          cameraSpeed: a.fixedCamera.mount === 'tripod' ? { lo: 0, hi: 0 } : a.observerSpeed!,
        },
        { draws: options.trackDraws ?? 1_000, seed },
      );
    } catch (err) {
      trackMissing = `No ground track: ${(err as Error).message}`;
    }
  }

  const readings = speedReadings(timestamps, track, series, a.direction);
  const verdicts: JudgedReading[] = [];
  let verdictMissing: string | null = null;
  if (readings.length === 0) {
    verdictMissing = !a.observerSpeed && !track
      ? 'A verdict needs the observer’s speed (given, or measured from lane dashes).'
      : 'A verdict needs an object speed: a landmark the object seems pinned over (marked on the same frame as its ends), 3 or more timestamps for the fit, or a fixed camera’s ground track.';
  } else {
    // a landmark or a ground track settles the direction; only the fit's readings come one per direction
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
  let window: CaseAnalysis['window'] = null;
  if (series && series.closestApproach.median > 0 && series.relativeSpeed.p05 > 0) {
    const A = (a.hfov.lo + a.hfov.hi) / 4; // half of the middle field of view
    try {
      window = {
        halfAngle: A,
        estimate: {
          // a closest approach that may be zero (a collision course) lets the window shrink to nothing
          p05: series.closestApproach.p05 > 0 ? observationWindow(series.closestApproach.p05, series.relativeSpeed.p95, A) : 0,
          median: observationWindow(series.closestApproach.median, series.relativeSpeed.median, A),
          p95: observationWindow(series.closestApproach.p95, series.relativeSpeed.p05, A),
        },
        clipLength: c.video.duration,
      };
    } catch {
      window = null;
    }
  }
  return {
    assumptions: a,
    laneSpeed: lanes.speed,
    laneSpeedMissing: lanes.missing,
    frame,
    timestamps,
    series,
    seriesMissing,
    track,
    trackMissing,
    readings,
    verdicts,
    verdictMissing,
    window,
    problems,
    dimensionMismatch: mismatch ? mismatchText(mismatch) : null,
  };
}

/** The readings in the order CaseAnalysis.readings documents, the fit's filtered by the direction assumed. */
function speedReadings(
  timestamps: readonly TimestampFigures[],
  track: TrackResult | null,
  series: SeriesResult | null,
  direction: EngineAssumptions['direction'],
): SpeedReading[] {
  const out: SpeedReading[] = [];
  const pinned = timestamps.find((x) => x.result.impliedSpeed);
  if (pinned) out.push({ basis: 'landmark', t: pinned.t, speed: magnitude(pinned.result.impliedSpeed!) });
  if (track) out.push({ basis: 'track', speed: track.speed });
  const o = series?.objectSpeed;
  if (o) {
    if (o.opposite && direction !== 'same') out.push({ basis: 'fit-opposite', speed: o.opposite });
    if (o.sameSlower && direction !== 'opposite') out.push({ basis: 'fit-same-slower', speed: o.sameSlower });
    if (o.sameFaster && direction !== 'opposite') out.push({ basis: 'fit-same-faster', speed: o.sameFaster });
  }
  return out;
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

/*
 * Each lane-dash mark is the moment a dash's leading edge meets the user's reference, one per
 * dash in a row, so n passes span n - 1 cycles. A quarter of a cycle of tolerance covers placing
 * the edge on the frame nearest to it (common practice: frame steps at road speed are a few metres).
 */
const PASS_TOLERANCE_CYCLES = 0.25;

function measuredObserverSpeed(c: CaseRecord, cycleId: string | null): { speed: LaneSpeed | null; missing: string | null } {
  const passes = c.marks.filter((m) => m.kind === 'lane-dash').sort((x, y) => x.t - y.t);
  if (!cycleId) return { speed: null, missing: passes.length ? 'Lane-dash passes are marked: choose the road’s lane-line cycle to measure the observer’s speed from them.' : null };
  if (passes.length < 2) return { speed: null, missing: `Measuring the observer’s speed needs 2 or more lane-dash passes (${passes.length} so far).` };
  const cycle = laneCycleById(cycleId);
  const t1 = passes[0]!.t;
  const t2 = passes[passes.length - 1]!.t;
  try {
    const v = observerSpeedFromDashes(passes.length - 1, cycle.cycleM, t1, t2, PASS_TOLERANCE_CYCLES);
    return { speed: { cycleLabel: cycle.label, cycleM: cycle.cycleM, source: cycle.source, passes: passes.length, t1, t2, speed: { lo: v.lo, median: v.speed, hi: v.hi } }, missing: null };
  } catch (err) {
    return { speed: null, missing: `No observer speed from the lane dashes: ${(err as Error).message}` };
  }
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

import type { AxisCode } from '../engine/pass-model';
import type { Conditioning, PassHypothesis, PassMarkFigures, PassReading, PassResult } from '../engine/pass-series';
import type { Verdict } from '../engine/plausibility';
import type { Estimate } from '../engine/stats';
import type { FrameResult } from '../engine/frame-solve';
import type { RegimeShares } from '../engine/uncertainty';
import type { EngineAssumptions } from './assumptions';
import type { FrameRect } from './frames';
import type { LandmarkCheck } from './landmark-checks';
import type { LaneSpeed } from './lane-speed';
import type { FieldOfView } from './pass-scene';
import type { Mark } from './schema';

/*
 * The shape of a case's figures (analysis.ts computes them): what the popup shows, the summary
 * writes and the command line prints. Apart from the computation, so that the modules that read
 * the figures (pass-figures.ts, plots, the summary) need not import the one that makes them.
 */

export interface TimestampFigures {
  t: number;
  objectMark: Mark;
  spanPx: number;
  /** this frame alone */
  result: FrameResult;
  landmarkMark: Mark | null;
  /** The regime most draws agree on, when a fixed point was computed. */
  regime: keyof RegimeShares | null;
  /** this frame's figures from the pass, the aspect taken from the fitted geometry */
  fitted: PassMarkFigures | null;
}

/** One reading of the object's ground speed, with what it rests on. */
export interface SpeedReading {
  /** Where the reading comes from: a landmark on the sight line, the pass for one direction, or a fixed camera's pass (with a heading). */
  basis: 'landmark' | 'fit-opposite' | 'fit-same-slower' | 'fit-same-faster' | 'track';
  /** The timestamp of a landmark reading. */
  t?: number;
  speed: Estimate;
  /** The pass's reading behind it, with the motionless point for that direction. */
  pass?: PassReading;
}

/** A verdict on one reading (with the wind assumed, if any). */
export interface JudgedReading {
  reading: SpeedReading;
  /** The speed through the air the verdict judged: the ground speed plus the headwind band. */
  airspeed: Estimate;
  verdict: Verdict;
}

/** The pass, as the views show it: the figures of the sign that leads, and every sign's. */
export interface PassSummary {
  /** slant distance at closest approach */
  closestApproach: Estimate;
  /** horizontal distance at closest approach */
  closestHorizontal: Estimate;
  relativeSpeed: Estimate;
  tClosest: Estimate;
  axis: AxisCode;
  lead: PassHypothesis;
  result: PassResult;
  conditioning: Conditioning;
  draws: number;
  seed: number;
}

/** A fixed camera's ground track: the pass with a heading. */
export interface TrackSummary {
  speed: Estimate;
  /** rad, + to the right of the road ahead (as the assumptions give the aim) */
  heading: Estimate;
  /** horizontal distance at closest approach */
  closestApproach: Estimate;
  residualRms: null;
  draws: number;
  seed: number;
}

export type WarningCode =
  | 'landmark'
  | 'ill-conditioned'
  | 'elevation-assumed'
  | 'portrait-field'
  | 'direction-unsupported'
  | 'mixed-dimensions'
  | 'large-case';

export interface CaseWarning {
  code: WarningCode;
  text: string;
}

export interface CaseAnalysis {
  assumptions: EngineAssumptions;
  /** Set when the observer speed in `assumptions` was measured from lane dashes. */
  laneSpeed: LaneSpeed | null;
  laneSpeedMissing: string | null;
  frame: FrameRect;
  field: FieldOfView;
  timestamps: TimestampFigures[];
  series: PassSummary | null;
  /** Why there is no pass, in one line, when there is none. */
  seriesMissing: string | null;
  /** Fixed-camera ground track, when the camera kept its aim and 2 or more timestamps are marked. */
  track: TrackSummary | null;
  trackMissing: string | null;
  /**
   * The object's ground speed readings that may be judged, in order of what they rest on: a
   * landmark that passed every check, then the ground track, then the pass's readings for each
   * direction the marks and the user leave open.
   */
  readings: SpeedReading[];
  /** Landmark readings set aside because the landmark cannot be the motionless point. */
  setAside: { reading: SpeedReading; check: LandmarkCheck }[];
  landmarkChecks: LandmarkCheck[];
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
  /** What weakens or contradicts the figures, each named, in plain words. */
  warnings: CaseWarning[];
  /** When the object's spans were marked as another dimension than the size assumed (size-match.ts), in one sentence. */
  dimensionMismatch: string | null;
}

export interface AnalysisOptions {
  draws?: number;
  seriesDraws?: number;
  trackDraws?: number;
  seed?: number;
  /**
   * Hears how far the computation is, in steps (a frame solved, a draw of the pass), for a progress
   * bar: the total is known from the start and only grows if the pass turns out to have more.
   */
  onProgress?: (done: number, total: number) => void;
}

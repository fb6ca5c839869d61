import { observationWindow } from '../engine/speed';
import type { EngineAssumptions } from './assumptions';
import type { CaseAnalysis, CaseWarning, PassSummary, TrackSummary } from './analysis-types';
import type { FieldOfView } from './pass-scene';
import type { Mark } from './schema';
import type { PassReading } from '../engine/pass-series';

/*
 * What a case's pass gives beyond its own figures: the warnings that weaken it, a fixed camera's
 * ground track in the assumptions' terms, and the observation window against the clip's length.
 */

/** What weakens the pass: a fit the marks barely settle, and an elevation nothing in the frame gives. */
export function passWarnings(s: PassSummary, a: EngineAssumptions, objects: readonly Mark[]): CaseWarning[] {
  const out: CaseWarning[] = [];
  const c = s.conditioning;
  if (c.ill) {
    const when =
      c.settleBefore !== null && c.settleAfter !== null
        ? ` Marks before ${Math.max(0, c.settleBefore).toFixed(1)} s or after ${c.settleAfter.toFixed(1)} s (where the span should differ by enough from its largest) would settle it.`
        : ' Marks farther from the moment of closest approach would settle it.';
    out.push({
      code: 'ill-conditioned',
      text: `The object's span changes by only ${(100 * c.spanChange).toFixed(1)} % over the marked frames, against about ${(100 * c.spanNoise).toFixed(1)} % uncertainty each: the relative speed is barely settled (its interval is ${(100 * c.relativeSpread).toFixed(0)} % of its median wide).${when}`,
    });
  }
  if (s.result.elevationSources.every((x) => x === 'assumed')) {
    out.push({
      code: 'elevation-assumed',
      text: a.elevation
        ? `No horizon, landmark foot or camera pitch gives the object's elevation on the ${objects.length} marked frames: horizontal distances use the elevation assumed.`
        : `No horizon, landmark foot or camera pitch gives the object's elevation on the ${objects.length} marked frames: horizontal distances allow any elevation from 0 to 60 deg, so they are wide. Mark the horizon on a frame with the object's ends to narrow them.`,
    });
  }
  return out;
}

export function trackSummary(r: PassReading, s: PassSummary): TrackSummary {
  // the engine's headings are + to the left; the assumptions' aim, + to the right
  const h = r.heading;
  return { speed: r.speed, heading: { p05: -h.p95, median: -h.median, p95: -h.p05 }, closestApproach: s.closestHorizontal, residualRms: null, draws: s.draws, seed: s.seed };
}

export function observation(series: PassSummary | null, field: FieldOfView, clipLength: number | null): CaseAnalysis['window'] {
  if (!series || !(series.closestApproach.median > 0) || !(series.relativeSpeed.p05 > 0)) return null;
  const A = (field.hfov.lo + field.hfov.hi) / 4; // half of the middle field of view
  try {
    return {
      halfAngle: A,
      estimate: {
        // a closest approach that may be zero (a collision course) lets the window shrink to nothing
        p05: series.closestApproach.p05 > 0 ? observationWindow(series.closestApproach.p05, series.relativeSpeed.p95, A) : 0,
        median: observationWindow(series.closestApproach.median, series.relativeSpeed.median, A),
        p95: observationWindow(series.closestApproach.p95, series.relativeSpeed.p05, A),
      },
      clipLength,
    };
  } catch {
    return null;
  }
}


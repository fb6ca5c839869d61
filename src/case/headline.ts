import type { Estimate } from '../engine/stats';
import { formatEstimate, type Quantity, type UnitSystem } from '../engine/units';
import { analyseCase, type CaseAnalysis } from './analysis';
import type { CaseRecord } from './schema';

/*
 * The one figure the case log shows per case. It is an Estimate, never a bare number: the log
 * shows the median together with its 5-95 % interval, or says there is no figure yet.
 */

export interface Headline {
  /** What the figure is, in words ("range at 1.200 s"). */
  label: string;
  quantity: Quantity;
  estimate: Estimate;
}

/*
 * The log computes headlines for the rows in view while the user scrolls, so it runs the engine at
 * far fewer draws than the case view's 20 000: the median moves little, the interval's ends a few
 * per cent (quantiles from 1 000 draws; common practice for a preview). The case view has the full run.
 */
export const HEADLINE_DRAWS = 1_000;
export const HEADLINE_SERIES_DRAWS = 200;

/**
 * The most telling figure a case has: the object's ground speed when one reading settles it (a
 * landmark the object seems pinned over, or a fixed camera's ground track), else the
 * range-over-time fit's closest approach (the fit's speed readings depend on a direction that may
 * be open, so one of them alone would mislead), else the range at the first marked timestamp.
 * Null when the marks give no figure at all.
 */
export function headlineOf(r: CaseAnalysis): Headline | null {
  const settled = r.readings.find((x) => x.basis === 'landmark' || x.basis === 'track');
  if (settled?.basis === 'landmark') return { label: `object speed from the landmark at ${settled.t!.toFixed(3)} s`, quantity: 'speed', estimate: settled.speed };
  if (settled) return { label: 'object speed from the ground track', quantity: 'speed', estimate: settled.speed };
  if (r.series) return { label: 'closest approach', quantity: 'distance', estimate: r.series.closestApproach };
  const first = r.timestamps[0];
  if (first) return { label: `range at ${first.t.toFixed(3)} s`, quantity: 'distance', estimate: first.result.range };
  return null;
}

/** A case's headline at the log's draw counts (seeded, so the same record gives the same text). */
export function caseHeadline(c: CaseRecord): Headline | null {
  return headlineOf(analyseCase(c, { draws: HEADLINE_DRAWS, seriesDraws: HEADLINE_SERIES_DRAWS, trackDraws: HEADLINE_SERIES_DRAWS }));
}

/** The headline as the log prints it: label, median and interval; `none` when there is no figure. */
export function headlineText(h: Headline | null, system: UnitSystem, none: string): string {
  if (!h) return none;
  return `${h.label}: ${formatEstimate(h.estimate, h.quantity, system)}`;
}

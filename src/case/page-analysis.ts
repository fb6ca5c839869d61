import type { PassHypothesis } from '../engine/pass-series';
import type { CaseAnalysis, PassSummary } from './analysis';
import { planView, rangePlot, type PlanView, type RangePlot } from './plots';

/*
 * What a page is sent of a case's figures. On a case at the mark limit the figures are about 16 MB
 * of objects, and every byte crosses from the worker to the page's thread, where taking them in
 * holds the page. A third of that is the pass's figures per frame, kept once for each direction it
 * tried. Of those the page draws only the plots, so the plots are drawn up where the figures are
 * computed and the per-frame pass figures stay behind: each frame's own share is on its timestamp
 * (`fitted`), and the summary and the readings read the pass's totals. Everything else is the same
 * objects, so the readings a hypothesis holds are still the very ones the case's readings name.
 */
export interface PageFigures {
  r: CaseAnalysis;
  rangePlot: RangePlot | null;
  /** The plan view for each direction the pass's readings leave open, and under `first` the one drawn when none is chosen. */
  plans: Partial<Record<PlanView['direction'] | 'first', PlanView | null>>;
}

export function pageFigures(r: CaseAnalysis): PageFigures {
  const plans: PageFigures['plans'] = {};
  for (const x of r.readings) if (x.pass && !(x.pass.direction in plans)) plans[x.pass.direction] = planView(r, x.pass.direction);
  // none chosen, planView draws the first pass reading's direction, already drawn above
  const first = r.readings.find((x) => x.pass)?.pass;
  plans.first = first ? plans[first.direction]! : planView(r);
  return { r: slim(r), rangePlot: rangePlot(r), plans };
}

/** The plan view for a direction, as planView(r, direction) gives it on the whole figures. */
export function planFor(f: PageFigures, direction: PlanView['direction'] | undefined): PlanView | null {
  return (direction === undefined ? f.plans.first : f.plans[direction]) ?? null;
}

function slim(r: CaseAnalysis): CaseAnalysis {
  return r.series ? { ...r, series: slimSeries(r.series) } : r;
}

function slimSeries(s: PassSummary): PassSummary {
  const bare = (h: PassHypothesis): PassHypothesis => ({ ...h, marks: [], landmarks: [] });
  const slimmed = new Map(s.result.hypotheses.map((h) => [h, bare(h)]));
  return { ...s, lead: slimmed.get(s.lead) ?? bare(s.lead), result: { ...s.result, hypotheses: s.result.hypotheses.map((h) => slimmed.get(h)!) } };
}

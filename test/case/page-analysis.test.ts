import { describe, expect, it } from 'vitest';
import { analyseCase, type AnalysisOptions } from '../../src/case/analysis';
import { pageFigures, planFor } from '../../src/case/page-analysis';
import { planView, rangePlot } from '../../src/case/plots';
import { summaryText } from '../../src/case/summary';
import type { CaseRecord } from '../../src/case/schema';
import { bigCase, limitCaseOptions } from './big-case';
import { loadTruth, truthCase } from './truth-cases';

/*
 * What a page is sent of a case's figures leaves the pass's per-frame figures behind (page-analysis.ts).
 * The check is that nothing a page shows or hands on changes: the summary in every format and unit
 * system, the range plot and the plan view for each direction come out the same from the slim
 * figures as from the whole ones, on scenes rendered with exact truth (test/fixtures/clips, marked
 * at the true pixels) and on the invented case at the mark limit (big-case.ts), where the slim
 * figures must also be markedly smaller than the whole.
 */
const RUN = { draws: 2000, seriesDraws: 400, seed: 3 };

function samePageFigures(c: CaseRecord, run: AnalysisOptions = RUN): { whole: number; slim: number } {
  const r = analyseCase(c, run);
  const f = pageFigures(r);
  const p = f.r;
  expect(p.series, 'a pass to slim').not.toBeNull();
  for (const format of ['text', 'markdown'] as const) {
    for (const system of ['metric', 'imperial', 'aviation'] as const) {
      expect(summaryText(c, p, { format, system, toolVersion: '0.0.0' }), `${format}, ${system}`).toBe(summaryText(c, r, { format, system, toolVersion: '0.0.0' }));
    }
  }
  expect(f.rangePlot).toEqual(rangePlot(r));
  // every direction a reading leaves open, and none chosen, draws the plan planView draws from the whole figures
  const open = [...new Set(r.readings.flatMap((x) => (x.pass ? [x.pass.direction] : [])))];
  expect(open.length).toBeGreaterThan(0);
  for (const direction of [undefined, ...open]) {
    const plan = planFor(f, direction);
    expect(plan, `plan view, ${direction ?? 'none chosen'}`).not.toBeNull();
    expect(plan).toEqual(planView(r, direction));
  }
  // the case's own figures are left whole: the slim view is a copy
  expect(r.series!.lead.marks.length).toBeGreaterThan(0);
  return { whole: JSON.stringify(r).length, slim: JSON.stringify(f).length };
}

describe("a page's share of the figures", () => {
  for (const name of ['opp-length', 'same-faster-decoy', 'fixed-large']) {
    it(`${name} (rendered truth): the summary, the range plot and the plan view are unchanged`, () => {
      samePageFigures(truthCase(loadTruth(name), { sigmaPx: 0.3 }));
    });
  }

  it('the invented case at the mark limit: unchanged, and at least a quarter smaller', () => {
    const { whole, slim } = samePageFigures(bigCase(limitCaseOptions()), {});
    expect(slim).toBeLessThan(0.75 * whole);
  }, 120_000);

  it('a case with no pass is passed through as it is', () => {
    const t = loadTruth('opp-length');
    const c = truthCase(t, { sigmaPx: 0.3 });
    const one: CaseRecord = { ...c, marks: c.marks.filter((m) => m.t === c.marks[0]!.t) };
    const r = analyseCase(one, RUN);
    expect(r.series).toBeNull();
    const f = pageFigures(r);
    expect(f.r).toBe(r);
    expect(planFor(f, undefined)).toEqual(planView(r));
  });
});

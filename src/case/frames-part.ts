import { finishAnalysis, planAnalysis, solveFrames, solvePassPart, type AnalysisPlan, type FramesPart } from './analysis';
import type { AnalysisOptions, CaseAnalysis, TimestampFigures } from './analysis-types';
import type { CaseRecord } from './schema';

/*
 * The frames' figures as they cross between threads: a frame's marks by their place in the case
 * (each thread holds its own copy of the case's marks) and the figures as plain data. The receiving
 * side rebuilds the same objects, with the same keys in the same order, so that what it prints is
 * byte for byte what one thread would have printed.
 */

export interface PortableFrames {
  rows: { k: number; spanPx: number; result: TimestampFigures['result']; landmark: number; regime: TimestampFigures['regime'] }[];
  problems: string[];
}

export function portableFrames(plan: AnalysisPlan, part: FramesPart): PortableFrames {
  const objectPlace = new Map(plan.allObjects.map((m, k) => [m, k]));
  const markPlace = new Map(plan.c.marks.map((m, k) => [m, k]));
  return {
    rows: part.timestamps.map((ts) => ({
      k: objectPlace.get(ts.objectMark)!,
      spanPx: ts.spanPx,
      result: ts.result,
      landmark: ts.landmarkMark ? markPlace.get(ts.landmarkMark)! : -1,
      regime: ts.regime,
    })),
    problems: part.problems,
  };
}

export function adoptFrames(plan: AnalysisPlan, p: PortableFrames): FramesPart {
  return {
    timestamps: p.rows.map((r) => {
      const m = plan.allObjects[r.k]!;
      return { t: m.t, objectMark: m, spanPx: r.spanPx, result: r.result, landmarkMark: r.landmark >= 0 ? plan.c.marks[r.landmark]! : null, regime: r.regime, fitted: null };
    }),
    problems: p.problems,
  };
}

/** The worker's half of analyseCaseBeside: every marked frame of `c` alone, ready to cross. */
export function framesOnly(c: CaseRecord, options: AnalysisOptions = {}): PortableFrames {
  const plan = planAnalysis(c, options);
  return portableFrames(plan, solveFrames(plan));
}

/**
 * analyseCase with its frames solved elsewhere (`elsewhere` runs framesOnly on another thread) while
 * this thread fits the pass: the same figures, in about the longer of the two times instead of their
 * sum. Should the other thread fail, the frames are solved here.
 */
export async function analyseCaseBeside(c: CaseRecord, elsewhere: (c: CaseRecord) => Promise<PortableFrames>, options: AnalysisOptions = {}): Promise<CaseAnalysis> {
  const plan = planAnalysis(c, options);
  const frames = elsewhere(c).then(
    (p) => adoptFrames(plan, p),
    () => null,
  );
  const pass = solvePassPart(plan);
  return finishAnalysis(plan, (await frames) ?? solveFrames(plan), pass);
}

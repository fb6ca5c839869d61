/// <reference lib="webworker" />
import { analyseCase, pageFigures, type PageFigures, type CaseRecord } from '../../src/case';

/*
 * The case's figures, computed in a worker of the popup's page: a case of thousands of frames takes
 * seconds, and on the page's own thread it froze every click and redraw that long. One request at a
 * time; the page ends a worker whose case was edited since (use-analysis.ts), so nothing here
 * cancels. Progress is posted at most every 50 ms: a message per step would cost more than the step.
 */

export type AnalysisRequest = { id: number; c: CaseRecord };
export type AnalysisReply =
  | { id: number; kind: 'progress'; done: number; total: number }
  | { id: number; kind: 'result'; f: PageFigures }
  | { id: number; kind: 'error'; message: string };

const scope = self as unknown as DedicatedWorkerGlobalScope;
const post = (m: AnalysisReply) => scope.postMessage(m);

scope.onmessage = (e: MessageEvent<AnalysisRequest>) => {
  const { id, c } = e.data;
  let last = 0;
  try {
    const r = analyseCase(c, {
      onProgress: (done, total) => {
        const now = performance.now();
        if (now - last < 50) return;
        last = now;
        post({ id, kind: 'progress', done, total });
      },
    });
    // the page's share only (page-analysis.ts): taking in the whole held the page's thread
    post({ id, kind: 'result', f: pageFigures(r) });
  } catch (err) {
    post({ id, kind: 'error', message: (err as Error).message });
  }
};

import { useEffect, useRef, useState } from 'preact/hooks';
import type { PageFigures, CaseRecord } from '../../src/case';
import type { AnalysisReply } from './analysis-worker';

/*
 * A case's figures off the page's thread (analysis-worker.ts), with how far along they are. Each
 * case view has a worker of its own. A newer version of the case (an assumption edited, a mark
 * saved) ends the worker still busy with the older one and starts afresh: the older figures would be
 * stale on arrival. An idle worker is kept for the next version.
 */

export interface AnalysisState {
  /** The figures as a page gets them (page-analysis.ts): the case's analysis and its plots. */
  f: PageFigures | null;
  progress: { done: number; total: number } | null;
  error: string | null;
}

const STARTING: AnalysisState = { f: null, progress: { done: 0, total: 1 }, error: null };

interface Slot {
  worker: Worker | null;
  busy: boolean;
  id: number;
}

export function useAnalysis(c: CaseRecord): AnalysisState {
  const [state, setState] = useState<AnalysisState>(STARTING);
  const slot = useRef<Slot>({ worker: null, busy: false, id: 0 });
  useEffect(() => () => slot.current.worker?.terminate(), []);
  useEffect(() => {
    const s = slot.current;
    const id = ++s.id;
    setState(STARTING);
    if (s.worker && s.busy) {
      s.worker.terminate();
      s.worker = null;
    }
    if (!s.worker) s.worker = new Worker(new URL('./analysis-worker.ts', import.meta.url), { type: 'module' });
    s.worker.onmessage = (e: MessageEvent<AnalysisReply>) => {
      const m = e.data;
      if (m.id !== s.id) return;
      if (m.kind === 'progress') return setState({ f: null, progress: { done: m.done, total: m.total }, error: null });
      s.busy = false;
      setState(m.kind === 'result' ? { f: m.f, progress: null, error: null } : { f: null, progress: null, error: m.message });
    };
    // a worker that fails to start, throws outside its own guard or sends what cannot be read would
    // leave the page saying "computing" for ever: say so instead, and start a fresh one next time
    const failed = (why: string) => {
      if (s.id !== id) return;
      s.worker?.terminate();
      s.worker = null;
      s.busy = false;
      setState({ f: null, progress: null, error: why });
    };
    s.worker.onerror = (e: ErrorEvent) => {
      e.preventDefault();
      failed(e.message || 'the figures could not be computed');
    };
    s.worker.onmessageerror = () => failed('the figures could not be read back from their worker');
    s.busy = true;
    s.worker.postMessage({ id, c });
  }, [c]);
  return state;
}

import { DEFAULT_FOLLOW, type FollowedFrame, type FollowRun, type FollowSeed, type Mark } from '../../src/case';
import type { FollowReply, FollowRequest } from './follow-worker';
import { readPageFrame } from './page-frames';
import { regionAround, timeOf, type FollowPlan } from './plan';

/*
 * One follow run, driven from the follow page: the worker says which frame it needs, this reads
 * that frame's region round the object from the video in the tab (page-frames.ts) and hands it
 * over. Cancel ends the worker and reads nothing more.
 */

export interface RunOptions {
  tabId: number;
  frameId: number;
  plan: FollowPlan;
  seed: Mark;
  video: { width: number; height: number };
  signal: AbortSignal;
  /** A correction to re-run the given run from (the engine's reseed), instead of a first run from the seed. */
  correction?: { run: FollowRun; seed: FollowSeed };
  /** Each frame's result as it comes, with how many frames are done. */
  onFrame(frame: FollowedFrame, done: number): void;
}

export function runFollow(o: RunOptions): Promise<FollowRun> {
  const worker = new Worker(new URL('./follow-worker.ts', import.meta.url), { type: 'module' });
  const [p, q] = o.seed.points as [{ x: number; y: number }, { x: number; y: number }];
  // a correction's re-run starts from the user's ends on its frame
  const seedEnds = o.correction ? o.correction.seed.ends.map((e) => ({ x: e.x, y: e.y })) : [p, q];
  const seedIndex = o.correction ? o.correction.seed.frame : o.plan.seedIndex;
  // the last ends trusted on each side of the seed: the next frame's region is laid round them
  const last = new Map<number, readonly { x: number; y: number }[]>([
    [-1, seedEnds],
    [1, seedEnds],
  ]);
  const side = (k: number) => (k < seedIndex ? -1 : 1);
  let done = 0;
  return new Promise<FollowRun>((resolve, reject) => {
    const finish = (err: Error | null, run?: FollowRun) => {
      worker.terminate();
      o.signal.removeEventListener('abort', onAbort);
      if (err) reject(err);
      else resolve(run!);
    };
    const onAbort = () => finish(new DOMException('the follow was cancelled', 'AbortError'));
    o.signal.addEventListener('abort', onAbort);
    const send = (m: FollowRequest, transfer: Transferable[] = []) => worker.postMessage(m, transfer);
    worker.onerror = (e) => {
      e.preventDefault();
      finish(new Error(e.message || 'the follow stopped'));
    };
    worker.onmessage = async (e: MessageEvent<FollowReply>) => {
      const m = e.data;
      if (o.signal.aborted) return;
      if (m.kind === 'error') return finish(new Error(m.message));
      if (m.kind === 'done') return finish(null, m.run);
      if (m.kind === 'result') {
        done++;
        if (m.frame.ends) last.set(side(m.frame.index), m.frame.ends);
        if (m.frame.status === 'seed') last.set(-1, m.frame.ends ?? seedEnds);
        o.onFrame(m.frame, done);
        return;
      }
      try {
        const region = regionAround(last.get(side(m.index))!, o.video.width, o.video.height, DEFAULT_FOLLOW.searchPx);
        const f = await readPageFrame(o.tabId, o.frameId, { t: timeOf(o.plan, m.index), ...region, step: 1 });
        if (o.signal.aborted) return;
        const data = f.gray.data as Uint8ClampedArray;
        send({ kind: 'frame', index: m.index, x: f.x, y: f.y, width: f.gray.width, height: f.gray.height, data }, [data.buffer]);
      } catch (err) {
        finish(err as Error);
      }
    };
    if (o.correction) {
      send({ kind: 'reseed', run: o.correction.run, correction: o.correction.seed, width: o.video.width, height: o.video.height });
      return;
    }
    send({
      kind: 'start',
      count: o.plan.count,
      seed: { frame: o.plan.seedIndex, ends: [{ ...p, sigmaPx: o.seed.edgeSigmaPx }, { ...q, sigmaPx: o.seed.edgeSigmaPx }] },
      settings: {},
      width: o.video.width,
      height: o.video.height,
    });
  });
}

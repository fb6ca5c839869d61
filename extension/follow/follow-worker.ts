/// <reference lib="webworker" />
import { followSteps, reseedSteps, type FollowedFrame, type FollowRun, type FollowSeed, type FollowSettings, type Gray } from '../../src/case';

/*
 * The follow, off the page's thread: the engine's follower one frame at a time (followSteps). It asks
 * for the frame it needs next; the page reads it from the video and sends the region round the
 * object, which is laid into a picture of the video's size (black elsewhere: plan.ts regionAround
 * leaves the follower room enough). One run (or one correction's re-run) per worker.
 */

export type FollowRequest =
  | { kind: 'start'; count: number; seed: FollowSeed; settings: Partial<FollowSettings>; width: number; height: number }
  /** A correction: the run so far re-run from it where it depends on it (the engine's reseed). */
  | { kind: 'reseed'; run: FollowRun; correction: FollowSeed; width: number; height: number }
  | { kind: 'frame'; index: number; x: number; y: number; width: number; height: number; data: Uint8ClampedArray };

export type FollowReply =
  | { kind: 'need'; index: number }
  | { kind: 'result'; frame: FollowedFrame }
  | { kind: 'done'; run: FollowRun }
  | { kind: 'error'; message: string };

const scope = self as unknown as DedicatedWorkerGlobalScope;
const post = (m: FollowReply) => scope.postMessage(m);

let follow: ReturnType<typeof followSteps> | null = null;
let size = { width: 0, height: 0 };

function ask(r: IteratorResult<number, void>): void {
  if (r.done) post({ kind: 'done', run: follow!.run });
  else post({ kind: 'need', index: r.value });
}

/** The region laid into a whole picture of the video's size. */
function whole(m: Extract<FollowRequest, { kind: 'frame' }>): Gray {
  const { width: W, height: H } = size;
  const data = new Uint8ClampedArray(W * H);
  for (let j = 0; j < m.height && m.y + j < H; j++) {
    const row = m.data.subarray(j * m.width, j * m.width + Math.min(m.width, W - m.x));
    data.set(row, (m.y + j) * W + m.x);
  }
  return { data, width: W, height: H, channels: 1 };
}

scope.onmessage = (e: MessageEvent<FollowRequest>) => {
  const m = e.data;
  try {
    if (m.kind === 'start') {
      size = { width: m.width, height: m.height };
      follow = followSteps(m.count, m.seed, m.settings);
      ask(follow.steps.next());
      return;
    }
    if (m.kind === 'reseed') {
      size = { width: m.width, height: m.height };
      follow = reseedSteps(m.run, m.correction);
      ask(follow.steps.next());
      return;
    }
    if (!follow) throw new Error('no follow started');
    const r = follow.steps.next(whole(m));
    const f = follow.run.frames[m.index - follow.run.settings.first];
    if (f) post({ kind: 'result', frame: f });
    ask(r);
  } catch (err) {
    post({ kind: 'error', message: (err as Error).message });
  }
};

import { DEG } from '../../src/engine/constants';
import { solveFrame, type FrameScene } from '../../src/engine/uncertainty';
import { solveSeries, type SeriesScene } from '../../src/engine/series';
import { Rng } from '../../src/engine/rng';
import { getHeapSpaceStatistics } from 'node:v8';

/*
 * Engine benchmark: a single-frame solve with 20 000 draws and a range fit over 50 timestamps with
 * 2 000 bootstrap draws, as medians over repeated runs and as a fraction of a 16.7 ms display frame.
 * Allocation per solve is read from the young generation's used size around one solve (new objects
 * land there). `npm run bench` gives Node a 256 MB young generation so that scavenges are rare; a
 * window in which one lands shows a drop and is left out. (A forced full collection between windows
 * would be cleaner, but it makes V8 drop optimised code and so measures something else.)
 */
const FRAME_MS = 1000 / 60;
const W = 1920;
const H = 1080;

export const frameScene: FrameScene = {
  frame: { widthPx: W, heightPx: H },
  hfov: { lo: 62 * DEG, hi: 72 * DEG },
  object: { span: { x1: 900, y1: 500, x2: 1012, y2: 507, edgeSigmaPx: 0.6 }, size: { lo: 24, hi: 36 }, aspect: { lo: 75 * DEG, hi: 90 * DEG } },
  landmark: { span: { x1: 930, y1: 800, x2: 990, y2: 800, edgeSigmaPx: 0.8 }, size: { lo: 9, hi: 12 }, aspect: { lo: 90 * DEG, hi: 90 * DEG } },
  observerSpeed: { lo: 24, hi: 30 },
};

export function seriesScene(n: number): SeriesScene {
  const hfov = 66 * DEG;
  const f = W / 2 / Math.tan(hfov / 2);
  const rng = new Rng(77);
  const marks = Array.from({ length: n }, (_, i) => {
    const t = i * 0.25;
    const R = Math.hypot(2500, 85 * (t - 7));
    const half = f * (15 / R);
    return { t, span: { x1: W / 2 - half + 0.4 * rng.normal(), y1: 540, x2: W / 2 + half + 0.4 * rng.normal(), y2: 540, edgeSigmaPx: 0.4 } };
  });
  return { frame: { widthPx: W, heightPx: H }, hfov: { lo: 62 * DEG, hi: 70 * DEG }, object: { size: { lo: 26, hi: 34 }, aspect: { lo: 90 * DEG, hi: 90 * DEG } }, marks, observerSpeed: { lo: 24, hi: 30 } };
}

function youngUsed(): number {
  return getHeapSpaceStatistics().find((s) => s.space_name === 'new_space')?.space_used_size ?? NaN;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

export interface BenchRow {
  name: string;
  medianMs: number;
  frameShare: number;
  heapBytesPerSolve: number;
  heapBytesPerDraw: number;
}

export function measure(name: string, draws: number, run: () => unknown, reps = 40): BenchRow {
  for (let i = 0; i < 5; i++) run(); // warm up the JIT and the reusable columns
  const times: number[] = [];
  const heap: number[] = [];
  for (let i = 0; i < reps; i++) {
    const before = youngUsed();
    const t0 = performance.now();
    run();
    times.push(performance.now() - t0);
    const grown = youngUsed() - before;
    if (grown >= 0) heap.push(grown);
  }
  const ms = median(times);
  const h = heap.length ? median(heap) : NaN;
  return { name, medianMs: ms, frameShare: ms / FRAME_MS, heapBytesPerSolve: h, heapBytesPerDraw: h / draws };
}

export function engineBench(): BenchRow[] {
  const series = seriesScene(50);
  return [
    measure('single-frame solve, 20 000 draws', 20_000, () => solveFrame(frameScene, { draws: 20_000, seed: 1 })),
    measure('range fit, 50 timestamps, 2 000 bootstrap draws', 2_000, () => solveSeries(series, { draws: 2_000, seed: 1 })),
  ];
}

import { DEG } from '../../src/engine/constants';
import { solveFrame, type FrameScene } from '../../src/engine/frame-solve';
import type { PassScene } from '../../src/engine/pass-inputs';
import { Axis } from '../../src/engine/pass-model';
import { solvePass } from '../../src/engine/pass-series';
import { Rng } from '../../src/engine/rng';
import { getHeapSpaceStatistics } from 'node:v8';

/*
 * Engine benchmark: a single-frame solve with 20 000 draws and the pass fitted to 50 timestamps of an
 * invented pass, 2 000 bootstrap draws for each sign of the relative motion, as medians over repeated runs and as a fraction of a 16.7 ms display frame.
 * Allocation is read from the young generation's used size around one solve (new objects land
 * there), per solve and, as the slope between two draw counts, per draw. `npm run bench` gives Node a 256 MB young generation so that scavenges are rare; a
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

/** An invented pass marked by its length at 50 timestamps, a quarter of a second apart, with a horizon on each frame. */
export function passScene(n: number): PassScene {
  const hfov = 66 * DEG;
  const f = W / 2 / Math.tan(hfov / 2);
  const rng = new Rng(77);
  const D = 900;
  const h = 150;
  const marks = Array.from({ length: n }, (_, i) => {
    const t = i * 0.25;
    const x = 85 * (t - 7);
    const R2 = x * x + D * D + h * h;
    // a length on a parallel pass spans about L rho / R^2 (DESIGN.md)
    const half = (f * (30 * Math.hypot(D, h))) / R2 / 2;
    return { t, span: { x1: W / 2 - half + 0.4 * rng.normal(), y1: 540, x2: W / 2 + half + 0.4 * rng.normal(), y2: 540, edgeSigmaPx: 0.4 } };
  });
  const horizons = marks.map(({ t }) => ({ t, x1: 0, y1: 700, x2: W, y2: 700, sigmaPx: 0.5 }));
  return {
    frame: { widthPx: W, heightPx: H },
    hfov: { lo: 62 * DEG, hi: 70 * DEG },
    object: { size: { lo: 26, hi: 34 }, axis: Axis.LENGTH },
    marks,
    observerSpeed: { lo: 24, hi: 30 },
    trackAngle: { lo: 0, hi: 0 },
    cameraHeight: { lo: 1, hi: 3 },
    horizons,
    landmarks: [],
    fixed: null,
    elevation: { lo: 0, hi: 60 * DEG },
  };
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

/** Median young-generation growth over `reps` solves (windows with a scavenge in them are left out). */
function growth(run: () => unknown, reps: number): number {
  const heap: number[] = [];
  for (let i = 0; i < reps; i++) {
    const before = youngUsed();
    run();
    const grown = youngUsed() - before;
    if (grown >= 0) heap.push(grown);
  }
  return heap.length ? median(heap) : NaN;
}

/*
 * Warm-up runs for at least WARM_MS: V8 needs a few dozen solves before every hot function runs
 * optimised code, and the figures are about that steady state, the one a live readout reaches.
 */
const WARM_MS = 400;

/**
 * Times `run(draws)` and reads its allocation. Heap per draw is the slope between `draws` and twice
 * as many: what a solve allocates per draw, apart from the fixed cost of its result objects and
 * validation (reported as heap per solve).
 */
export function measure(name: string, draws: number, run: (draws: number) => unknown, reps = 40): BenchRow {
  for (const d of [draws, 2 * draws]) {
    const until = performance.now() + WARM_MS / 2;
    while (performance.now() < until) run(d);
  }
  const times: number[] = [];
  for (let i = 0; i < reps; i++) {
    const t0 = performance.now();
    run(draws);
    times.push(performance.now() - t0);
  }
  const perSolve = growth(() => run(draws), reps);
  const perSolveDouble = growth(() => run(2 * draws), reps);
  const ms = median(times);
  return {
    name,
    medianMs: ms,
    frameShare: ms / FRAME_MS,
    heapBytesPerSolve: perSolve,
    heapBytesPerDraw: Math.max(perSolveDouble - perSolve, 0) / draws,
  };
}

export function engineBench(): BenchRow[] {
  const pass = passScene(50);
  return [
    measure('single-frame solve, 20 000 draws', 20_000, (draws) => solveFrame(frameScene, { draws, seed: 1 })),
    measure('pass, 50 timestamps, 2 000 draws per sign, both signs', 2_000, (draws) => solvePass(pass, [-1, 1], { draws, seed: 1 })),
  ];
}

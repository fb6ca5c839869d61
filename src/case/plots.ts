import type { CaseAnalysis } from './analysis';

/*
 * The range-over-time picture as numbers: what to draw, in data units, so that the popup's SVG
 * and any later export draw the same thing. Pure.
 */
export interface RangePlot {
  t: { min: number; max: number; ticks: number[] };
  range: { min: number; max: number; ticks: number[] };
  /** Each timestamp's range with its 5-95 % interval. */
  points: { t: number; p05: number; median: number; p95: number }[];
  /** The fitted pass R(t) = sqrt(D'^2 + V^2 (t - t0)^2) at the median parameters. */
  curve: { t: number; r: number }[];
  /** One sentence saying what the picture shows, for those who cannot see it. */
  description: string;
}

export function rangePlot(a: CaseAnalysis, samples = 60): RangePlot | null {
  if (!a.series || a.timestamps.length < 3) return null;
  const pts = a.timestamps.map((x) => ({ t: x.t, p05: x.result.range.p05, median: x.result.range.median, p95: x.result.range.p95 }));
  const Dp = a.series.closestApproach.median;
  const V = a.series.relativeSpeed.median;
  const t0 = a.series.tClosest.median;
  const t1 = Math.min(...pts.map((p) => p.t));
  const t2 = Math.max(...pts.map((p) => p.t));
  const pad = (t2 - t1) * 0.05 || 0.5;
  const tMin = t1 - pad;
  const tMax = t2 + pad;
  const curve = Array.from({ length: samples + 1 }, (_, i) => {
    const t = tMin + ((tMax - tMin) * i) / samples;
    return { t, r: Math.hypot(Dp, V * (t - t0)) };
  });
  const lo = Math.min(...pts.map((p) => p.p05), ...curve.map((c) => c.r));
  const hi = Math.max(...pts.map((p) => p.p95), ...curve.map((c) => c.r));
  const rTicks = niceTicks(Math.max(0, lo - (hi - lo) * 0.05), hi + (hi - lo) * 0.05);
  const tTicks = niceTicks(tMin, tMax);
  return {
    t: { min: tMin, max: tMax, ticks: tTicks.ticks },
    range: { min: rTicks.min, max: rTicks.max, ticks: rTicks.ticks },
    points: pts,
    curve,
    description: `Range at ${pts.length} timestamps from ${t1.toFixed(2)} s to ${t2.toFixed(2)} s, each with its 5-95 % interval, and the fitted straight pass (closest at ${t0.toFixed(2)} s).`,
  };
}

/** Round tick values (1, 2 or 5 times a power of ten) covering [lo, hi], about five of them. */
export function niceTicks(lo: number, hi: number, target = 5): { min: number; max: number; ticks: number[] } {
  const span = hi - lo || Math.abs(hi) || 1;
  const raw = span / target;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  let min = Math.floor(lo / step) * step;
  let max = Math.ceil(hi / step) * step;
  // a quotient that rounds to zero (a subnormal end) must still leave the end covered
  if (min > lo) min -= step;
  if (max < hi) max += step;
  const ticks: number[] = [];
  // integer steps, so that no rounding error creeps into the labels
  for (let i = 0; min + i * step <= max + step * 1e-9; i++) ticks.push(+(min + i * step).toPrecision(12));
  return { min, max, ticks };
}

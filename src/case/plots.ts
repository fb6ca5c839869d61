import { closestApproach, fixedPointFractionAt, P, relativePosition } from '../engine/pass-model';
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
  /** The fitted pass R(t) = sqrt(D'^2 + V^2 (t - t0)^2) at the median parameters (slant ranges). */
  curve: { t: number; r: number }[];
  /** One sentence saying what the picture shows, for those who cannot see it. */
  description: string;
}

/*
 * A case at the mark limit has thousands of frames: an SVG element for each held the popup's main
 * thread for over a second (test/e2e/popup-large.test.ts). The plots draw at most this many,
 * evenly spaced, the first and the last always among them; the descriptions say so. No figure is
 * computed from the thinned list.
 */
export const MAX_DRAWN = 150;

/** At most `max` of `xs`, evenly spaced by index, keeping the first and the last; `xs` itself when short enough. */
export function thinEvenly<T>(xs: readonly T[], max: number = MAX_DRAWN): T[] {
  if (xs.length <= max) return [...xs];
  const out: T[] = [];
  for (let i = 0; i < max; i++) out.push(xs[Math.round((i * (xs.length - 1)) / (max - 1))]!);
  return out;
}

const drawnNote = (all: number, drawn: number) => (drawn < all ? ` (${drawn} of them drawn, evenly spaced)` : '');

export function rangePlot(a: CaseAnalysis, samples = 60): RangePlot | null {
  if (!a.series || a.timestamps.length < 3) return null;
  // the pass's ranges where it has them: a frame alone takes one aspect for every frame
  const pts = a.timestamps.map((x) => {
    const r = x.fitted?.range ?? x.result.range;
    return { t: x.t, p05: r.p05, median: r.median, p95: r.p95 };
  });
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
    points: thinEvenly(pts),
    curve,
    description: `Range at ${pts.length} timestamps${drawnNote(pts.length, Math.min(pts.length, MAX_DRAWN))} from ${t1.toFixed(2)} s to ${t2.toFixed(2)} s, each with its 5-95 % interval, and the fitted straight pass (closest at ${t0.toFixed(2)} s).`,
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

/*
 * The plan view: the ground seen from above, to scale, for parallel tracks. The range-over-time
 * fit gives the pass relative to the observer (closest approach D' across, relative speed V along,
 * closest at t0); the observer's speed places the observer on its road at u t; the direction of
 * travel chosen (opposite by default, when the figures allow it) fixes the sign. Every sight line
 * then passes through one ground point, the motionless point F, at D u / (u - w) from the road
 * (DESIGN.md; the intercept theorem, Euclid Elements VI.2). D' includes the object's height above
 * the camera, so the track is drawn at D' from the road: the plan is exact for level flight at the
 * camera's height and foreshortens nothing else.
 */
export interface PlanView {
  /**
   * 'pass': from the range-over-time fit, a sight line per timestamp. 'single': one frame with a
   * landmark on its sight line, drawn abeam, since one picture gives no bearing to the road.
   */
  mode: 'pass' | 'single';
  direction: 'opposite' | 'same-slower' | 'same-faster';
  /** Metres: x along the road (direction of travel), y across toward the object. */
  trackDistance: number;
  observerSpeed: number;
  objectSpeed: number;
  sightLines: { t: number; observer: { x: number; y: number }; object: { x: number; y: number } }[];
  fixedPoint: { x: number; y: number; fromRoad: number } | null;
  /** The 5-95 % interval of the track's distance from the road, drawn as a band. */
  trackBand: { lo: number; hi: number };
  bounds: { xMin: number; xMax: number; yMin: number; yMax: number };
  description: string;
}

export function planView(a: CaseAnalysis, direction?: PlanView['direction']): PlanView | null {
  const s = a.series;
  const u = a.assumptions.observerSpeed;
  if (!u) return null;
  if (!s) return singleFramePlan(a, (u.lo + u.hi) / 2);
  const passReadings = a.readings.filter((x) => x.pass).map((x) => x.pass!);
  const reading = (direction ? passReadings.find((r) => r.direction === direction) : undefined) ?? passReadings[0];
  if (!reading) return null;
  const hyp = s.result.hypotheses.find((h) => h.readings.includes(reading));
  if (!hyp) return null;
  // one consistent geometry: the nominal fit of this reading's sign, at the reading's median speed
  // along the road (the same straight relative track, at the speed that reading gives)
  const n = hyp.nominal;
  const p = Float64Array.from(n.params);
  const ca = new Float64Array(3);
  closestApproach(p, n.u, n.tr, ca);
  p[P.w] = reading.alongRoad.median / Math.cos(p[P.beta]!);
  const vx = p[P.w]! * Math.cos(p[P.beta]!) - n.u;
  const vy = p[P.w]! * Math.sin(p[P.beta]!);
  // keep the time of closest approach: the object stands where the new speed puts it then
  const rel = new Float64Array(3);
  relativePosition(Float64Array.from(n.params), n.u, n.tr, ca[0]!, rel);
  p[P.xr] = rel[0]! - vx * (ca[0]! - n.tr);
  const yAt = rel[1]! - vy * (ca[0]! - n.tr);
  p[P.rho] = Math.hypot(yAt, rel[2]!);
  p[P.eps] = Math.atan2(rel[2]!, yAt);
  const sightLines = hyp.marks.map((m) => {
    relativePosition(p, n.u, n.tr, m.t, rel);
    const ox = n.u * m.t;
    return { t: m.t, observer: { x: ox, y: 0 }, object: { x: ox + rel[0]!, y: rel[1]! } };
  });
  const fp = reading.fixedPoint;
  const ref = fp ? sightLines.find((l) => Math.abs(l.t - fp.t) < 1e-9) : undefined;
  const frac = ref ? fixedPointFractionAt(p, n.u, ref.object.x - ref.observer.x, ref.object.y) : Number.NaN;
  const fixedPoint =
    ref && Number.isFinite(frac)
      ? { x: ref.observer.x + frac * (ref.object.x - ref.observer.x), y: frac * ref.object.y, fromRoad: frac * ref.object.y }
      : null;
  const uM = n.u;
  const refMark = hyp.marks[Math.floor((hyp.marks.length - 1) / 2)]!;
  const D = refMark.y.median;
  const xs = sightLines.flatMap((l) => [l.observer.x, l.object.x]).concat(fixedPoint ? [fixedPoint.x] : []);
  const ys = [0, ...sightLines.map((l) => l.object.y)].concat(fixedPoint ? [fixedPoint.y] : []);
  const pad = Math.max(Math.max(...xs) - Math.min(...xs), Math.max(...ys) - Math.min(...ys)) * 0.08 || 10;
  const regime = majorityRegime(reading.regimeShares);
  const where =
    regime === 'behind'
      ? 'behind the observer, out of view'
      : regime === 'none' || !fixedPoint
        ? 'nowhere: the bearing does not change'
        : regime === 'between'
          ? 'between the road and the track'
          : 'beyond the track';
  return {
    direction: reading.direction,
    trackDistance: D,
    observerSpeed: uM,
    objectSpeed: reading.alongRoad.median,
    sightLines: thinEvenly(sightLines),
    fixedPoint,
    trackBand: { lo: refMark.y.p05, hi: refMark.y.p95 },
    bounds: { xMin: Math.min(...xs) - pad, xMax: Math.max(...xs) + pad, yMin: Math.min(...ys) - pad, yMax: Math.max(refMark.y.p95, ...ys) + pad },
    mode: 'pass',
    description: `Plan view to scale: the observer's road; the object's track, ${D.toFixed(0)} m from the road (horizontal, square to the road) at ${refMark.t.toFixed(2)} s; ${sightLines.length} sight lines${drawnNote(sightLines.length, Math.min(sightLines.length, MAX_DRAWN))}. Reading the object as flying ${reading.direction.replace('-', ' and ')}, the motionless point lies ${where}${fixedPoint && regime !== 'behind' ? `, ${fixedPoint.fromRoad.toFixed(0)} m from the road` : regime === 'behind' && fp ? `, ${Math.abs(fp.horizontalDistance.median).toFixed(0)} m behind the camera along the sight line` : ''}.`,
  };
}

function majorityRegime(s: { between: number; beyond: number; behind: number; none: number }): 'between' | 'beyond' | 'behind' | 'none' {
  return (Object.keys(s) as ('between' | 'beyond' | 'behind' | 'none')[]).reduce((a, b) => (s[b] > s[a] ? b : a));
}

/**
 * One frame whose object seems pinned over a landmark: the sight line from the observer through
 * the landmark (the motionless point, by the intercept theorem) to the object, drawn square to the
 * road; the object's track runs parallel to the road at its range. Speeds are the medians.
 */
function singleFramePlan(a: CaseAnalysis, u: number): PlanView | null {
  const ts = a.timestamps.find((x) => x.result.impliedSpeed && x.result.landmarkRange);
  if (!ts) return null;
  // on the ground: horizontal distances where the frame gives the elevation, else the slant ones, said so
  const horizontal = !!ts.result.horizontalRange && !!ts.result.landmarkHorizontalRange;
  const range = horizontal ? ts.result.horizontalRange! : ts.result.range;
  const R = range.median;
  const d = (horizontal ? ts.result.landmarkHorizontalRange! : ts.result.landmarkRange!).median;
  const w = ts.result.impliedSpeed!.median;
  const direction = w < 0 ? 'opposite' : w <= u ? 'same-slower' : 'same-faster';
  const pad = Math.max(range.p95, u) * 0.08;
  const half = Math.max(R, range.p95) * 0.6;
  return {
    mode: 'single',
    direction,
    trackDistance: R,
    observerSpeed: u,
    objectSpeed: w,
    sightLines: [{ t: ts.t, observer: { x: 0, y: 0 }, object: { x: 0, y: R } }],
    fixedPoint: { x: 0, y: d, fromRoad: d },
    trackBand: { lo: range.p05, hi: range.p95 },
    bounds: { xMin: -half, xMax: half, yMin: -pad, yMax: range.p95 + pad },
    description: `Plan view of the frame at ${ts.t.toFixed(2)} s, drawn abeam (one picture gives no bearing to the road): the object ${R.toFixed(0)} m away on the sight line (${horizontal ? 'horizontal' : 'slant: nothing on this frame gives the elevation'}), the landmark it seems pinned over ${d.toFixed(0)} m away (the motionless point), the object flying ${direction.replace('-', ' and ')} at ${Math.abs(w).toFixed(0)} m/s against the observer's ${u.toFixed(0)} m/s.`,
  };
}

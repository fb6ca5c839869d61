import { MAX_SPEED_MS } from './constants';
import { InputError, UndeterminedError } from './errors';
import { drawValues, fillDraw, NOMINAL, randomPicker, spanLines, spanSigmas, type PassScene } from './pass-inputs';
import { FIT_REPORT, FIT_TOLERANCE, FitOutcome, fitPass, passData, Q, startFromSpans, toPhysical, type PassData } from './pass-fit';
import { closestApproach, fixedPointFractionAt, P, PASS_PARAMS, relativePosition } from './pass-model';
import { Rng } from './rng';
import { regimeShares, shareBelow, summarize as summarizeAll, summarizeOrNull, unwrapAround, type Estimate } from './stats';
import { checkHfov, checkOptions, checkSpan, type SolveOptions } from './uncertainty';
import { band, inRange } from './validate';
import { aggregate, binnedData, passBins, type PassBins } from './pass-bins';
import { drawStore, type DrawStore } from './pass-draws';
import { kinematics, markFigures, type PassMarkFigures } from './pass-marks';

export type { PassMarkFigures };

/*
 * The pass with its uncertainty: a parametric bootstrap through the pass fit (pass-fit.ts). The
 * nominal draw (every band's middle, no noise) is fitted from several starts for each sign of the
 * relative motion the caller leaves open; every other draw redraws the inputs, moves every mark by
 * its uncertainty and refits from that nominal answer. The figures are the draws' median and 5-95 %
 * interval; a draw whose fit fails is counted and left out, and a reading a sign's draws split into
 * (the other way, or the same way slower) carries its share.
 */

export type Direction = 'opposite' | 'same-slower' | 'same-faster';

/** Estimates of one figure over the draws that had it, with the share that had it. */
export interface PassReading {
  direction: Direction;
  /** share of this sign's kept draws that read this direction */
  share: number;
  /** the object's ground speed, m/s */
  speed: Estimate;
  /** its component along the road, signed (negative: against the observer's travel) */
  alongRoad: Estimate;
  /** its ground heading, rad, + to the left of the road ahead, unwrapped around the draws' mean direction */
  heading: Estimate;
  /** where the motionless point lies at the reference mark, when it is finite in most draws */
  fixedPoint: { t: number; fraction: Estimate; horizontalDistance: Estimate; fromRoad: Estimate } | null;
  /** share of draws with the point between, beyond, behind, or none (at the reference mark) */
  regimeShares: { between: number; beyond: number; behind: number; none: number };
  /** the point's horizontal distance from the observer at the first and last marks: how far it wanders */
  wander: { first: Estimate; last: Estimate } | null;
}


export interface LandmarkFigures {
  id: string;
  t: number;
  /** horizontal range to the landmark's foot, m */
  range: Estimate;
  /** landmark distance / the fit's motionless point's distance along the same sight line: 1 if it is the point */
  ratio: Estimate | null;
  /** share of draws with that ratio below 1 (near 0 or 1: the landmark is not the point) */
  ratioBelowOne: number | null;
  /** the object's signed speed along its track if the landmark were the motionless point, with the fit's ranges */
  impliedSpeed: Estimate | null;
}

export interface PassHypothesis {
  /** -1: the object drifts back past the camera (the other way, or the same way slower); +1: it pulls ahead */
  sign: -1 | 1;
  nominalChi2: number;
  residuals: number;
  /** this sign fits the marks far worse than the other (more than 9 in chi^2) */
  ruledOut: boolean;
  keptShare: number;
  relativeSpeed: Estimate;
  closestSlant: Estimate;
  closestHorizontal: Estimate;
  tClosest: Estimate;
  marks: PassMarkFigures[];
  readings: PassReading[];
  landmarks: LandmarkFigures[];
  /**
   * The nominal draw's fitted pass (pass-model.ts P order: w, beta, xr, rho, eps) with the observer's
   * speed and the reference time it holds for: one consistent geometry, for drawing it.
   */
  nominal: { params: number[]; u: number; tr: number };
}

export interface Conditioning {
  /** how much the fitted span changes over the marks, as a share of its largest value */
  spanChange: number;
  /** a span's typical relative uncertainty */
  spanNoise: number;
  /** spread of the relative speed, (p95 - p05) / median, over the better sign's draws */
  relativeSpread: number;
  ill: boolean;
  /** times (s) beyond which marks would change the span enough to settle the fit, when ill */
  settleBefore: number | null;
  settleAfter: number | null;
}

export interface PassResult {
  hypotheses: PassHypothesis[];
  /** which marks' elevations came from the frame: 'horizon' | 'landmark' | 'pitch' | 'assumed' per mark */
  elevationSources: ('horizon' | 'landmark' | 'pitch' | 'assumed')[];
  conditioning: Conditioning;
  draws: number;
  seed: number;
}

const SOURCES = ['assumed', 'horizon', 'landmark', 'pitch'] as const;
/** The fit is ill-conditioned when the span changes by less than this many times its noise (common practice: a curvature resolved at a few sigma). */
const ILL_SPAN_CHANGE_Z = 6;
const ILL_RELATIVE_SPREAD = 1;

function checkScene(scene: PassScene): void {
  const W = scene.frame?.widthPx;
  const H = scene.frame?.heightPx;
  checkHfov(scene.hfov);
  band('object size', scene.object?.size?.lo, scene.object?.size?.hi, 0.001, 1000, ' m');
  band('observer speed', scene.observerSpeed?.lo, scene.observerSpeed?.hi, 0, MAX_SPEED_MS, ' m/s');
  band('track angle to the road', (scene.trackAngle.lo * 180) / Math.PI, (scene.trackAngle.hi * 180) / Math.PI, -80, 80, ' deg');
  band('camera height', scene.cameraHeight.lo, scene.cameraHeight.hi, 0, 1000, ' m');
  band('elevation', (scene.elevation.lo * 180) / Math.PI, (scene.elevation.hi * 180) / Math.PI, -30, 85, ' deg');
  const min = scene.fixed ? 2 : 3;
  if (!Array.isArray(scene.marks) || scene.marks.length < min) {
    throw new InputError('timestamps', scene.marks?.length, `at least ${min} marked timestamps for a pass`);
  }
  scene.marks.forEach((m, i) => {
    inRange(`timestamp ${i + 1}`, m.t, 0, 86400, ' s');
    if (i > 0 && !(m.t > scene.marks[i - 1]!.t)) throw new InputError(`timestamp ${i + 1}`, m.t, `later than timestamp ${i}`);
    checkSpan(`object span at timestamp ${i + 1}`, m.span, W, H);
  });
  scene.landmarks.forEach((lm) => {
    checkSpan(`landmark ${lm.id} span`, lm.span, W, H);
    band(`landmark ${lm.id} size`, lm.size.lo, lm.size.hi, 0.001, 1000, ' m');
  });
}

const q = new Float64Array(PASS_PARAMS);
const phys = new Float64Array(PASS_PARAMS);
const rel = new Float64Array(3);
const ca = new Float64Array(3);
const report = new Float64Array(3);

/** The nominal fit for one sign from a few starts; the best is left in `best`. Returns chi^2. */
function nominalFit(d: PassData, sgn: number, eps: number, beta: number, mask: number, best: Float64Array): number {
  let bestChi2 = Number.POSITIVE_INFINITY;
  for (const scaleV of [1, 0.5, 2, 0.2, 5]) {
    startFromSpans(d, sgn, eps, beta, q);
    q[Q.lnV]! += Math.log(scaleV);
    q[Q.xr] = q[Q.xr]! * scaleV;
    const out = fitPass(d, q, sgn, mask, report);
    if (out !== FitOutcome.FAILED && report[FIT_REPORT.chi2]! < bestChi2) {
      bestChi2 = report[FIT_REPORT.chi2]!;
      best.set(q);
    }
  }
  return bestChi2;
}

/** `onDraw`, when given, hears how many bootstrap draws are done, of draws x directions (for a progress bar). */
export function solvePass(scene: PassScene, directions: readonly (-1 | 1)[], options: SolveOptions = {}, onDraw?: (done: number) => void): PassResult {
  const { draws, seed, tail } = checkOptions(options, 2_000);
  checkScene(scene);
  const n = scene.marks.length;
  const sig = spanSigmas(scene);
  const d = passData(n);
  d.tr = (scene.marks[0]!.t + scene.marks[n - 1]!.t) / 2;
  const v = drawValues(scene);
  const lines = spanLines(scene);
  fillDraw(scene, NOMINAL, sig, d, v, lines);
  const mask = 0b111 | (v.hasElevation ? 1 << Q.eps : 0) | (v.hasAzimuth ? 1 << Q.beta : 0);
  // thousands of frames: the fit runs on bins of consecutive frames (pass-bins.ts)
  const bins = passBins(n);
  const fit0 = bins ? binnedData(bins) : d;
  if (bins) aggregate(d, bins, fit0);
  const elevationSources = Array.from(v.elevationSource, (s) => SOURCES[s]!);

  const starts = directions.map((sgn) => {
    const best = new Float64Array(PASS_PARAMS);
    const chi2 = nominalFit(fit0, sgn, v.eps, v.beta, mask, best);
    return { sgn, best, chi2 };
  });
  const usable = starts.filter((s) => s.chi2 < Number.POSITIVE_INFINITY);
  if (usable.length === 0) throw new UndeterminedError('pass', 'no straight pass fits these marks');
  const bestChi2 = Math.min(...usable.map((s) => s.chi2));
  const residualCount = n + d.elev.filter((x) => x === x).length + d.azim.filter((x) => x === x).length;

  const hypotheses: PassHypothesis[] = [];
  const store = drawStore(bins, usable.length, draws, scene.landmarks.length);
  for (const [j, s] of usable.entries()) {
    const rng = new Rng(seed);
    const tick = onDraw ? (i: number) => onDraw(j * draws + i) : undefined;
    const h = bootstrap(scene, d, sig, lines, s.sgn, s.best, mask, rng, draws, tail, bins, store, tick);
    toPhysical(s.best, s.sgn, d.u, phys);
    const nominal = { params: Array.from(phys), u: d.u, tr: d.tr };
    hypotheses.push({ ...h, sign: s.sgn, nominalChi2: s.chi2, residuals: residualCount, ruledOut: s.chi2 - bestChi2 > 9, nominal });
  }
  const lead = hypotheses.find((h) => !h.ruledOut) ?? hypotheses[0]!;
  return { hypotheses, elevationSources, conditioning: conditioning(d, sig, lead, usable.find((s) => s.sgn === lead.sign)!.best), draws, seed };
}

type Figures = Omit<PassHypothesis, 'sign' | 'nominalChi2' | 'residuals' | 'ruledOut' | 'nominal'>;

function bootstrap(scene: PassScene, d0: PassData, sig: Float64Array, lines: Float64Array, sgn: number, start: Float64Array, mask: number, rng: Rng, draws: number, tail: number, bins: PassBins | null, store: DrawStore | null, tick?: (done: number) => void): Figures {
  const n = d0.n;
  const d = passData(n);
  d.tr = d0.tr;
  const fd = bins ? binnedData(bins) : d;
  const v = drawValues(scene);
  const pick = randomPicker(rng);
  const col = () => new Float64Array(draws).fill(Number.NaN);
  const V = col();
  const rhoS = col();
  const rhoH = col();
  const t0 = col();
  const w = col();
  const along = col();
  const head = col();
  const cls = new Int8Array(draws).fill(-1);
  const ref = Math.floor((n - 1) / 2);
  const frac = col();
  const fDist = col();
  const fRoad = col();
  const wFirst = col();
  const wLast = col();
  // each kept draw's fitted pass and observer speed: every mark's figures follow from them after
  // the loop, one mark at a time, so memory grows with the draws and not with marks x draws
  const fitted = new Float64Array(PASS_PARAMS * draws);
  const fittedU = col();
  const nl = scene.landmarks.length;
  const landmarkMark = scene.landmarks.map((lm) => scene.marks.findIndex((m) => Math.abs(m.t - lm.t) < 1 / 48));
  const lmRange = new Float64Array(nl * draws).fill(Number.NaN);
  const lmRatio = new Float64Array(nl * draws).fill(Number.NaN);
  const lmSpeed = new Float64Array(nl * draws).fill(Number.NaN);
  let kept = 0;
  const nominalScale = d0.L * focalOf(scene);
  // what a draw read back from the store does not fill
  d.axis = scene.object.axis;
  scene.marks.forEach((m, k) => (d.t[k] = m.t));
  for (let i = 0; i < draws; i++) {
    if (tick && i % 25 === 0) tick(i);
    let bad = false;
    if (store?.has(i)) bad = store.load(i, d, v, fd);
    else {
      fillDraw(scene, pick, sig, d, v, lines);
      for (let k = 0; k < n; k++) if (!(d.theta[k]! > 0)) bad = true;
      if (bins && !bad) aggregate(d, bins, fd);
      store?.keep(i, bad, d, v, fd);
    }
    for (let l = 0; l < nl; l++) lmRange[l * draws + i] = v.landmarkRange[l]!;
    if (bad) continue;
    q.set(start);
    if (!(mask & (1 << Q.eps))) q[Q.eps] = v.eps;
    if (!(mask & (1 << Q.beta))) q[Q.beta] = v.beta;
    // the size and focal length scale every range together: start the draw where they put it
    const scale = (d.L * v.focalPx) / nominalScale;
    q[Q.lnRho]! += Math.log(scale);
    q[Q.lnV]! += Math.log(scale);
    q[Q.xr] = q[Q.xr]! * scale;
    if (fitPass(fd, q, sgn, mask, report, FIT_TOLERANCE.BOOTSTRAP) === FitOutcome.FAILED) continue;
    kept++;
    toPhysical(q, sgn, d.u, phys);
    const u = d.u;
    const wi = phys[P.w]!;
    const cb = Math.cos(phys[P.beta]!);
    const sb = Math.sin(phys[P.beta]!);
    w[i] = Math.abs(wi);
    along[i] = wi * cb;
    head[i] = Math.atan2(wi * sb, wi * cb);
    V[i] = Math.hypot(wi * cb - u, wi * sb);
    closestApproach(phys, u, d.tr, ca);
    t0[i] = ca[0]!;
    rhoS[i] = ca[1]!;
    rhoH[i] = ca[2]!;
    cls[i] = wi * cb < 0 ? 0 : wi * cb < u ? 1 : 2;
    fitted.set(phys, PASS_PARAMS * i);
    fittedU[i] = u;
    for (const k of [0, ref, n - 1]) {
      relativePosition(phys, u, d.tr, d.t[k]!, rel);
      const rx = rel[0]!;
      const ry = rel[1]!;
      const rh = Math.hypot(rx, ry);
      const s = fixedPointFractionAt(phys, u, rx, ry);
      if (k === ref) {
        frac[i] = s;
        fDist[i] = s * rh;
        fRoad[i] = s * ry;
      }
      if (k === 0) wFirst[i] = s * rh;
      if (k === n - 1) wLast[i] = s * rh;
    }
    for (let l = 0; l < nl; l++) {
      const lm = scene.landmarks[l]!;
      if (landmarkMark[l]! < 0) continue;
      relativePosition(phys, u, d.tr, lm.t, rel);
      const s = fixedPointFractionAt(phys, u, rel[0]!, rel[1]!);
      const rh = Math.hypot(rel[0]!, rel[1]!);
      const dl = lmRange[l * draws + i]!;
      lmRatio[l * draws + i] = dl / (s * rh);
      // the landmark as the point: n . (u + s (w - u)) = 0 with s = d / R_h, solved for w along the track
      const sl = dl / rh;
      const nx = -rel[1]! / rh;
      const ny = rel[0]! / rh;
      lmSpeed[l * draws + i] = ((sl - 1) * u * nx) / (sl * (nx * cb + ny * sb));
    }
  }
  if (kept === 0) throw new UndeterminedError('pass', 'no draw could be fitted');
  const kin = kinematics(fitted, fittedU, draws);
  const est = (a: Float64Array, from = 0, count = draws) => summarizeOrNull(a.subarray(from, from + count), tail);
  const summarize = (a: Float64Array) => summarizeAll(a, a.length, tail);
  const readings: PassReading[] = [];
  for (const c of [0, 1, 2] as const) {
    const idx: number[] = [];
    for (let i = 0; i < draws; i++) if (cls[i] === c) idx.push(i);
    if (idx.length < Math.max(0.05 * kept, 20)) continue;
    const sub = (a: Float64Array) => Float64Array.from(idx, (i) => a[i]!);
    const fr = sub(frac);
    const shares = regimeShares(fr);
    const finite = fr.filter((x) => Number.isFinite(x)).length;
    readings.push({
      direction: (['opposite', 'same-slower', 'same-faster'] as const)[c],
      share: idx.length / kept,
      speed: summarize(sub(w)),
      alongRoad: summarize(sub(along)),
      heading: summarize(unwrapAround(sub(head))),
      fixedPoint:
        finite >= 0.5 * idx.length
          ? { t: scene.marks[ref]!.t, fraction: summarize(fr), horizontalDistance: summarize(sub(fDist)), fromRoad: summarize(sub(fRoad)) }
          : null,
      regimeShares: shares,
      wander: finite >= 0.5 * idx.length ? { first: summarize(sub(wFirst)), last: summarize(sub(wLast)) } : null,
    });
  }
  return {
    keptShare: kept / draws,
    relativeSpeed: summarize(V),
    closestSlant: summarize(rhoS),
    closestHorizontal: summarize(rhoH),
    tClosest: summarize(t0),
    marks: scene.marks.map((m) => markFigures(m.t, d0.tr, d0.axis, kin, draws, tail)),
    readings,
    landmarks: scene.landmarks.map((lm, l) => ({
      id: lm.id,
      t: lm.t,
      range: est(lmRange, l * draws)!,
      ratio: est(lmRatio, l * draws),
      ratioBelowOne: shareBelow(lmRatio.subarray(l * draws, (l + 1) * draws), 1),
      impliedSpeed: est(lmSpeed, l * draws),
    })),
  };
}

function focalOf(scene: PassScene): number {
  return scene.frame.widthPx / 2 / Math.tan(NOMINAL.band(scene.hfov) / 2);
}

/**
 * Is the fit settled? The span's change over the marks against its noise, and the relative speed's
 * spread. When ill, the times at which the fitted span would have changed by enough.
 */
function conditioning(d: PassData, sig: Float64Array, lead: PassHypothesis, best: Float64Array): Conditioning {
  toPhysical(best, lead.sign, d.u, phys);
  let lo = Number.POSITIVE_INFINITY;
  let hi = 0;
  let noise = 0;
  for (let k = 0; k < d.n; k++) {
    lo = Math.min(lo, d.theta[k]!);
    hi = Math.max(hi, d.theta[k]!);
    noise += sig[k]! / d.theta[k]!;
  }
  noise /= d.n;
  const change = (hi - lo) / hi;
  const rs = lead.relativeSpeed;
  const spread = (rs.p95 - rs.p05) / Math.max(rs.median, 1e-9);
  const ill = change < ILL_SPAN_CHANGE_Z * noise || spread > ILL_RELATIVE_SPREAD;
  let before: number | null = null;
  let after: number | null = null;
  if (ill) {
    // for a span going as rho / R^2 the share lost at tau from closest approach is V^2 tau^2 / (rho^2 + V^2 tau^2)
    closestApproach(phys, d.u, d.tr, ca);
    const V = Math.hypot(phys[P.w]! * Math.cos(phys[P.beta]!) - d.u, phys[P.w]! * Math.sin(phys[P.beta]!));
    const share = Math.min(0.5, Math.max(0.1, 2 * ILL_SPAN_CHANGE_Z * noise));
    const tau = V > 0 ? (ca[1]! / V) * Math.sqrt(share / (1 - share)) : Number.POSITIVE_INFINITY;
    if (Number.isFinite(tau)) {
      before = ca[0]! - tau;
      after = ca[0]! + tau;
    }
  }
  return { spanChange: change, spanNoise: noise, relativeSpread: spread, ill, settleBefore: before, settleAfter: after };
}

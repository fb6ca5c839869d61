import { useState } from 'preact/hooks';
import { VERDICT_SENTENCES, formatEstimate, formatQuantity, type CaseAnalysis, type CaseWarning, type SpeedReading, type PageFigures, type PassReading, type Estimate, type Quantity, type UnitSystem } from '../../src/case';
import { message } from '../shared/browser';
import { PlanViewSvg } from './plan-view';
import { RangePlotView } from './range-plot';

/*
 * The case's figures in the case view: what weakens them first, then each frame (from the pass where
 * there is one, each distance named slant or horizontal), the pass and its readings with their
 * motionless points, the ground track, and the verdicts.
 */

/** mm:ss.sss and seconds, as the summary will show a timestamp. */
function stamp(t: number): string {
  const m = Math.floor(t / 60);
  return `${m}:${(t - 60 * m).toFixed(3).padStart(6, '0')} (${t.toFixed(3)} s)`;
}

const READING_LABELS: Readonly<Record<SpeedReading['basis'], string>> = {
  landmark: message('caseReadingLandmark'),
  track: message('caseReadingTrack'),
  'fit-opposite': message('caseReadingOpposite'),
  'fit-same-slower': message('caseReadingSameSlower'),
  'fit-same-faster': message('caseReadingSameFaster'),
};

/** A fraction as a percentage with its interval. */
function pctEstimate(e: Estimate): string {
  const p = (x: number) => (100 * x).toFixed(0);
  return message('casePercentEstimate', [p(e.median), p(e.p05), p(e.p95)]);
}

const WARNING_KEYS: Readonly<Record<CaseWarning['code'], string>> = {
  landmark: 'caseWarnLandmark',
  'ill-conditioned': 'caseWarnIll',
  'elevation-assumed': 'caseWarnElevation',
  'portrait-field': 'caseWarnPortrait',
  'direction-unsupported': 'caseWarnDirection',
  'mixed-dimensions': 'caseWarnMixed',
  'large-case': 'caseWarnLarge',
};

const REGIME_KEYS = { between: 'caseRegimeBetween', beyond: 'caseRegimeBeyond', behind: 'caseRegimeBehind', none: 'caseRegimeNone' } as const;

/** The regime most of a reading's draws put its motionless point in. */
function leadingRegime(s: PassReading['regimeShares']): keyof typeof REGIME_KEYS {
  return (Object.keys(s) as (keyof typeof REGIME_KEYS)[]).reduce((a, b) => (s[b] > s[a] ? b : a));
}

/** A point that moves by more than a twentieth of its distance over the marks: a track off parallel. */
function wanders(p: PassReading): boolean {
  if (!p.wander) return false;
  const a = p.wander.first.median;
  const b = p.wander.last.median;
  return Math.abs(a - b) > 0.05 * Math.max(Math.abs(a), Math.abs(b));
}

/** What weakens the figures, named, before the figures: a warning read after a number comes too late. */
function Warnings({ r }: { r: CaseAnalysis }) {
  if (r.warnings.length === 0) return null;
  return (
    <div class="result warnings" role="status" data-testid="warnings">
      <div class="stamp">{message('caseWarningsHeading')}</div>
      <ul>
        {r.warnings.map((w) => (
          <li data-testid={`warning-${w.code}`}>
            <strong>{message(WARNING_KEYS[w.code])}:</strong> {w.text}
          </li>
        ))}
      </ul>
    </div>
  );
}

/*
 * A case at the mark limit has thousands of frames: drawing a row for each at once held the popup's
 * main thread for 2.6 s (test/e2e/popup-large.test.ts, 4 444 frames). The first rows are drawn,
 * the rest a batch at a time when asked; the range plot shows them all.
 */
const FIRST_ROWS = 60;
const MORE_ROWS = 200;

export function Results({ f, system }: { f: PageFigures; system: UnitSystem }) {
  const { r, rangePlot: plot } = f;
  const est = (e: Estimate, kind: Quantity) => formatEstimate(e, kind, system);
  const [rows, setRows] = useState(FIRST_ROWS);
  const left = r.timestamps.length - rows;
  return (
    <section aria-label={message('caseResultsLabel')} data-testid="results">
      <h2>{message('caseFiguresHeading')}</h2>
      <Warnings r={r} />
      {r.timestamps.length === 0 && <p class="muted">{message('caseMarkToSee')}</p>}
      {r.timestamps.slice(0, rows).map((ts) => (
        <div class="result" data-testid="timestamp">
          <div class="stamp">{stamp(ts.t)}</div>
          <div>{message('caseSpan', [ts.spanPx.toFixed(1), est(ts.result.angularSize, 'angle')])}</div>
          {ts.fitted ? (
            <>
              <div class="big" data-testid="range">
                {message('caseRangePass', est(ts.fitted.range, 'distance'))}
              </div>
              <div data-testid="horizontal-range">{message('caseHorizontalPass', [est(ts.fitted.horizontalRange, 'distance'), est(ts.fitted.elevation, 'angle')])}</div>
              <div class="muted" data-testid="range-frame-alone">
                {message('caseRangeFrameAlone', est(ts.result.range, 'distance'))}
              </div>
            </>
          ) : (
            <div class="big" data-testid="range">
              {message('caseRangeFrameAlone', est(ts.result.range, 'distance'))}
            </div>
          )}
          {(ts.result.landmarkHorizontalRange ?? ts.result.landmarkRange) && (
            <div data-testid="landmark-range">{message('caseLandmarkFoot', est((ts.result.landmarkHorizontalRange ?? ts.result.landmarkRange)!, 'distance'))}</div>
          )}
          {ts.result.fixedPointFraction && ts.regime && (
            <div data-testid="fixed-point-text">
              {ts.result.regimeShares
                ? message('caseFixedPointDraws', [pctEstimate(ts.result.fixedPointFraction), ts.regime, (100 * ts.result.regimeShares[ts.regime]).toFixed(0)])
                : message('caseFixedPoint', [pctEstimate(ts.result.fixedPointFraction), ts.regime])}
              {ts.result.fixedPointDistance && message('caseFixedPointFrom', est(ts.result.fixedPointDistance, 'distance'))}
            </div>
          )}
          {ts.result.impliedSpeed && (
            <div data-testid="implied-speed">
              {message(
                ts.result.impliedSpeed.p95 < 0 ? 'caseImpliedSpeedOpposite' : ts.result.impliedSpeed.p05 > 0 ? 'caseImpliedSpeedSame' : 'caseImpliedSpeed',
                est(ts.result.impliedSpeed, 'speed'),
              )}
            </div>
          )}
        </div>
      ))}
      {left > 0 && (
        <button type="button" class="secondary" data-testid="more-frames" onClick={() => setRows(rows + MORE_ROWS)}>
          {message('caseMoreFrames', [String(Math.min(MORE_ROWS, left)), String(left)])}
        </button>
      )}
      {plot && <RangePlotView p={plot} system={system} />}
      <PlanViewSvg f={f} system={system} />
      {r.series ? (
        <div class="result" data-testid="series">
          <div class="stamp">{message('casePassHeading')}</div>
          <div data-testid="closest">{message('caseClosestBoth', [est(r.series.closestApproach, 'distance'), est(r.series.closestHorizontal, 'distance')])}</div>
          <div>{message('caseRelativeSpeed', est(r.series.relativeSpeed, 'speed'))}</div>
          {r.readings
            .filter((x) => x.pass)
            .map((x) => {
              const p = x.pass!;
              const regime = leadingRegime(p.regimeShares);
              const share = (100 * p.regimeShares[regime]).toFixed(0);
              const words = [READING_LABELS[x.basis], est(x.speed, 'speed'), message(REGIME_KEYS[regime]), share];
              return (
                <div data-testid="fit-reading" data-direction={p.direction} data-regime={regime}>
                  {p.fixedPoint && regime !== 'behind' && regime !== 'none'
                    ? message('caseReadingPointRoad', [...words, est(p.fixedPoint.fromRoad, 'distance')])
                    : message('caseReadingPoint', words)}
                  {wanders(p) && <div data-testid="wander">{message('caseWander', [est(p.wander!.first, 'distance'), est(p.wander!.last, 'distance')])}</div>}
                </div>
              );
            })}
          {r.window && (
            <div data-testid="window">
              {r.window.clipLength !== null
                ? message('caseWindowClip', [formatQuantity(r.window.halfAngle, 'angle', system), est(r.window.estimate, 'time'), formatQuantity(r.window.clipLength, 'time', system)])
                : message('caseWindow', [formatQuantity(r.window.halfAngle, 'angle', system), est(r.window.estimate, 'time')])}
            </div>
          )}
        </div>
      ) : (
        <p class="muted">{r.seriesMissing}</p>
      )}
      {r.track ? (
        <div class="result" data-testid="track">
          <div class="stamp">{message('caseTrackHeading')}</div>
          <div class="big">{message('caseGroundSpeed', est(r.track.speed, 'speed'))}</div>
          <div>{message('caseHeading', est(r.track.heading, 'angle'))}</div>
          <div>{message('caseTrackClosest', est(r.track.closestApproach, 'distance'))}</div>
        </div>
      ) : (
        <p class="muted" data-testid="track-missing">{r.trackMissing}</p>
      )}
      {r.setAside.length > 0 && (
        <p class="error" data-testid="set-aside">
          {message('caseSetAside')}
        </p>
      )}
      {r.verdicts.length > 0 ? (
        r.verdicts.map((j) => (
          <div class="result verdict" data-testid="verdict">
            <div class="big">{VERDICT_SENTENCES[j.verdict.level]}</div>
            <div>
              {r.assumptions.headwind
                ? message('caseJudgedWind', [READING_LABELS[j.reading.basis].toLowerCase(), est(j.reading.speed, 'speed'), est(j.airspeed, 'speed')])
                : message('caseJudged', [READING_LABELS[j.reading.basis].toLowerCase(), est(j.reading.speed, 'speed')])}
            </div>
            <div class="muted">
              {j.verdict.rule.text} ({j.verdict.rule.source})
            </div>
            {j.verdict.hover && (
              <div>
                {message('caseHover', [
                  formatQuantity(j.verdict.hover.headwindNeededMs, 'speed', system),
                  String(j.verdict.hover.beaufort.force),
                  j.verdict.hover.beaufort.description,
                ])}
              </div>
            )}
          </div>
        ))
      ) : (
        <p class="muted">{r.verdictMissing}</p>
      )}
      {r.problems.map((p) => (
        <p class="error">{p}</p>
      ))}
    </section>
  );
}


import { useMemo, useState } from 'preact/hooks';
import { analyseCase, type CaseAnalysis, type SpeedReading } from '../../src/case/analysis';
import { defaultAssumptions } from '../../src/case/assumptions';
import { parseBand } from '../../src/case/bands';
import type { CaseAssumptions, CaseRecord } from '../../src/case/schema';
import { LANE_CYCLES } from '../../src/engine/lanes';
import { VERDICT_SENTENCES } from '../../src/engine/plausibility';
import type { Estimate } from '../../src/engine/stats';
import { formatEstimate, formatQuantity, type Quantity, type UnitSystem } from '../../src/engine/units';
import { rangePlot } from '../../src/case/plots';
import { summaryText, type SummaryFormat } from '../../src/case/summary';
import { toCaseFile } from '../../src/case/casefile';
import { extensionVersion, message, send } from '../shared/browser';
import { RangePlotView } from './range-plot';
import { CameraPicker, DirectionPicker, MountPicker, SizePicker } from './pickers';
import { PlanViewSvg } from './plan-view';
import { commitsOnLeave, describedBy, FormField, valueOf } from '../shared/form-field';

const DEG = Math.PI / 180;

/** mm:ss.sss and seconds, as the summary will show a timestamp. */
function stamp(t: number): string {
  const m = Math.floor(t / 60);
  return `${m}:${(t - 60 * m).toFixed(3).padStart(6, '0')} (${t.toFixed(3)} s)`;
}

type StoredRange = { lo: number; hi: number };

interface FieldDef {
  /** Names the input (`field-<key>`): the stored field, or the nested one for the camera's aim. */
  key: string;
  label: string;
  kind: Quantity;
  unit: string;
  optional?: boolean;
  hint: string;
  /** Allowed range in stored units (degrees, metres, m/s), as the case validation has it. */
  min: number;
  max: number;
  get: (a: CaseAssumptions) => StoredRange | undefined;
  set: (a: CaseAssumptions, r: StoredRange | undefined) => CaseAssumptions;
  /** Shown in km/h when stored in m/s. */
  speed?: boolean;
}

const direct = (key: 'hfovDeg' | 'objectSizeM' | 'aspectDeg' | 'landmarkSizeM' | 'observerSpeedMs' | 'headwindMs') => ({
  key,
  get: (a: CaseAssumptions) => a[key],
  set: (a: CaseAssumptions, r: StoredRange | undefined) => {
    const next = { ...a };
    if (r) next[key] = r;
    else delete next[key];
    return next;
  },
});

const FIELDS: FieldDef[] = [
  { ...direct('hfovDeg'), label: message('caseFovLabel'), kind: 'angle', unit: 'deg', hint: message('caseFovHint'), min: 0.01, max: 179.9 },
  { ...direct('objectSizeM'), label: message('caseSizeLabel'), kind: 'length', unit: 'm', hint: message('caseSizeHint'), min: 0.001, max: 1000 },
  { ...direct('aspectDeg'), label: message('caseAspectLabel'), kind: 'angle', unit: 'deg', hint: message('caseAspectHint'), min: 0.01, max: 179.99 },
  { ...direct('landmarkSizeM'), label: message('caseLandmarkSizeLabel'), kind: 'length', unit: 'm', hint: message('caseLandmarkSizeHint'), min: 0.001, max: 1000 },
  { ...direct('observerSpeedMs'), label: message('caseObserverSpeedLabel'), kind: 'speed', unit: 'km/h', optional: true, speed: true, hint: message('caseObserverSpeedHint'), min: 0, max: 1000 },
  { ...direct('headwindMs'), label: message('caseWindLabel'), kind: 'speed', unit: 'km/h', optional: true, speed: true, hint: message('caseWindHint'), min: -60, max: 60 },
];

/** The camera's aim, shown once the camera is said to be fixed. */
const AIM_FIELD: FieldDef = {
  key: 'axisHeadingDeg',
  label: message('caseAimLabel'),
  kind: 'angle',
  unit: 'deg',
  hint: message('caseAimHint'),
  min: -180,
  max: 180,
  get: (a) => a.fixedCamera?.axisHeadingDeg,
  set: (a, r) => (a.fixedCamera && r ? { ...a, fixedCamera: { ...a.fixedCamera, axisHeadingDeg: r } } : a),
};

function shown(a: CaseAssumptions, f: FieldDef): string {
  const r = f.get(a);
  if (!r) return '';
  // degrees and metres are stored as such; speed is stored in m/s and shown in km/h
  const k = f.speed ? 3.6 : 1;
  const lo = +(r.lo * k).toPrecision(4);
  const hi = +(r.hi * k).toPrecision(4);
  return lo === hi ? `${lo} ${f.unit}` : `${lo} to ${hi} ${f.unit}`;
}

/** The allowed range in the unit the field is typed in. */
function allowedText(f: FieldDef): string {
  const k = f.speed ? 3.6 : 1;
  return message('caseAllowedRange', [String(+(f.min * k).toPrecision(4)), String(+(f.max * k).toPrecision(4)), f.unit]);
}

/** One assumption: typed with units; a wrong entry is marked here and the last valid one stays. */
function Field({ f, a, onSave }: { f: FieldDef; a: CaseAssumptions; onSave: (next: CaseAssumptions) => void }) {
  const [text, setText] = useState(shown(a, f));
  const [error, setError] = useState<string | null>(null);
  const id = `field-${f.key}`;
  const commit = () => {
    if (f.optional && text.trim() === '') {
      setError(null);
      if (f.get(a)) onSave(f.set(a, undefined));
      return;
    }
    try {
      const b = parseBand(text, f.kind, f.label, f.unit);
      // stored in degrees, metres and m/s
      const toStored = f.kind === 'angle' ? 1 / DEG : 1;
      const lo = b.lo * toStored;
      const hi = b.hi * toStored;
      if (!(lo >= f.min - 1e-9 && hi <= f.max + 1e-9)) throw new Error(message('caseOutsideAllowed', [f.label, text.trim(), allowedText(f)]));
      const cur = f.get(a);
      setError(null);
      // leaving a field without changing it writes nothing
      if (cur && Math.abs(cur.lo - lo) < 1e-9 * Math.max(1, Math.abs(lo)) && Math.abs(cur.hi - hi) < 1e-9 * Math.max(1, Math.abs(hi))) return;
      const next = f.set(a, { lo, hi });
      const labelled = { ...next, ...(f.key === 'hfovDeg' ? { cameraLabel: 'Field of view given' } : {}), ...(f.key === 'objectSizeM' ? { sizeLabel: `size given, ${text.trim()}` } : {}) };
      // a size typed in does not say which dimension it is
      if (f.key === 'objectSizeM') delete labelled.sizeDimension;
      onSave(labelled);
    } catch (e) {
      setError((e as Error).message);
    }
  };
  return (
    <FormField id={id} label={f.label} error={error}>
      <input
        id={id}
        data-testid={id}
        value={text}
        placeholder={f.hint}
        {...describedBy(id, error)}
        onInput={(e) => setText(valueOf(e))}
        {...commitsOnLeave(commit)}
      />
    </FormField>
  );
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

function Results({ r, system }: { r: CaseAnalysis; system: UnitSystem }) {
  const est = (e: Estimate, kind: Quantity) => formatEstimate(e, kind, system);
  const plot = useMemo(() => rangePlot(r), [r]);
  return (
    <section aria-label={message('caseResultsLabel')} data-testid="results">
      <h2>{message('caseFiguresHeading')}</h2>
      {r.timestamps.length === 0 && <p class="muted">{message('caseMarkToSee')}</p>}
      {r.timestamps.map((ts) => (
        <div class="result" data-testid="timestamp">
          <div class="stamp">{stamp(ts.t)}</div>
          <div>{message('caseSpan', [ts.spanPx.toFixed(1), est(ts.result.angularSize, 'angle')])}</div>
          <div class="big" data-testid="range">
            {message('caseRange', est(ts.result.range, 'distance'))}
          </div>
          {ts.result.landmarkRange && <div>{message('caseLandmarkRange', est(ts.result.landmarkRange, 'distance'))}</div>}
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
      {plot && <RangePlotView p={plot} system={system} />}
      <PlanViewSvg r={r} system={system} />
      {r.series ? (
        <div class="result" data-testid="series">
          <div class="stamp">{message('caseRangeOverTime')}</div>
          <div>{message('caseClosestApproach', est(r.series.closestApproach, 'distance'))}</div>
          <div>{message('caseRelativeSpeed', est(r.series.relativeSpeed, 'speed'))}</div>
          {r.readings
            .filter((x) => x.basis.startsWith('fit-'))
            .map((x) => (
              <div data-testid="fit-reading">
                {READING_LABELS[x.basis]} {est(x.speed, 'speed')}
              </div>
            ))}
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

/** The dimension the object's spans were marked as (the latest span's), for the size classes offered. */
function dimensionMarked(c: CaseRecord): 'wingspan' | 'length' {
  const spans = c.marks.filter((m) => m.kind === 'object-span');
  return spans[spans.length - 1]?.dimension === 'length' ? 'length' : 'wingspan';
}

/** The case file a colleague recomputes with `npm run solve -- FILE`; named by case and date. */
function exportCase(c: CaseRecord): void {
  const json = JSON.stringify(toCaseFile(c, extensionVersion()), null, 2);
  const day = new Date(c.updatedAt).toISOString().slice(0, 10);
  const title = (c.video.pageTitle || 'case').replace(/[^\w-]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 40) || 'case';
  const a = document.createElement('a');
  a.href = URL.createObjectURL(new Blob([json], { type: 'application/json' }));
  a.download = `clip-caliper-${title}-${day}-${c.id.slice(0, 8)}.json`;
  a.click();
  URL.revokeObjectURL(a.href);
}

/** Copy the summary anyone can recompute: plain text or Markdown, with a preview of what is copied. */
function Share({ c, r, system }: { c: CaseRecord; r: CaseAnalysis; system: UnitSystem }) {
  const [status, setStatus] = useState('');
  const text = (format: SummaryFormat) => summaryText(c, r, { format, system, toolVersion: extensionVersion() });
  const copy = (format: SummaryFormat) =>
    navigator.clipboard.writeText(text(format)).then(
      () => setStatus(message(format === 'markdown' ? 'caseCopiedMarkdown' : 'caseCopiedText')),
      (e: Error) => setStatus(message('caseCopyFailed', e.message)),
    );
  return (
    <section aria-label={message('caseShareLabel')} class="share">
      <button type="button" class="secondary" data-testid="copy-text" onClick={() => copy('text')}>
        {message('caseCopySummary')}
      </button>{' '}
      <button type="button" class="secondary" data-testid="copy-markdown" onClick={() => copy('markdown')}>
        {message('caseCopyMarkdown')}
      </button>
      <button type="button" class="secondary" data-testid="export" onClick={() => exportCase(c)}>
        {message('caseExport')}
      </button>
      <span class="muted" role="status" data-testid="copy-status">
        {' '}
        {status}
      </span>
      <details>
        <summary>{message('casePreview')}</summary>
        <pre data-testid="summary-preview">{text('text')}</pre>
      </details>
    </section>
  );
}

export function CaseView({ c, system }: { c: CaseRecord; system: UnitSystem }) {
  const a = c.assumptions ?? defaultAssumptions();
  const r = useMemo(() => analyseCase(c), [c]);
  const [saveError, setSaveError] = useState<string | null>(null);
  const save = (next: CaseAssumptions) => {
    send('case/assume', { caseId: c.id, assumptions: next }).then(
      () => setSaveError(null),
      (e: Error) => setSaveError(message('caseNotSaved', e.message)),
    );
  };
  return (
    <article data-testid="case">
      <h2 class="title">{c.video.pageTitle || c.video.pageUrl}</h2>
      <p class="muted">
        {message(c.marks.length === 1 ? (r.assumptions.defaults ? 'caseOneMarkVideoDefaults' : 'caseOneMarkVideo') : r.assumptions.defaults ? 'caseMarksVideoDefaults' : 'caseMarksVideo', [String(c.marks.length), String(c.video.width), String(c.video.height)])}
      </p>
      <p class="muted" data-testid="labels">
        {message('caseLabels', [r.assumptions.cameraLabel, r.assumptions.sizeLabel])}
      </p>
      <section aria-label={message('caseAssumptionsLabel')} class="assumptions">
        <CameraPicker a={a} onSave={save} />
        <SizePicker a={a} onSave={save} dimension={dimensionMarked(c)} />
        {r.dimensionMismatch && (
          <p class="error" role="status" data-testid="dimension-mismatch">
            {r.dimensionMismatch}
          </p>
        )}
        {FIELDS.map((f) => (
          <Field key={`${c.id}-${f.key}-${JSON.stringify(f.get(a) ?? null)}`} f={f} a={a} onSave={save} />
        ))}
        <DirectionPicker a={a} onSave={save} />
        <MountPicker a={a} onSave={save} />
        {a.fixedCamera && <Field key={`${c.id}-aim-${JSON.stringify(AIM_FIELD.get(a) ?? null)}`} f={AIM_FIELD} a={a} onSave={save} />}
        <FormField id="field-lanes" label={message('caseLanesLabel')}>
          <select
            id="field-lanes"
            data-testid="field-lanes"
            value={a.laneCycleId ?? ''}
            onChange={(e) => {
              const id = valueOf(e);
              const next = { ...a };
              if (id) next.laneCycleId = id;
              else delete next.laneCycleId;
              save(next);
            }}
          >
            <option value="">{message('caseLanesNone')}</option>
            {LANE_CYCLES.map((l) => (
              <option value={l.id} title={l.source}>
                {l.label} ({l.cycleM.toFixed(2)} m)
              </option>
            ))}
          </select>
          {r.laneSpeed && (
            <div data-testid="lane-speed">
              {message('caseLaneSpeed', [
                String(r.laneSpeed.passes),
                formatQuantity(r.laneSpeed.speed.median, 'speed', system),
                formatQuantity(r.laneSpeed.speed.lo, 'speed', system),
                formatQuantity(r.laneSpeed.speed.hi, 'speed', system),
                r.laneSpeed.source,
              ])}
            </div>
          )}
          {r.laneSpeedMissing && <div class="muted">{r.laneSpeedMissing}</div>}
        </FormField>
        {saveError && <p class="error">{saveError}</p>}
      </section>
      <Results r={r} system={system} />
      <Share c={c} r={r} system={system} />
    </article>
  );
}

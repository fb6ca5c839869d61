import { useMemo, useState } from 'preact/hooks';
import { analyseCase, type CaseAnalysis } from '../../src/case/analysis';
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
import { extensionVersion, send } from '../shared/browser';
import { RangePlotView } from './range-plot';
import { PlanViewSvg } from './plan-view';

const DEG = Math.PI / 180;

/** mm:ss.sss and seconds, as the summary will show a timestamp. */
function stamp(t: number): string {
  const m = Math.floor(t / 60);
  return `${m}:${(t - 60 * m).toFixed(3).padStart(6, '0')} (${t.toFixed(3)} s)`;
}

interface FieldDef {
  key: 'hfovDeg' | 'objectSizeM' | 'aspectDeg' | 'landmarkSizeM' | 'observerSpeedMs';
  label: string;
  kind: Quantity;
  unit: string;
  optional?: boolean;
  hint: string;
}

const FIELDS: FieldDef[] = [
  { key: 'hfovDeg', label: 'Camera field of view (horizontal)', kind: 'angle', unit: 'deg', hint: 'e.g. 39 to 41 deg' },
  { key: 'objectSizeM', label: 'Object size (the dimension marked)', kind: 'length', unit: 'm', hint: 'e.g. 24-36 m (code letter C wingspan)' },
  { key: 'aspectDeg', label: 'Aspect angle (90 = broadside)', kind: 'angle', unit: 'deg', hint: 'e.g. 75 to 90' },
  { key: 'landmarkSizeM', label: 'Landmark size', kind: 'length', unit: 'm', hint: 'e.g. 10-20 m' },
  { key: 'observerSpeedMs', label: 'Observer speed', kind: 'speed', unit: 'km/h', optional: true, hint: 'e.g. 90 km/h ± 10, or leave empty' },
];

function shown(a: CaseAssumptions, f: FieldDef): string {
  const r = a[f.key];
  if (!r) return '';
  // degrees and metres are stored as such; speed is stored in m/s and shown in km/h
  const k = f.key === 'observerSpeedMs' ? 3.6 : 1;
  const lo = +(r.lo * k).toPrecision(4);
  const hi = +(r.hi * k).toPrecision(4);
  return lo === hi ? `${lo} ${f.unit}` : `${lo} to ${hi} ${f.unit}`;
}

/** One assumption: typed with units; a wrong entry is marked here and the last valid one stays. */
function Field({ f, a, onSave }: { f: FieldDef; a: CaseAssumptions; onSave: (next: CaseAssumptions) => void }) {
  const [text, setText] = useState(shown(a, f));
  const [error, setError] = useState<string | null>(null);
  const id = `field-${f.key}`;
  const commit = () => {
    if (f.optional && text.trim() === '') {
      setError(null);
      const next = { ...a };
      delete next[f.key as 'observerSpeedMs'];
      onSave(next);
      return;
    }
    try {
      const b = parseBand(text, f.kind, f.label, f.unit);
      // stored in degrees, metres and m/s
      const toStored = f.kind === 'angle' ? 1 / DEG : 1;
      const lo = b.lo * toStored;
      const hi = b.hi * toStored;
      const cur = a[f.key];
      setError(null);
      // leaving a field without changing it writes nothing
      if (cur && Math.abs(cur.lo - lo) < 1e-9 * Math.max(1, Math.abs(lo)) && Math.abs(cur.hi - hi) < 1e-9 * Math.max(1, Math.abs(hi))) return;
      onSave({ ...a, [f.key]: { lo, hi }, ...(f.key === 'hfovDeg' ? { cameraLabel: 'Field of view given' } : {}), ...(f.key === 'objectSizeM' ? { sizeLabel: `size given, ${text.trim()}` } : {}) });
    } catch (e) {
      setError((e as Error).message);
    }
  };
  return (
    <div class="field">
      <label for={id}>{f.label}</label>
      <input
        id={id}
        data-testid={id}
        value={text}
        placeholder={f.hint}
        aria-invalid={error ? 'true' : 'false'}
        aria-describedby={error ? `${id}-error` : undefined}
        onInput={(e) => setText((e.target as HTMLInputElement).value)}
        onBlur={commit}
        onKeyDown={(e) => e.key === 'Enter' && commit()}
      />
      {error && (
        <div class="error" id={`${id}-error`} role="alert">
          {error}
        </div>
      )}
    </div>
  );
}

function Results({ r, system }: { r: CaseAnalysis; system: UnitSystem }) {
  const est = (e: Estimate, kind: Quantity) => formatEstimate(e, kind, system);
  const plot = useMemo(() => rangePlot(r), [r]);
  return (
    <section aria-label="Results" data-testid="results">
      <h2>Figures, each with its 5–95 % interval</h2>
      {r.timestamps.length === 0 && <p class="muted">Mark the object’s ends in the overlay to see its range.</p>}
      {r.timestamps.map((ts) => (
        <div class="result" data-testid="timestamp">
          <div class="stamp">{stamp(ts.t)}</div>
          <div>
            Span {ts.spanPx.toFixed(1)} px · angular size {formatQuantity(ts.result.angularSize.median, 'angle', system, 3)}
          </div>
          <div class="big" data-testid="range">Range {est(ts.result.range, 'distance')}</div>
          {ts.result.landmarkRange && <div>Landmark range {est(ts.result.landmarkRange, 'distance')}</div>}
          {ts.result.fixedPointFraction && ts.regime && (
            <div>
              Motionless point at {(100 * ts.result.fixedPointFraction.median).toFixed(0)} % of the way to the object ({ts.regime})
            </div>
          )}
          {ts.result.impliedSpeed && (
            <div data-testid="implied-speed">
              Implied object speed {est(ts.result.impliedSpeed, 'speed')}
              {ts.result.impliedSpeed.p95 < 0 ? ' (opposite direction)' : ts.result.impliedSpeed.p05 > 0 ? ' (same direction)' : ''}
            </div>
          )}
        </div>
      ))}
      {plot && <RangePlotView p={plot} system={system} />}
      <PlanViewSvg r={r} system={system} />
      {r.series ? (
        <div class="result" data-testid="series">
          <div class="stamp">Range over time</div>
          <div>Closest approach {est(r.series.closestApproach, 'distance')}</div>
          <div>Relative speed {est(r.series.relativeSpeed, 'speed')}</div>
          {r.series.objectSpeed?.opposite && <div>Object speed, opposite direction {est(r.series.objectSpeed.opposite, 'speed')}</div>}
          {r.series.objectSpeed?.sameSlower && <div>Object speed, same direction and slower {est(r.series.objectSpeed.sameSlower, 'speed')}</div>}
          {r.series.objectSpeed?.sameFaster && <div>Object speed, same direction and faster {est(r.series.objectSpeed.sameFaster, 'speed')}</div>}
          {r.window && (
            <div data-testid="window">
              Within ±{formatQuantity(r.window.halfAngle, 'angle', system)} of abeam (half the field of view) for {est(r.window.estimate, 'time')}
              {r.window.clipLength !== null ? `; the clip is ${formatQuantity(r.window.clipLength, 'time', system)} long` : ''}
            </div>
          )}
        </div>
      ) : (
        <p class="muted">{r.seriesMissing}</p>
      )}
      {r.verdict ? (
        <div class="result verdict" data-testid="verdict">
          <div class="big">{VERDICT_SENTENCES[r.verdict.level]}</div>
          <div class="muted">
            {r.verdict.rule.text} ({r.verdict.rule.source})
          </div>
          {r.verdict.hover && (
            <div>
              Hovering would need a headwind of {formatQuantity(r.verdict.hover.headwindNeededMs, 'speed', system)}: Beaufort force {r.verdict.hover.beaufort.force} (
              {r.verdict.hover.beaufort.description}).
            </div>
          )}
        </div>
      ) : (
        <p class="muted">{r.verdictMissing}</p>
      )}
      {r.problems.map((p) => (
        <p class="error">{p}</p>
      ))}
    </section>
  );
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
      () => setStatus(format === 'markdown' ? 'Summary copied as Markdown.' : 'Summary copied as plain text.'),
      (e: Error) => setStatus(`Could not copy: ${e.message}`),
    );
  return (
    <section aria-label="Share" class="share">
      <button type="button" class="secondary" data-testid="copy-text" onClick={() => copy('text')}>
        Copy summary
      </button>{' '}
      <button type="button" class="secondary" data-testid="copy-markdown" onClick={() => copy('markdown')}>
        Copy as Markdown
      </button>
      <button type="button" class="secondary" data-testid="export" onClick={() => exportCase(c)}>
        Export case file
      </button>
      <span class="muted" role="status" data-testid="copy-status">
        {' '}
        {status}
      </span>
      <details>
        <summary>Preview the summary</summary>
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
      (e: Error) => setSaveError(`Not saved: ${e.message}`),
    );
  };
  return (
    <article data-testid="case">
      <h2 class="title">{c.video.pageTitle || c.video.pageUrl}</h2>
      <p class="muted">
        {c.marks.length} marks · video {c.video.width}×{c.video.height}
        {r.assumptions.defaults ? ' · default assumptions' : ''}
      </p>
      <p class="muted" data-testid="labels">
        Camera: {r.assumptions.cameraLabel} · Object: {r.assumptions.sizeLabel}
      </p>
      <section aria-label="Assumptions" class="assumptions">
        {FIELDS.map((f) => (
          <Field key={`${c.id}-${f.key}-${JSON.stringify(a[f.key] ?? null)}`} f={f} a={a} onSave={save} />
        ))}
        <div class="field">
          <label for="field-lanes">Lane-line cycle on the road (to measure the observer speed from dash passes)</label>
          <select
            id="field-lanes"
            data-testid="field-lanes"
            value={a.laneCycleId ?? ''}
            onChange={(e) => {
              const id = (e.target as HTMLSelectElement).value;
              const next = { ...a };
              if (id) next.laneCycleId = id;
              else delete next.laneCycleId;
              save(next);
            }}
          >
            <option value="">none: use the speed given above</option>
            {LANE_CYCLES.map((l) => (
              <option value={l.id} title={l.source}>
                {l.label} ({l.cycleM.toFixed(2)} m)
              </option>
            ))}
          </select>
          {r.laneSpeed && (
            <div data-testid="lane-speed">
              Observer speed measured from {r.laneSpeed.passes} dash passes: {formatQuantity(r.laneSpeed.speed.median, 'speed', system)} (
              {formatQuantity(r.laneSpeed.speed.lo, 'speed', system)} to {formatQuantity(r.laneSpeed.speed.hi, 'speed', system)}); cycle from {r.laneSpeed.source}
            </div>
          )}
          {r.laneSpeedMissing && <div class="muted">{r.laneSpeedMissing}</div>}
        </div>
        {saveError && <p class="error">{saveError}</p>}
      </section>
      <Results r={r} system={system} />
      <Share c={c} r={r} system={system} />
    </article>
  );
}

import { useMemo, useState } from 'preact/hooks';
import { engineAssumptions, defaultAssumptions, parseBand, LANE_CYCLES, formatQuantity, summaryText, toCaseFile, caseFileStem, type CaseAnalysis, type CaseAssumptions, type CaseRecord, type Quantity, type UnitSystem, type SummaryFormat } from '../../src/case';
import { useAnalysis, type AnalysisState } from './use-analysis';
import { Results } from './results';
import { extensionVersion, message, send } from '../shared/browser';
import { CameraPicker, DirectionPicker, MountPicker, SizePicker } from './pickers';
import { saveText } from './download';
import { commitsOnLeave, describedBy, FormField, valueOf } from '../shared/form-field';

const DEG = Math.PI / 180;

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
  /** What holds while the field is at its default: said under it, so nobody takes a default for a measurement. */
  byDefault?: string;
}

type DirectKey = 'hfovDeg' | 'objectSizeM' | 'aspectDeg' | 'landmarkSizeM' | 'observerSpeedMs' | 'headwindMs' | 'trackAngleDeg' | 'cameraHeightM' | 'elevationDeg' | 'landmarkAspectDeg';

const direct = (key: DirectKey) => ({
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
  { ...direct('trackAngleDeg'), label: message('caseTrackAngleLabel'), kind: 'angle', unit: 'deg', optional: true, hint: message('caseTrackAngleHint'), min: -80, max: 80, byDefault: message('caseTrackAngleDefault') },
  { ...direct('cameraHeightM'), label: message('caseCameraHeightLabel'), kind: 'length', unit: 'm', optional: true, hint: message('caseCameraHeightHint'), min: 0, max: 1000, byDefault: message('caseCameraHeightDefault') },
  { ...direct('elevationDeg'), label: message('caseElevationLabel'), kind: 'angle', unit: 'deg', optional: true, hint: message('caseElevationHint'), min: -30, max: 85, byDefault: message('caseElevationDefault') },
  { ...direct('landmarkAspectDeg'), label: message('caseLandmarkAspectLabel'), kind: 'angle', unit: 'deg', optional: true, hint: message('caseLandmarkAspectHint'), min: 0.01, max: 179.99, byDefault: message('caseLandmarkAspectDefault') },
];

/** A fixed camera's aim when none is measured or given: anywhere ahead, and said to be the default. */
export const DEFAULT_AIM_DEG = { lo: -90, hi: 90 } as const;

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
  byDefault: message('caseAimDefault'),
};

/** The fixed camera's pitch; a marked horizon measures it instead. */
const PITCH_FIELD: FieldDef = {
  key: 'pitchDeg',
  label: message('casePitchLabel'),
  kind: 'angle',
  unit: 'deg',
  optional: true,
  hint: message('casePitchHint'),
  min: -89,
  max: 89,
  get: (a) => a.fixedCamera?.pitchDeg,
  set: (a, r) => {
    if (!a.fixedCamera) return a;
    const fixedCamera = { ...a.fixedCamera };
    if (r) fixedCamera.pitchDeg = r;
    else delete fixedCamera.pitchDeg;
    return { ...a, fixedCamera };
  },
  byDefault: message('casePitchDefault'),
};

/** The size of one named landmark, by the id its marks carry. */
function landmarkSizeField(id: string): FieldDef {
  return {
    key: `landmark-${id}`,
    label: message('caseLandmarkIdSizeLabel', id),
    kind: 'length',
    unit: 'm',
    optional: true,
    hint: message('caseLandmarkSizeHint'),
    min: 0.001,
    max: 1000,
    get: (a) => a.landmarkSizes?.find((l) => l.id === id)?.sizeM,
    set: (a, r) => {
      const rest = (a.landmarkSizes ?? []).filter((l) => l.id !== id);
      const sizes = r ? [...rest, { id, sizeM: r }] : rest;
      const next: CaseAssumptions = { ...a, landmarkSizes: sizes };
      if (sizes.length === 0) delete next.landmarkSizes;
      return next;
    },
  };
}

/** Said under a field at its default: what holds, or that the value is the tool's own. */
function defaultNote(f: FieldDef, a: CaseAssumptions): string | null {
  const r = f.get(a);
  if (!r) return f.byDefault ?? null;
  if (f.key === 'axisHeadingDeg' && r.lo === DEFAULT_AIM_DEG.lo && r.hi === DEFAULT_AIM_DEG.hi) return f.byDefault ?? null;
  const d = f.get(defaultAssumptions());
  return d && d.lo === r.lo && d.hi === r.hi ? message('caseIsDefault') : null;
}


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
function Field({ f, a, onSave, measured }: { f: FieldDef; a: CaseAssumptions; onSave: (next: CaseAssumptions) => void; measured?: string | undefined }) {
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
  // a value the marks measure says so: a typed one would not be used
  const note = measured ?? defaultNote(f, a);
  return (
    <FormField id={id} label={f.label} error={error} hint={note ? <span data-testid={`default-${f.key}`}>{note}</span> : null}>
      <input
        id={id}
        data-testid={id}
        value={text}
        placeholder={f.hint}
        {...describedBy(id, error, !!note)}
        onInput={(e) => setText(valueOf(e))}
        {...commitsOnLeave(commit)}
      />
    </FormField>
  );
}

/** The ids the case's landmark marks carry, each once, in the order first marked. */
function landmarkIds(c: CaseRecord): string[] {
  return [...new Set(c.marks.filter((m) => m.kind === 'landmark-span' && m.landmarkId).map((m) => m.landmarkId!))];
}

/** The dimension the object's spans were marked as (the latest span's), for the size classes offered. */
function dimensionMarked(c: CaseRecord): 'wingspan' | 'length' {
  const spans = c.marks.filter((m) => m.kind === 'object-span');
  return spans[spans.length - 1]?.dimension === 'length' ? 'length' : 'wingspan';
}

/** The case file a colleague recomputes with `npm run solve -- FILE`; named by case and date. */
function exportCase(c: CaseRecord): void {
  const json = JSON.stringify(toCaseFile(c, extensionVersion()), null, 2);
  saveText(json, `${caseFileStem(c)}.json`);
}

/** Copy the summary anyone can recompute: plain text or Markdown, with a preview of what is copied. */
function Share({ c, r, system, tabId }: { c: CaseRecord; r: CaseAnalysis; system: UnitSystem; tabId: number | null }) {
  const [status, setStatus] = useState('');
  const [frameStatus, setFrameStatus] = useState('');
  // the annotated frame's code (the layout, the canvas, the frame server's file) loads on the click
  const saveFrame = () => {
    setFrameStatus('');
    if (tabId === null) return setFrameStatus(message('caseFrameFailed', message('caseFrameNoTab')));
    import('./annotated-frame')
      .then((m) => m.saveAnnotatedFrame(tabId, c, r, system))
      .then(
        ({ name, source }) => setFrameStatus(message('caseFrameSaved', [name, message(source === 'video' ? 'caseFrameSourceVideo' : 'caseFrameSourceCapture')])),
        (e: Error) => setFrameStatus(message('caseFrameFailed', e.message)),
      );
  };
  // built only once opened: for a case at the mark limit the text alone took a second to build
  const [previewing, setPreviewing] = useState(false);
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
      <button type="button" class="secondary" data-testid="save-frame" onClick={saveFrame}>
        {message('caseSaveFrame')}
      </button>
      <span class="muted" role="status" data-testid="copy-status">
        {' '}
        {status}
      </span>
      <span class="muted" role="status" data-testid="frame-status">
        {frameStatus}
      </span>
      <details onToggle={(e) => setPreviewing((e.currentTarget as HTMLDetailsElement).open)}>
        <summary>{message('casePreview')}</summary>
        <pre data-testid="summary-preview">{previewing ? text('text') : ''}</pre>
      </details>
    </section>
  );
}

/** Where the figures will be while the worker computes them: how far along, as a bar and in words. */
function Computing({ progress, error }: Pick<AnalysisState, 'progress' | 'error'>) {
  if (error) {
    return (
      <p class="error" role="alert" data-testid="analysis-error">
        {message('caseAnalysisFailed', error)}
      </p>
    );
  }
  const done = progress?.done ?? 0;
  const total = Math.max(progress?.total ?? 1, 1);
  const pct = Math.min(100, Math.floor((100 * done) / total));
  return (
    <section class="computing" data-testid="computing" aria-label={message('caseResultsLabel')}>
      <p role="status" data-testid="computing-text">
        {message('caseComputing', [String(pct), String(done), String(total)])}
      </p>
      <progress data-testid="computing-progress" max={total} value={done} aria-label={message('caseComputingBar')} />
    </section>
  );
}

export function CaseView({ c, system, tabId = null }: { c: CaseRecord; system: UnitSystem; tabId?: number | null }) {
  const a = c.assumptions ?? defaultAssumptions();
  // the figures come from a worker; what the assumptions section needs is cheap and drawn at once
  const { f, progress, error } = useAnalysis(c);
  const r = f?.r ?? null;
  const given = useMemo(() => engineAssumptions(c.assumptions, c.marks), [c]);
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
        {message(c.marks.length === 1 ? (given.defaults ? 'caseOneMarkVideoDefaults' : 'caseOneMarkVideo') : given.defaults ? 'caseMarksVideoDefaults' : 'caseMarksVideo', [String(c.marks.length), String(c.video.width), String(c.video.height)])}
      </p>
      <p class="muted" data-testid="labels">
        {message('caseLabels', [given.cameraLabel, given.sizeLabel])}
      </p>
      <section aria-label={message('caseAssumptionsLabel')} class="assumptions">
        <CameraPicker a={a} onSave={save} />
        <SizePicker a={a} onSave={save} dimension={dimensionMarked(c)} />
        {r?.dimensionMismatch && (
          <p class="error" role="status" data-testid="dimension-mismatch">
            {r.dimensionMismatch}
          </p>
        )}
        {FIELDS.map((f) => (
          <Field key={`${c.id}-${f.key}-${JSON.stringify(f.get(a) ?? null)}`} f={f} a={a} onSave={save} />
        ))}
        <DirectionPicker a={a} onSave={save} />
        <MountPicker a={a} onSave={save} />
        {a.fixedCamera && (
          <Field key={`${c.id}-aim-${JSON.stringify(AIM_FIELD.get(a) ?? null)}`} f={AIM_FIELD} a={a} onSave={save} measured={c.marks.some((m) => m.kind === 'road-ahead') ? message('caseAimMeasured') : undefined} />
        )}
        {a.fixedCamera && (
          <Field key={`${c.id}-pitch-${JSON.stringify(PITCH_FIELD.get(a) ?? null)}`} f={PITCH_FIELD} a={a} onSave={save} measured={c.marks.some((m) => m.kind === 'horizon') ? message('casePitchMeasured') : undefined} />
        )}
        {landmarkIds(c).map((id) => {
          const f = landmarkSizeField(id);
          return <Field key={`${c.id}-${f.key}-${JSON.stringify(f.get(a) ?? null)}`} f={f} a={a} onSave={save} />;
        })}
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
          {r?.laneSpeed && (
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
          {r?.laneSpeedMissing && <div class="muted">{r.laneSpeedMissing}</div>}
        </FormField>
        {saveError && <p class="error">{saveError}</p>}
      </section>
      {r ? (
        <>
          <Results f={f!} system={system} />
          <Share c={c} r={r} system={system} tabId={tabId} />
        </>
      ) : (
        <Computing progress={progress} error={error} />
      )}
    </article>
  );
}

import { useEffect, useMemo, useRef, useState } from 'preact/hooks';
import type { CaseListing, QuarantineEntry, StorageUsage } from '../../src/case/listing';
import { CASE_STATUSES, type CaseRecord, type CaseStatus, type MarkKind } from '../../src/case/schema';
import { MAX_CASE_FILE_BYTES } from '../../src/case/casefile';
import { CASE_PREFIX, DELETED_PREFIX, QUARANTINE_PREFIX } from '../../src/case/store-policy';
import { DEFAULT_QUERY, LruCache, SORT_KEYS, applyQuery, checkNotes, distinctSites, distinctTags, headlineKey, marksByTimestamp, openableUrl, parseDayRange, parseTags, shownTitle, visibleRows, type DateField, type LogQuery, type SortKey } from '../../src/case/log';
import type { Headline } from '../../src/case/headline';
import type { UnitSystem } from '../../src/engine/units';
import { browser, extensionVersion, message as t, send } from '../shared/browser';
import { marksCsv } from '../../src/case/csv';
import { exportFileName } from '../../src/case/importing';
import { DEFAULT_SETTINGS, loadSettings, onSettingsChanged } from '../shared/settings';
import { describedBy, FormField, valueOf } from '../shared/form-field';
import './log.css';

/*
 * The case log, in the full-tab view (`index.html?view=log`): every stored case as a row, found by
 * search and filters, annotated, opened at a mark, exported, imported, deleted with an undo. The
 * list draws only the rows in view (src/case/log.ts visibleRows), so 1 000 cases cost what 20 do.
 */

const STATUS_KEY: Record<CaseStatus, string> = { open: 'logStatusOpen', explained: 'logStatusExplained', 'second-look': 'logStatusSecondLook' };
const SORT_LABEL: Record<SortKey, string> = { updated: 'logSortUpdated', created: 'logSortCreated', title: 'logSortTitle', site: 'logSortSite', status: 'logSortStatus' };
const statusWord = (s: CaseStatus) => t(STATUS_KEY[s]);
const KIND_KEY: Record<MarkKind, string> = {
  'object-span': 'logKindObject',
  'landmark-span': 'logKindLandmark',
  'frame-edges': 'logKindEdges',
  'lane-dash': 'logKindLane',
  'object-centre': 'logKindCentre',
  'frame-top-bottom': 'logKindEdges',
  horizon: 'logKindHorizon',
  'road-ahead': 'logKindRoadAhead',
};

// rows are one fixed height in rem, so the window arithmetic holds at any zoom or font size
const ROW_REM = 4.25;
const OVERSCAN = 6;
/** Headlines kept for rows scrolled past (the engine runs once per case and saved version). */
const HEADLINE_CACHE = 300;
/** Deleted cases this tab offers to bring back; kept in the tab's session so a reload keeps them. */

// marks for the benchmark's breakdown of the first render (test/bench/log.ts); cost nothing otherwise
performance.mark('log:module');

/** The full-tab view shows the log when its address says `?view=log` (main.tsx routes on this). */
export const isLogRoute = () => new URLSearchParams(location.search).get('view') === 'log';

type Listed = { cases: CaseListing[]; quarantined: QuarantineEntry[]; usage: StorageUsage };
/*
 * The listing is most of the wait before the first rows: on the log's own route it is asked for
 * as soon as this module runs, not after the first (empty) render has been painted.
 */
let early: Promise<Listed> | null = isLogRoute() ? send('cases/list', {}) : null;

const when = new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'short' });
const day = (ms: number) => when.format(new Date(ms));

/** mm:ss.sss, as the case view and summary show a timestamp. */
function stamp(s: number): string {
  const m = Math.floor(s / 60);
  return `${m}:${(s - 60 * m).toFixed(3).padStart(6, '0')}`;
}

function download(fileName: string, text: string): void {
  // an object URL of our own bytes: the file never leaves the machine
  const a = document.createElement('a');
  const type = fileName.endsWith('.csv') ? 'text/csv' : fileName.endsWith('.txt') ? 'text/plain' : 'application/json';
  a.href = URL.createObjectURL(new Blob([text], { type: `${type};charset=utf-8` }));
  a.download = fileName;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(a.href), 10_000);
}

/* ---- headlines: computed only for rows in view, one at a time, cached by id and version ---- */

/*
 * The figure needs the engine and the unit formatter (mathjs), which the list does not: they are
 * loaded with the first headline, so they are not part of what the log evaluates before its rows.
 */
type HeadlineModule = typeof import('../../src/case/headline');
let headlineModule: Promise<HeadlineModule> | null = null;
const loadHeadline = () => (headlineModule ??= import('../../src/case/headline'));

type HeadlineState = { headline: Headline | null; text: (system: UnitSystem) => string } | { error: string };
const headlines = new LruCache<HeadlineState>(HEADLINE_CACHE);
let queue: Promise<void> = Promise.resolve();

/**
 * The engine runs on the page's thread, so jobs run one after another with a yield between them:
 * a fast scroll queues the rows it passes, and a row scrolled away before its turn is skipped.
 */
function requestHeadline(c: CaseListing, wanted: () => boolean): Promise<HeadlineState> {
  const key = headlineKey(c.id, c.updatedAt);
  const done = headlines.get(key);
  if (done) return Promise.resolve(done);
  const job = queue.then(async (): Promise<HeadlineState | null> => {
    const cached = headlines.get(key);
    if (cached) return cached;
    if (!wanted()) return null;
    await new Promise((ok) => setTimeout(ok, 0));
    let state: HeadlineState;
    try {
      const [record, m] = await Promise.all([send('case/get', { caseId: c.id }), loadHeadline()]);
      if (record) {
        const headline = m.caseHeadline(record);
        const text = (system: UnitSystem) => {
          try {
            return m.headlineText(headline, system, t('logNotEnoughMarks'));
          } catch (e) {
            // a figure that cannot be formatted is reported in its row, not allowed to break the list
            return t('logHeadlineFailed', (e as Error).message);
          }
        };
        state = { headline, text };
      } else state = { error: t('logHeadlineGone') };
    } catch (e) {
      state = { error: (e as Error).message };
    }
    headlines.set(key, state);
    return state;
  });
  queue = job.then(
    () => undefined,
    () => undefined,
  );
  return job.then((s) => s ?? { error: '' });
}

function HeadlineCell({ c, system }: { c: CaseListing; system: UnitSystem }) {
  const [state, setState] = useState<HeadlineState | null>(() => headlines.get(headlineKey(c.id, c.updatedAt)) ?? null);
  useEffect(() => {
    let live = true;
    const cached = headlines.get(headlineKey(c.id, c.updatedAt));
    setState(cached ?? null);
    if (!cached && c.markCount > 0) void requestHeadline(c, () => live).then((s) => live && setState(s));
    return () => {
      live = false;
    };
  }, [c.id, c.updatedAt, c.markCount]);
  if (c.markCount === 0) return <span class="muted">{t('logNotEnoughMarks')}</span>;
  if (!state) return <span class="muted">{t('logHeadlineWorking')}</span>;
  if ('error' in state) return <span class="muted">{state.error ? t('logHeadlineFailed', state.error) : t('logHeadlineWorking')}</span>;
  return <span data-testid="headline">{state.text(system)}</span>;
}

/* ---- the list ---- */

function Row({ c, index, active, selected, system, onPick }: { c: CaseListing; index: number; active: boolean; selected: boolean; system: UnitSystem; onPick: (i: number) => void }) {
  return (
    <div
      id={`log-row-${c.id}`}
      role="option"
      aria-selected={selected ? 'true' : 'false'}
      class={`log-row${active ? ' active' : ''}${selected ? ' selected' : ''}`}
      data-testid="log-row"
      data-case-id={c.id}
      onClick={() => onPick(index)}
    >
      <div class="log-row-title">{shownTitle(c)}</div>
      <div class="log-row-meta muted">
        <span>{c.site || t('logNoSite')}</span> · <span>{day(c.updatedAt)}</span> · <span class={`log-status log-status-${c.status}`} data-testid="row-status">{statusWord(c.status)}</span>
        {c.tags.length > 0 && (
          <>
            {' · '}
            {c.tags.map((tag) => (
              <span class="log-tag">{tag}</span>
            ))}
          </>
        )}
        {' · '}
        {t('logMarkCount', String(c.markCount))}
      </div>
      <div class="log-row-headline">
        <HeadlineCell c={c} system={system} />
      </div>
    </div>
  );
}

function rowHeightPx(): number {
  const rem = Number.parseFloat(getComputedStyle(document.documentElement).fontSize) || 16;
  return ROW_REM * rem;
}

/**
 * The rows as a listbox: one tab stop, arrow keys (Home, End, Page Up/Down too) move through the
 * rows, Enter or Space opens the one under the cursor. Only the window of rows in view exists in
 * the DOM; the active row is always scrolled into it, so aria-activedescendant names a real node.
 */
function CaseList({ cases, selectedId, system, onSelect }: { cases: CaseListing[]; selectedId: string | null; system: UnitSystem; onSelect: (id: string, byKey: boolean) => void }) {
  const box = useRef<HTMLDivElement>(null);
  const [scrollTop, setScrollTop] = useState(0);
  const [viewport, setViewport] = useState(480);
  const [rowHeight, setRowHeight] = useState(80);
  const [active, setActive] = useState(0);
  useEffect(() => {
    const el = box.current!;
    const measure = () => {
      setViewport(el.clientHeight);
      setRowHeight(rowHeightPx());
    };
    measure();
    const ro = new ResizeObserver(measure);
    ro.observe(el);
    return () => ro.disconnect();
  }, []);
  // a filter that shrinks the list keeps the cursor on a row that exists
  const cursor = Math.min(active, Math.max(0, cases.length - 1));
  const w = visibleRows({ rowHeight, viewportHeight: viewport, scrollTop, count: cases.length, overscan: OVERSCAN });
  const moveTo = (i: number) => {
    const n = Math.max(0, Math.min(cases.length - 1, i));
    setActive(n);
    const el = box.current!;
    const top = n * rowHeight;
    if (top < el.scrollTop) el.scrollTop = top;
    else if (top + rowHeight > el.scrollTop + el.clientHeight) el.scrollTop = top + rowHeight - el.clientHeight;
    setScrollTop(el.scrollTop);
  };
  const pick = (i: number, byKey = false) => {
    const c = cases[i];
    if (!c) return;
    setActive(i);
    onSelect(c.id, byKey);
  };
  const onKey = (e: KeyboardEvent) => {
    const page = Math.max(1, Math.floor(viewport / rowHeight) - 1);
    const moves: Record<string, number> = { ArrowDown: cursor + 1, ArrowUp: cursor - 1, Home: 0, End: cases.length - 1, PageDown: cursor + page, PageUp: cursor - page };
    if (e.key in moves) {
      e.preventDefault();
      moveTo(moves[e.key]!);
    } else if (e.key === 'Enter' || e.key === ' ') {
      e.preventDefault();
      pick(cursor, true);
    }
  };
  const activeId = cases[cursor] ? `log-row-${cases[cursor]!.id}` : undefined;
  return (
    <div
      ref={box}
      class="log-list"
      role="listbox"
      tabIndex={0}
      aria-label={t('logListLabel')}
      aria-activedescendant={activeId}
      data-testid="log-list"
      data-rendered={String(w.end - w.start)}
      onScroll={(e) => setScrollTop((e.currentTarget as HTMLDivElement).scrollTop)}
      onKeyDown={onKey}
    >
      <div style={{ height: `${w.totalHeight}px`, position: 'relative' }}>
        <div style={{ position: 'absolute', top: `${w.offsetTop}px`, left: 0, right: 0 }}>
          {cases.slice(w.start, w.end).map((c, k) => (
            <Row key={c.id} c={c} index={w.start + k} active={w.start + k === cursor} selected={c.id === selectedId} system={system} onPick={pick} />
          ))}
        </div>
      </div>
    </div>
  );
}

/* ---- search and filters ---- */

interface FilterText {
  text: string;
  statuses: CaseStatus[];
  tag: string;
  site: string;
  dateField: DateField;
  from: string;
  to: string;
  sort: SortKey;
  descending: boolean;
}
const EMPTY_FILTERS: FilterText = { text: '', statuses: [], tag: '', site: '', dateField: 'updatedAt', from: '', to: '', sort: 'updated', descending: true };

/** The typed filters as a query, or the field that is wrong and why (the last good query stays). */
function toQuery(f: FilterText): { query: LogQuery } | { field: 'from' | 'to'; error: string } {
  try {
    const { from, to } = parseDayRange(f.from, f.to, new Date().getTimezoneOffset());
    return { query: { ...DEFAULT_QUERY, text: f.text, statuses: f.statuses, tag: f.tag || null, site: f.site || null, dateField: f.dateField, from, to, sort: f.sort, descending: f.descending } };
  } catch (e) {
    const msg = (e as Error).message;
    return { field: msg.startsWith('from date') ? 'from' : 'to', error: msg };
  }
}

function Filters({ f, set, tags, sites, dateError }: { f: FilterText; set: (next: FilterText) => void; tags: string[]; sites: string[]; dateError: { field: 'from' | 'to'; error: string } | null }) {
  const upd = <K extends keyof FilterText>(k: K, v: FilterText[K]) => set({ ...f, [k]: v });
  const toggleStatus = (s: CaseStatus, on: boolean) => upd('statuses', on ? [...f.statuses, s] : f.statuses.filter((x) => x !== s));
  const dateField = (which: 'from' | 'to') => {
    const id = `log-${which}`;
    const bad = dateError?.field === which;
    return (
      <FormField id={id} label={t(which === 'from' ? 'logFromLabel' : 'logToLabel')} error={bad ? dateError.error : null}>
        <input
          id={id}
          type="date"
          data-testid={id}
          value={f[which]}
          {...describedBy(id, bad ? dateError.error : null)}
          onInput={(e) => upd(which, valueOf(e))}
        />
      </FormField>
    );
  };
  return (
    <section class="log-filters" aria-label={t('logFiltersLabel')}>
      <FormField id="log-search" label={t('logSearchLabel')} extraClass="log-search">
        <input id="log-search" type="search" data-testid="log-search" value={f.text} placeholder={t('logSearchHint')} onInput={(e) => upd('text', valueOf(e))} />
      </FormField>
      <fieldset class="log-statuses">
        <legend>{t('logStatusLabel')}</legend>
        {CASE_STATUSES.map((s) => (
          <label class="log-check">
            <input type="checkbox" data-testid={`log-filter-${s}`} checked={f.statuses.includes(s)} onChange={(e) => toggleStatus(s, (e.target as HTMLInputElement).checked)} /> {statusWord(s)}
          </label>
        ))}
      </fieldset>
      <FormField id="log-tag" label={t('logTagFilterLabel')}>
        <select id="log-tag" data-testid="log-tag" value={f.tag} onChange={(e) => upd('tag', valueOf(e))}>
          <option value="">{t('logAny')}</option>
          {tags.map((x) => (
            <option value={x}>{x}</option>
          ))}
        </select>
      </FormField>
      <FormField id="log-site" label={t('logSiteFilterLabel')}>
        <select id="log-site" data-testid="log-site" value={f.site} onChange={(e) => upd('site', valueOf(e))}>
          <option value="">{t('logAny')}</option>
          {sites.map((x) => (
            <option value={x}>{x}</option>
          ))}
        </select>
      </FormField>
      <FormField id="log-date-field" label={t('logDateFieldLabel')}>
        <select id="log-date-field" value={f.dateField} onChange={(e) => upd('dateField', valueOf(e) as DateField)}>
          <option value="updatedAt">{t('logDateUpdated')}</option>
          <option value="createdAt">{t('logDateCreated')}</option>
        </select>
      </FormField>
      {dateField('from')}
      {dateField('to')}
      <FormField id="log-sort" label={t('logSortLabel')}>
        <select id="log-sort" data-testid="log-sort" value={f.sort} onChange={(e) => upd('sort', valueOf(e) as SortKey)}>
          {SORT_KEYS.map((k) => (
            <option value={k}>{t(SORT_LABEL[k])}</option>
          ))}
        </select>
      </FormField>
      <div class="field">
        <span class="label-like" aria-hidden="true">
          &nbsp;
        </span>
        <button type="button" class="secondary" aria-pressed={f.descending ? 'true' : 'false'} data-testid="log-direction" onClick={() => upd('descending', !f.descending)}>
          {t(f.descending ? 'logDescending' : 'logAscending')}
        </button>
      </div>
      <div class="field">
        <span class="label-like" aria-hidden="true">
          &nbsp;
        </span>
        <button type="button" class="secondary" onClick={() => set(EMPTY_FILTERS)}>
          {t('logClearFilters')}
        </button>
      </div>
    </section>
  );
}

/* ---- one case ---- */

/**
 * Notes, status and tags of one case. While the user has unsaved edits, a change saved elsewhere
 * (another tab, an import) does not overwrite what they are typing: the form says so instead, and
 * saving then sets these three fields to what is in the form (the marks are never touched).
 */
function Annotate({ c, onSaved }: { c: CaseListing; onSaved: (msg: string) => void }) {
  const [notes, setNotes] = useState(c.notes);
  const [status, setStatus] = useState<CaseStatus>(c.status);
  const [tags, setTags] = useState(c.tags.join(', '));
  const [dirty, setDirty] = useState(false);
  const [changedElsewhere, setChangedElsewhere] = useState(false);
  const seen = useRef(c.updatedAt);
  useEffect(() => {
    if (c.updatedAt === seen.current) return;
    seen.current = c.updatedAt;
    if (dirty) {
      setChangedElsewhere(true);
      return;
    }
    setNotes(c.notes);
    setStatus(c.status);
    setTags(c.tags.join(', '));
  }, [c.updatedAt]);
  const [tagError, setTagError] = useState<string | null>(null);
  const [notesError, setNotesError] = useState<string | null>(null);
  const [saveError, setSaveError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const save = async (e: Event) => {
    e.preventDefault();
    let parsed: string[] | null = null;
    try {
      parsed = parseTags(tags);
      setTagError(null);
    } catch (err) {
      setTagError((err as Error).message);
    }
    try {
      checkNotes(notes);
      setNotesError(null);
    } catch (err) {
      setNotesError((err as Error).message);
      return;
    }
    if (!parsed) return;
    setBusy(true);
    try {
      const saved = await send('case/annotate', { caseId: c.id, notes, status, tags: parsed });
      // the listing that follows this save carries this version: it is ours, not a change elsewhere
      seen.current = saved.updatedAt;
      setSaveError(null);
      setDirty(false);
      setChangedElsewhere(false);
      setTags(parsed.join(', '));
      onSaved(t('logSaved'));
    } catch (err) {
      // the background names the field; what was saved before stays as it was
      setSaveError(t('logNotSaved', (err as Error).message));
    } finally {
      setBusy(false);
    }
  };
  return (
    <form class="log-annotate" onSubmit={save} aria-label={t('logAnnotateLabel')}>
      <FormField id="log-notes" label={t('logNotesLabel')} error={notesError}>
        <textarea
          id="log-notes"
          data-testid="log-notes"
          rows={4}
          value={notes}
          {...describedBy('log-notes', notesError)}
          onInput={(e) => {
            setNotes(valueOf(e));
            setDirty(true);
          }}
        />
      </FormField>
      <FormField id="log-status" label={t('logStatusLabel')}>
        <select id="log-status" data-testid="log-status" value={status} onChange={(e) => {
            setStatus(valueOf(e) as CaseStatus);
            setDirty(true);
          }}
        >
          {CASE_STATUSES.map((s) => (
            <option value={s}>{statusWord(s)}</option>
          ))}
        </select>
      </FormField>
      <FormField id="log-tags" label={t('logTagsLabel')} error={tagError} hint={t('logTagsHint')}>
        <input
          id="log-tags"
          data-testid="log-tags"
          value={tags}
          placeholder={t('logTagsHint')}
          {...describedBy('log-tags', tagError, true)}
          onInput={(e) => {
            setTags(valueOf(e));
            setDirty(true);
          }}
        />
      </FormField>
      {changedElsewhere && (
        <p class="log-warn" role="status" data-testid="log-changed-elsewhere">
          {t('logChangedElsewhere')}
        </p>
      )}
      <button type="submit" class="primary" disabled={busy} data-testid="log-save">
        {t('logSave')}
      </button>
      {saveError && (
        <p class="error" role="alert" data-testid="log-save-error">
          {saveError}
        </p>
      )}
    </form>
  );
}

function Detail({ c, focus, onDeleted, say }: { c: CaseListing; focus: boolean; onDeleted: (c: CaseListing) => void; say: (msg: string) => void }) {
  const [record, setRecord] = useState<CaseRecord | null>(null);
  const [seekT, setSeekT] = useState<string>(c.timestamps[0] !== undefined ? String(c.timestamps[0]) : '');
  const [confirming, setConfirming] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const confirmRef = useRef<HTMLButtonElement>(null);
  const system = useSystem();
  useEffect(() => {
    let live = true;
    send('case/get', { caseId: c.id }).then(
      (r) => live && setRecord(r),
      (e: Error) => live && setError(e.message),
    );
    return () => {
      live = false;
    };
  }, [c.id, c.updatedAt]);
  useEffect(() => {
    if (confirming) confirmRef.current?.focus();
  }, [confirming]);
  // opened from the keyboard: the reader goes on at the case (below the list in a narrow window)
  const heading = useRef<HTMLHeadingElement>(null);
  useEffect(() => {
    if (focus) heading.current?.focus();
  }, []);
  const stamps = record ? marksByTimestamp(record.marks) : [];
  const open = async () => {
    setError(null);
    try {
      const url = openableUrl(c.pageUrl);
      const ts = seekT === '' ? null : Number(seekT);
      // asked for before the page opens: the overlay takes it when it is called up there
      if (ts !== null) await send('seek/request', { pageUrl: c.pageUrl, t: ts });
      await browser.tabs.create({ url });
    } catch (e) {
      setError(t('logOpenFailed', (e as Error).message));
    }
  };
  const exportOne = async () => {
    setError(null);
    try {
      const f = await send('cases/export', { caseIds: [c.id] });
      download(f.fileName, f.text);
      say(t('logExported', f.fileName));
    } catch (e) {
      setError(t('logExportFailed', (e as Error).message));
    }
  };
  // marks as CSV and the summary as text: made here from the stored record, named by case and date
  const exportCsv = async () => {
    setError(null);
    try {
      const r = record ?? (await send('case/get', { caseId: c.id }));
      if (!r) throw new Error(t('logGone'));
      const name = exportFileName([c.id], Date.now(), 'csv');
      download(name, marksCsv([r]));
      say(t('logExported', name));
    } catch (e) {
      setError(t('logExportFailed', (e as Error).message));
    }
  };
  const exportSummary = async () => {
    setError(null);
    try {
      const r = record ?? (await send('case/get', { caseId: c.id }));
      if (!r) throw new Error(t('logGone'));
      // the engine and the units layer come in only when a summary is asked for
      const [{ analyseCase }, { summaryText }] = await Promise.all([import('../../src/case/analysis'), import('../../src/case/summary')]);
      const name = exportFileName([c.id], Date.now(), 'txt');
      download(name, summaryText(r, analyseCase(r), { format: 'text', system: systemNow, toolVersion: extensionVersion() }));
      say(t('logExported', name));
    } catch (e) {
      setError(t('logExportFailed', (e as Error).message));
    }
  };
  const remove = async () => {
    setError(null);
    try {
      await send('case/delete', { caseId: c.id });
      setConfirming(false);
      onDeleted(c);
    } catch (e) {
      setError(t('logDeleteFailed', (e as Error).message));
    }
  };
  return (
    <article class="log-detail" aria-labelledby="log-detail-title" data-testid="log-detail">
      <h2 id="log-detail-title" tabIndex={-1} ref={heading}>
        {shownTitle(c)}
      </h2>
      <p class="muted log-address">{c.pageUrl}</p>
      <p class="muted">
        {t('logCreatedUpdated', [day(c.createdAt), day(c.updatedAt)])}
        {c.historyCount > 0 ? ` · ${t('logHistory', String(c.historyCount))}` : ''}
      </p>
      <div class="log-headline-big">
        <HeadlineCell c={c} system={system} />
      </div>
      <Annotate key={c.id} c={c} onSaved={say} />
      <section aria-label={t('logMarksLabel')}>
        <h3>{t('logMarksLabel')}</h3>
        {stamps.length === 0 ? (
          <p class="muted">{t('logNoMarks')}</p>
        ) : (
          <table class="log-marks" data-testid="log-marks">
            <thead>
              <tr>
                <th scope="col">{t('logMarkTime')}</th>
                <th scope="col">{t('logMarkKinds')}</th>
                <th scope="col">{t('logMarkedBy')}</th>
              </tr>
            </thead>
            <tbody>
              {stamps.map((s) => (
                <tr>
                  <td>
                    {stamp(s.t)} ({s.t.toFixed(3)} s)
                  </td>
                  <td>{s.kinds.map((k) => t(KIND_KEY[k])).join(', ')}</td>
                  <td data-testid="marked-by">{s.by.length ? s.by.join(', ') : <span class="muted">{t('logNobodyNamed')}</span>}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
      <section class="log-actions" aria-label={t('logActionsLabel')}>
        <FormField id="log-seek" label={t('logSeekLabel')}>
          <select id="log-seek" data-testid="log-seek" value={seekT} onChange={(e) => setSeekT(valueOf(e))}>
            <option value="">{t('logSeekNone')}</option>
            {c.timestamps.map((x) => (
              <option value={String(x)}>
                {stamp(x)} ({x.toFixed(3)} s)
              </option>
            ))}
          </select>
        </FormField>
        <button type="button" class="primary" data-testid="log-open" onClick={open}>
          {t('logOpen')}
        </button>{' '}
        <button type="button" class="secondary" data-testid="log-export-one" onClick={exportOne}>
          {t('logExportOne')}
        </button>{' '}
        <button type="button" class="secondary" data-testid="log-export-csv" onClick={() => void exportCsv()}>
          {t('logExportCsv')}
        </button>{' '}
        <button type="button" class="secondary" data-testid="log-export-summary" onClick={() => void exportSummary()}>
          {t('logExportSummary')}
        </button>{' '}
        {!confirming ? (
          <button type="button" class="secondary danger" data-testid="log-delete" onClick={() => setConfirming(true)}>
            {t('logDelete')}
          </button>
        ) : (
          <span class="log-confirm" role="group" aria-label={t('logDeleteConfirmLabel')}>
            <span>{t('logDeleteConfirm')}</span>{' '}
            <button type="button" class="secondary danger" ref={confirmRef} data-testid="log-delete-confirm" onClick={remove}>
              {t('logDeleteYes')}
            </button>{' '}
            <button type="button" class="secondary" data-testid="log-delete-cancel" onClick={() => setConfirming(false)}>
              {t('logDeleteNo')}
            </button>
          </span>
        )}
        {error && (
          <p class="error" role="alert">
            {error}
          </p>
        )}
      </section>
    </article>
  );
}

/* ---- storage, quarantine, import and export of everything ---- */

let systemNow: UnitSystem = DEFAULT_SETTINGS.system;
const systemListeners = new Set<(s: UnitSystem) => void>();
/** The unit system from the settings, followed live (one listener for the whole view). */
function useSystem(): UnitSystem {
  const [s, setS] = useState(systemNow);
  useEffect(() => {
    systemListeners.add(setS);
    return () => {
      systemListeners.delete(setS);
    };
  }, []);
  return s;
}

function kb(bytes: number): string {
  return bytes >= 1024 * 1024 ? `${(bytes / 1024 / 1024).toFixed(1)} MB` : `${Math.ceil(bytes / 1024)} KB`;
}

function Storage({ usage, quarantined }: { usage: StorageUsage; quarantined: QuarantineEntry[] }) {
  return (
    <section class="log-storage" aria-label={t('logStorageLabel')}>
      <p class={usage.nearLimit ? 'log-warn' : 'muted'} role={usage.nearLimit ? 'alert' : undefined} data-testid="log-usage">
        {t('logUsage', [kb(usage.bytesInUse), kb(usage.quotaBytes)])}
        {usage.nearLimit ? ` ${t('logNearLimit')}` : ''}
      </p>
      {quarantined.length > 0 && (
        <details class="log-quarantine" data-testid="log-quarantine" open>
          <summary>{t('logQuarantined', String(quarantined.length))}</summary>
          <p class="muted">{t('logQuarantineWhy')}</p>
          <ul>
            {quarantined.map((q) => (
              <li>
                <code>{q.key}</code>
                {q.quarantinedAt > 0 ? ` (${day(q.quarantinedAt)})` : ''}: {q.reason}
              </li>
            ))}
          </ul>
        </details>
      )}
    </section>
  );
}

function ImportExport({ say }: { say: (msg: string) => void }) {
  const [importError, setImportError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const exportAll = async () => {
    try {
      const f = await send('cases/export', {});
      download(f.fileName, f.text);
      say(t('logExported', f.fileName));
    } catch (e) {
      say(t('logExportFailed', (e as Error).message));
    }
  };
  const importFile = async (input: HTMLInputElement) => {
    const file = input.files?.[0];
    if (!file) return;
    setImportError(null);
    if (file.size > MAX_CASE_FILE_BYTES) {
      setImportError(t('logImportTooBig', [file.name, kb(file.size), kb(MAX_CASE_FILE_BYTES)]));
      input.value = '';
      return;
    }
    setBusy(true);
    try {
      const r = await send('cases/import', { text: await file.text() });
      say(t('logImported', [String(r.added.length), String(r.merged.length)]));
    } catch (e) {
      // rejected whole: the message names the first bad field and its path; nothing was stored
      setImportError(t('logImportRejected', [file.name, (e as Error).message]));
    } finally {
      setBusy(false);
      input.value = '';
    }
  };
  return (
    <section class="log-io" aria-label={t('logIoLabel')}>
      <button type="button" class="secondary" data-testid="log-export-all" onClick={exportAll}>
        {t('logExportAll')}
      </button>
      <div class="field log-import">
        <label for="log-import">{t('logImportLabel')}</label>
        <input
          id="log-import"
          type="file"
          accept=".json,application/json"
          data-testid="log-import"
          disabled={busy}
          aria-invalid={importError ? 'true' : 'false'}
          aria-describedby={importError ? 'log-import-error' : undefined}
          onChange={(e) => void importFile(e.target as HTMLInputElement)}
        />
        {importError && (
          <div class="error" id="log-import-error" role="alert" data-testid="log-import-error">
            {importError}
          </div>
        )}
      </div>
    </section>
  );
}

interface Deleted {
  id: string;
  title: string;
}
/* ---- the whole view ---- */

export function LogView() {
  const [data, setData] = useState<Listed | null>(null);
  const [loadError, setLoadError] = useState<string | null>(null);
  const [filters, setFilters] = useState<FilterText>(EMPTY_FILTERS);
  const [lastQuery, setLastQuery] = useState<LogQuery>(DEFAULT_QUERY);
  const [selectedId, setSelectedId] = useState<string | null>(null);
  const [focusDetail, setFocusDetail] = useState(false);
  const [deleted, setDeleted] = useState<Deleted[]>([]);
  const [notice, setNotice] = useState('');
  const system = useSystem();

  useEffect(() => {
    document.body.classList.add('log-page');
    document.title = t('logTitle');
    void loadSettings().then((s) => {
      systemNow = s.system;
      systemListeners.forEach((f) => f(s.system));
    });
    const off = onSettingsChanged((s) => {
      systemNow = s.system;
      systemListeners.forEach((f) => f(s.system));
    });
    let timer = 0;
    const list = () => {
      const p = early ?? send('cases/list', {});
      early = null;
      return p;
    };
    const load = () =>
      list().then(
        (r) => {
          performance.mark('log:listed');
          setData(r);
          setLoadError(null);
        },
        (e: Error) => setLoadError(t('logLoadFailed', e.message)),
      );
    // saves arrive one key at a time (an import writes many): gather them into one reload
    const onChanged = (changes: Record<string, unknown>, area: string) => {
      if (area !== 'local' || !Object.keys(changes).some((k) => k.startsWith(CASE_PREFIX) || k.startsWith(QUARANTINE_PREFIX))) return;
      clearTimeout(timer);
      timer = window.setTimeout(() => void load(), 150);
    };
    void load();
    browser.storage.onChanged.addListener(onChanged);
    return () => {
      off();
      clearTimeout(timer);
      browser.storage.onChanged.removeListener(onChanged);
    };
  }, []);

  // after a delete the focus goes to its Undo (the case's own buttons are gone with it)
  const focusUndo = useRef(false);
  useEffect(() => {
    if (!focusUndo.current) return;
    focusUndo.current = false;
    document.getElementById('log-undo-0')?.focus();
  }, [deleted]);
  // what can still be undone is what the background kept (until the browser closes), whichever tab deleted it
  useEffect(() => {
    const refresh = () =>
      send('cases/deleted', {}).then(
        (r) => setDeleted(r.cases.map((d) => ({ id: d.id, title: d.title || d.id }))),
        () => undefined,
      );
    const onSession = (changes: Record<string, unknown>, area: string) => {
      if (area === 'session' && Object.keys(changes).some((k) => k.startsWith(DELETED_PREFIX))) void refresh();
    };
    void refresh();
    browser.storage.onChanged.addListener(onSession);
    return () => browser.storage.onChanged.removeListener(onSession);
  }, []);

  const parsed = useMemo(() => toQuery(filters), [filters]);
  const query = 'query' in parsed ? parsed.query : lastQuery;
  useEffect(() => {
    if ('query' in parsed) setLastQuery(parsed.query);
  }, [parsed]);
  const all = data?.cases ?? [];
  const shown = useMemo(() => applyQuery(all, query), [all, query]);
  const tags = useMemo(() => distinctTags(all), [all]);
  const sites = useMemo(() => distinctSites(all), [all]);
  const selected = all.find((c) => c.id === selectedId) ?? null;

  const onDeleted = (c: CaseListing) => {
    setDeleted((d) => [{ id: c.id, title: shownTitle(c) }, ...d.filter((x) => x.id !== c.id)]);
    setSelectedId(null);
    setNotice(t('logDeleted', shownTitle(c)));
    focusUndo.current = true;
  };
  const undo = async (d: Deleted) => {
    try {
      await send('case/undelete', { caseId: d.id });
      setDeleted((list) => list.filter((x) => x.id !== d.id));
      setNotice(t('logRestored', d.title));
      setSelectedId(d.id);
    } catch (e) {
      setNotice(t('logUndoFailed', [d.title, (e as Error).message]));
    }
  };

  return (
    <main class="log" data-testid="log-view">
      <header class="log-header">
        <h1>{t('logTitle')}</h1>
        <p class="muted">{t('logIntro')}</p>
      </header>
      {loadError && (
        <p class="error" role="alert">
          {loadError}
        </p>
      )}
      {data && <Storage usage={data.usage} quarantined={data.quarantined} />}
      <Filters f={filters} set={setFilters} tags={tags} sites={sites} dateError={'query' in parsed ? null : parsed} />
      <ImportExport say={setNotice} />
      <p role="status" class="log-notice" data-testid="log-notice">
        {notice}
      </p>
      {deleted.length > 0 && (
        <section class="log-undo" aria-label={t('logUndoLabel')}>
          <ul>
            {deleted.map((d, i) => (
              <li>
                {t('logDeletedItem', d.title)}{' '}
                <button type="button" class="secondary" id={`log-undo-${i}`} data-testid="log-undo" onClick={() => void undo(d)}>
                  {t('logUndo')}
                </button>
              </li>
            ))}
          </ul>
        </section>
      )}
      <p class="muted" data-testid="log-count" aria-live="polite">
        {data ? t('logCount', [String(shown.length), String(all.length)]) : t('logLoading')}
      </p>
      <div class="log-body">
        {data && all.length === 0 ? (
          <p class="muted">{t('logEmpty')}</p>
        ) : (
          <div class="log-list-wrap">
            <CaseList
              cases={shown}
              selectedId={selectedId}
              system={system}
              onSelect={(id, byKey) => {
                setFocusDetail(byKey);
                setSelectedId(id);
              }}
            />
            {data && shown.length === 0 && <p class="muted">{t('logNoMatch')}</p>}
          </div>
        )}
        {selected ? <Detail key={selected.id} c={selected} focus={focusDetail} onDeleted={onDeleted} say={setNotice} /> : <p class="muted log-detail-empty">{t('logPickOne')}</p>}
      </div>
    </main>
  );
}

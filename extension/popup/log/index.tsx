import { applyQuery, DEFAULT_QUERY, distinctSites, distinctTags, shownTitle } from '../../../src/case';
import type { CaseListing, LogQuery } from '../../../src/case';
import { useEffect, useMemo, useRef, useState } from 'preact/hooks';
import { message as t, send } from '../../shared/browser';
import { CaseList } from './case-list';
import { Detail } from './detail';
import { Filters } from './filters';
import { ImportExport } from './import-export';
import { EMPTY_FILTERS, toQuery, type FilterText } from './query';
import { Storage } from './storage';
import { followSystem, useSystem } from './system';
import { UndoList, useDeleted, type Deleted } from './undo';
import { useListing } from './use-listing';
import '../log.css';

/*
 * The case log, in the full-tab view (`index.html?view=log`): every stored case as a row, found by
 * search and filters, annotated, opened at a mark, exported, imported, deleted with an undo.
 * Its parts: the list (case-list.tsx, headlines worked out as rows come into view: headlines.ts),
 * the filters (filters.tsx), one case (detail.tsx, annotate.tsx), storage and quarantine
 * (storage.tsx), files in and out (import-export.tsx), undo (undo.tsx). What it shows follows the
 * background's notices (use-listing.ts, undo.tsx, system.ts), never storage itself.
 */

export { isLogRoute } from './route';

// marks for the benchmark's breakdown of the first render (test/bench/log.ts); cost nothing otherwise
performance.mark('log:module');

export function LogView() {
  const { data, loadError } = useListing();
  const [filters, setFilters] = useState<FilterText>(EMPTY_FILTERS);
  const [lastQuery, setLastQuery] = useState<LogQuery>(DEFAULT_QUERY);
  const [selectedId, setSelectedId] = useState<string | null>(null);
  const [focusDetail, setFocusDetail] = useState(false);
  const [deleted, setDeleted] = useDeleted();
  const [notice, setNotice] = useState('');
  const system = useSystem();

  useEffect(() => {
    document.body.classList.add('log-page');
    document.title = t('logTitle');
    return followSystem();
  }, []);

  // after a delete the focus goes to its Undo (the case's own buttons are gone with it)
  const focusUndo = useRef(false);
  useEffect(() => {
    if (!focusUndo.current) return;
    focusUndo.current = false;
    document.getElementById('log-undo-0')?.focus();
  }, [deleted]);

  const parsed = useMemo(() => toQuery(filters, new Date().getTimezoneOffset()), [filters]);
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
      <UndoList deleted={deleted} onUndo={(d) => void undo(d)} />
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

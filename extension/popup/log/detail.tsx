import { exportFileName, marksByTimestamp, marksCsv, openableUrl, shownTitle } from '../../../src/case';
import type { CaseListing, CaseRecord, MarkKind } from '../../../src/case';
import { useEffect, useRef, useState } from 'preact/hooks';
import { browser, extensionVersion, message as t, send } from '../../shared/browser';
import { FormField, valueOf } from '../../shared/form-field';
import { Annotate } from './annotate';
import { saveText } from '../download';
import { HeadlineCell } from './headline-cell';
import { currentSystem, useSystem } from './system';
import { day, stamp } from './text';

// in the file that reads it: the message table's test resolves keys from tables beside their call
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

/** One case: its figure, notes, marks by timestamp, and what can be done with it (open, export, delete). */
export function Detail({ c, focus, onDeleted, say }: { c: CaseListing; focus: boolean; onDeleted: (c: CaseListing) => void; say: (msg: string) => void }) {
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
      saveText(f.text, f.fileName);
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
      saveText(marksCsv([r]), name);
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
      const { analyseCase, summaryText } = await import('../../../src/case/deferred');
      const name = exportFileName([c.id], Date.now(), 'txt');
      saveText(summaryText(r, analyseCase(r), { format: 'text', system: currentSystem(), toolVersion: extensionVersion() }), name);
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

import { CASE_STATUSES, type CaseStatus } from '../../../src/case/schema';
import { DEFAULT_QUERY, parseDayRange, SORT_KEYS, type DateField, type LogQuery, type SortKey } from '../../../src/case/log';
import { message as t } from '../../shared/browser';
import { describedBy, FormField, valueOf } from '../../shared/form-field';
import { SORT_LABEL, statusWord } from './text';

/* Search and filters: what the user typed, and the query it makes. */

export interface FilterText {
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
export const EMPTY_FILTERS: FilterText = { text: '', statuses: [], tag: '', site: '', dateField: 'updatedAt', from: '', to: '', sort: 'updated', descending: true };

/** The typed filters as a query, or the field that is wrong and why (the last good query stays). */
export function toQuery(f: FilterText): { query: LogQuery } | { field: 'from' | 'to'; error: string } {
  try {
    const { from, to } = parseDayRange(f.from, f.to, new Date().getTimezoneOffset());
    return { query: { ...DEFAULT_QUERY, text: f.text, statuses: f.statuses, tag: f.tag || null, site: f.site || null, dateField: f.dateField, from, to, sort: f.sort, descending: f.descending } };
  } catch (e) {
    const msg = (e as Error).message;
    return { field: msg.startsWith('from date') ? 'from' : 'to', error: msg };
  }
}

export function Filters({ f, set, tags, sites, dateError }: { f: FilterText; set: (next: FilterText) => void; tags: string[]; sites: string[]; dateError: { field: 'from' | 'to'; error: string } | null }) {
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

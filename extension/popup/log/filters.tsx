import { CASE_STATUSES, SORT_KEYS } from '../../../src/case';
import type { CaseStatus, DateField, SortKey } from '../../../src/case';
import { message as t } from '../../shared/browser';
import { describedBy, FormField, valueOf } from '../../shared/form-field';
import { EMPTY_FILTERS, type DateError, type FilterText } from './query';
import { statusWord } from './text';

// in the file that reads it: the message table's test resolves keys from tables beside their call
const SORT_LABEL: Record<SortKey, string> = { updated: 'logSortUpdated', created: 'logSortCreated', title: 'logSortTitle', site: 'logSortSite', status: 'logSortStatus' };

/* Search and filters, as the user types them (query.ts makes the query). */

export function Filters({ f, set, tags, sites, dateError }: { f: FilterText; set: (next: FilterText) => void; tags: string[]; sites: string[]; dateError: DateError | null }) {
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

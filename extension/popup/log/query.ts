import { DEFAULT_QUERY, InputError, parseDayRange } from '../../../src/case';
import type { CaseStatus, DateField, LogQuery, SortKey } from '../../../src/case';

/* The filters as the user typed them, and the query they make (pure: test/extension/log-query.test.ts). */

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

export type DateError = { field: 'from' | 'to'; error: string };

/**
 * The typed filters as a query, or the date field that is wrong and why (the view keeps the last
 * good query meanwhile). `tzOffsetMinutes` as Date.getTimezoneOffset gives it: days are the user's.
 */
export function toQuery(f: FilterText, tzOffsetMinutes: number): { query: LogQuery } | DateError {
  try {
    const { from, to } = parseDayRange(f.from, f.to, tzOffsetMinutes);
    return { query: { ...DEFAULT_QUERY, text: f.text, statuses: f.statuses, tag: f.tag || null, site: f.site || null, dateField: f.dateField, from, to, sort: f.sort, descending: f.descending } };
  } catch (e) {
    const msg = (e as Error).message;
    return { field: e instanceof InputError && e.field === 'from date' ? 'from' : 'to', error: msg };
  }
}

import { describe, expect, it } from 'vitest';
import { EMPTY_FILTERS, toQuery } from '../../extension/popup/log/query';
import { DEFAULT_QUERY } from '../../src/case/log';

/*
 * The log's filters as typed, made into a query (extension/popup/log/query.ts). Calendar facts
 * from the Gregorian rules (a year divisible by 4 and not by 100, or by 400, is a leap year: 2024
 * is, 2026 is not); time zone offsets as Date.prototype.getTimezoneOffset gives them (ECMAScript
 * 2024, 21.4.4.11: minutes of UTC minus local time, so -60 at UTC+1).
 */

describe('toQuery', () => {
  it('no filters typed is the default query', () => {
    expect(toQuery(EMPTY_FILTERS, 0)).toEqual({ query: DEFAULT_QUERY });
  });

  it('days are the user’s: at UTC+1 a day runs from 23:00 UTC the evening before to 22:59:59.999 UTC', () => {
    const r = toQuery({ ...EMPTY_FILTERS, from: '2026-03-01', to: '2026-03-01' }, -60);
    if (!('query' in r)) throw new Error(r.error);
    expect(new Date(r.query.from!).toISOString()).toBe('2026-02-28T23:00:00.000Z');
    expect(new Date(r.query.to!).toISOString()).toBe('2026-03-01T22:59:59.999Z');
  });

  it('a day that does not exist is laid at the field that holds it, with the allowed form', () => {
    const from = toQuery({ ...EMPTY_FILTERS, from: '2026-02-29' }, 0);
    expect(from).toMatchObject({ field: 'from' });
    expect('error' in from && from.error).toMatch(/^from date: .*YYYY-MM-DD/);
    expect(toQuery({ ...EMPTY_FILTERS, to: '2026-02-29' }, 0)).toMatchObject({ field: 'to' });
    // 2024 is a leap year: its 29 February is a day
    expect(toQuery({ ...EMPTY_FILTERS, from: '2024-02-29' }, 0)).toHaveProperty('query');
  });

  it('a to date before the from date is the to field’s fault', () => {
    const r = toQuery({ ...EMPTY_FILTERS, from: '2026-03-02', to: '2026-03-01' }, 0);
    expect(r).toMatchObject({ field: 'to' });
    expect('error' in r && r.error).toMatch(/^to date: .*on or after the from date \(2026-03-02\)/);
  });

  it('an empty tag or site filter means any; the rest passes through', () => {
    const r = toQuery({ ...EMPTY_FILTERS, text: 'dusk', statuses: ['open'], tag: '', site: 'invented.example', sort: 'title', descending: false }, 0);
    expect(r).toEqual({ query: { ...DEFAULT_QUERY, text: 'dusk', statuses: ['open'], tag: null, site: 'invented.example', sort: 'title', descending: false } });
  });
});

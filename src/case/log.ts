import { InputError } from '../engine/errors';
import type { CaseListing } from './listing';
import { CASE_STATUSES, MAX_NOTES_CHARS, MAX_TAG_CHARS, MAX_TAGS, type CaseStatus, type Mark, type MarkKind } from './schema';

/*
 * The case log's arithmetic: search, filters, sort and which rows of a long list to draw. Pure, so
 * that it is tested without a DOM and the view stays a thin layer over it.
 */

export type SortKey = 'updated' | 'created' | 'title' | 'site' | 'status';
export const SORT_KEYS: readonly SortKey[] = ['updated', 'created', 'title', 'site', 'status'];

export type DateField = 'createdAt' | 'updatedAt';

export interface LogQuery {
  /** Words to find; every word must occur somewhere in the case (case-insensitive). */
  text: string;
  /** Statuses to keep; empty keeps every status. */
  statuses: readonly CaseStatus[];
  /** One tag the case must carry, or null for any. */
  tag: string | null;
  /** One site (host) the case must be on, or null for any. */
  site: string | null;
  /** Which date the range applies to. */
  dateField: DateField;
  /** Inclusive bounds, epoch milliseconds; null leaves that side open. */
  from: number | null;
  to: number | null;
  sort: SortKey;
  descending: boolean;
}

export const DEFAULT_QUERY: LogQuery = {
  text: '',
  statuses: [],
  tag: null,
  site: null,
  dateField: 'updatedAt',
  from: null,
  to: null,
  sort: 'updated',
  descending: true,
};

/** The words of a search, lower-cased; blank input gives none (and so matches everything). */
export function searchWords(text: string): string[] {
  return text.toLocaleLowerCase().split(/\s+/).filter((w) => w.length > 0);
}

/*
 * Each listing's searchable text is built once and kept beside the listing object: typing a letter
 * re-filters 1 000 cases, and joining six fields for each of them on every key would be most of it.
 * The listings are replaced whole when storage changes, so a stale entry cannot be found.
 */
const haystacks = new WeakMap<CaseListing, string>();

/** Everything search looks in, lower-cased, fields separated so a word cannot span two of them. */
export function haystack(c: CaseListing): string {
  let h = haystacks.get(c);
  if (h === undefined) {
    h = [c.pageTitle, c.pageUrl, c.site, c.notes, ...c.tags, ...c.markedBy].join('\n').toLocaleLowerCase();
    haystacks.set(c, h);
  }
  return h;
}

export function matchesWords(c: CaseListing, words: readonly string[]): boolean {
  if (words.length === 0) return true;
  const h = haystack(c);
  return words.every((w) => h.includes(w));
}

export function matchesQuery(c: CaseListing, q: LogQuery, words: readonly string[] = searchWords(q.text)): boolean {
  if (q.statuses.length > 0 && !q.statuses.includes(c.status)) return false;
  if (q.tag !== null && !c.tags.includes(q.tag)) return false;
  if (q.site !== null && c.site !== q.site) return false;
  const when = c[q.dateField];
  if (q.from !== null && when < q.from) return false;
  if (q.to !== null && when > q.to) return false;
  return matchesWords(c, words);
}

// titles compare as people read them: accents and case aside, "clip 2" before "clip 10"
const collator = new Intl.Collator('en', { sensitivity: 'base', numeric: true });

/** The title a case shows: its page title, or its address when the page had none. */
export const shownTitle = (c: CaseListing) => c.pageTitle.trim() || c.pageUrl;

function compareBy(key: SortKey): (a: CaseListing, b: CaseListing) => number {
  switch (key) {
    case 'updated':
      return (a, b) => a.updatedAt - b.updatedAt;
    case 'created':
      return (a, b) => a.createdAt - b.createdAt;
    case 'title':
      return (a, b) => collator.compare(shownTitle(a), shownTitle(b));
    case 'site':
      return (a, b) => collator.compare(a.site, b.site);
    case 'status':
      // in the order the statuses are listed (open first), not alphabetically
      return (a, b) => CASE_STATUSES.indexOf(a.status) - CASE_STATUSES.indexOf(b.status);
  }
}

/**
 * A sorted copy. Stable in both directions: cases that tie keep the order they came in, also when
 * descending (reversing a sorted list would flip the ties, and rows would jump on every toggle).
 */
export function sortCases(cases: readonly CaseListing[], key: SortKey, descending: boolean): CaseListing[] {
  if (!SORT_KEYS.includes(key)) throw new InputError('sort', key, SORT_KEYS.join(', '));
  const cmp = compareBy(key);
  return cases.slice().sort(descending ? (a, b) => cmp(b, a) : cmp);
}

/** The cases a query keeps, in its order. */
export function applyQuery(cases: readonly CaseListing[], q: LogQuery): CaseListing[] {
  const words = searchWords(q.text);
  return sortCases(
    cases.filter((c) => matchesQuery(c, q, words)),
    q.sort,
    q.descending,
  );
}

/** Values a filter can offer, sorted, each once. */
export function distinctTags(cases: readonly CaseListing[]): string[] {
  return [...new Set(cases.flatMap((c) => c.tags))].sort(collator.compare);
}
export function distinctSites(cases: readonly CaseListing[]): string[] {
  return [...new Set(cases.map((c) => c.site).filter((s) => s !== ''))].sort(collator.compare);
}

const DAY_MS = 86_400_000;

/**
 * A day typed in a date field (YYYY-MM-DD, what a date input gives) as the epoch milliseconds of
 * its first (`end` false) or last (`end` true) millisecond in the user's time zone.
 * `tzOffsetMinutes` is Date#getTimezoneOffset() (minutes to add to local time to get UTC), passed
 * in so the function stays pure. Blank gives null: that side of the range is open.
 */
export function parseDay(text: string, field: string, end: boolean, tzOffsetMinutes: number): number | null {
  const s = text.trim();
  if (s === '') return null;
  const allowed = 'a date as YYYY-MM-DD, from 1970-01-01 to 9999-12-31, or empty';
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s);
  if (!m) throw new InputError(field, text, allowed);
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = Number(m[3]);
  const utc = Date.UTC(y, mo - 1, d);
  const back = new Date(utc);
  // Date.UTC rolls 2026-02-30 over to March: a day that does not exist comes back changed
  if (y < 1970 || back.getUTCFullYear() !== y || back.getUTCMonth() !== mo - 1 || back.getUTCDate() !== d) throw new InputError(field, text, allowed);
  const start = utc + tzOffsetMinutes * 60_000;
  return end ? start + DAY_MS - 1 : start;
}

/** A from/to pair read together: the end may not come before the start. */
export function parseDayRange(fromText: string, toText: string, tzOffsetMinutes: number): { from: number | null; to: number | null } {
  const from = parseDay(fromText, 'from date', false, tzOffsetMinutes);
  const to = parseDay(toText, 'to date', true, tzOffsetMinutes);
  if (from !== null && to !== null && to < from) throw new InputError('to date', toText, `a day on or after the from date (${fromText.trim()}), or empty`);
  return { from, to };
}

/**
 * Tags as typed: separated by commas, trimmed, blanks dropped, each once (the first spelling kept,
 * compared without case so "Night" and "night" do not become two filters).
 */
export function parseTags(text: string): string[] {
  const out: string[] = [];
  const seen = new Set<string>();
  for (const raw of text.split(',')) {
    const tag = raw.trim().replace(/\s+/g, ' ');
    if (tag === '') continue;
    if (tag.length > MAX_TAG_CHARS) throw new InputError('tags', tag, `tags of 1 to ${MAX_TAG_CHARS} characters, separated by commas`);
    const key = tag.toLocaleLowerCase();
    if (seen.has(key)) continue;
    seen.add(key);
    out.push(tag);
  }
  if (out.length > MAX_TAGS) throw new InputError('tags', `${out.length} tags`, `at most ${MAX_TAGS} tags`);
  return out;
}

/** Notes as typed, checked against the stored limit before they are sent. */
export function checkNotes(text: string): string {
  if (text.length > MAX_NOTES_CHARS) throw new InputError('notes', `${text.length} characters`, `at most ${MAX_NOTES_CHARS} characters`);
  return text;
}

export interface WindowInput {
  /** Every row's height, CSS pixels (the list draws rows of one height). */
  rowHeight: number;
  viewportHeight: number;
  scrollTop: number;
  count: number;
  /** Extra rows drawn above and below the viewport so a quick scroll does not show a gap. */
  overscan: number;
}

export interface RowWindow {
  /** First row to draw, and one past the last. */
  start: number;
  end: number;
  /** Where the first drawn row sits, and how tall the whole list is, CSS pixels. */
  offsetTop: number;
  totalHeight: number;
}

function nonNegative(field: string, v: number, integer = false): void {
  if (typeof v !== 'number' || !Number.isFinite(v) || v < 0 || (integer && !Number.isInteger(v))) {
    throw new InputError(field, v, integer ? 'a whole number, 0 or more' : 'a finite number, 0 or more');
  }
}

/**
 * Which rows of a virtual list to draw: those that meet the viewport, plus `overscan` on each side,
 * clamped to the list. A scroll position past the end (the list just shrank under a filter) is
 * treated as the end, so the last rows are drawn rather than none.
 */
export function visibleRows(w: WindowInput): RowWindow {
  nonNegative('row height', w.rowHeight);
  if (w.rowHeight === 0) throw new InputError('row height', 0, 'a finite number above 0');
  nonNegative('viewport height', w.viewportHeight);
  nonNegative('scroll top', w.scrollTop);
  nonNegative('row count', w.count, true);
  nonNegative('overscan', w.overscan, true);
  const totalHeight = w.count * w.rowHeight;
  const maxScroll = Math.max(0, totalHeight - w.viewportHeight);
  const top = Math.min(w.scrollTop, maxScroll);
  const first = Math.floor(top / w.rowHeight);
  // the row whose top edge is exactly at the viewport's bottom edge is not seen
  const lastSeen = Math.ceil((top + w.viewportHeight) / w.rowHeight);
  const start = Math.max(0, first - w.overscan);
  const end = Math.min(w.count, Math.max(lastSeen, first + 1) + w.overscan);
  return { start: Math.min(start, end), end, offsetTop: Math.min(start, end) * w.rowHeight, totalHeight };
}

const OPENABLE = ['http:', 'https:', 'file:'];

/**
 * The page address of a case, checked before the log opens it in a tab. A case may come from an
 * imported file, so its address is not trusted: only web and file pages open, never a script,
 * data or extension address.
 */
export function openableUrl(pageUrl: string): string {
  let u: URL;
  try {
    u = new URL(pageUrl);
  } catch {
    throw new InputError('page address', pageUrl, 'an absolute http, https or file address');
  }
  if (!OPENABLE.includes(u.protocol)) throw new InputError('page address', pageUrl, 'an absolute http, https or file address');
  return u.href;
}

/** The key a computed headline is kept under: a saved edit changes updatedAt, so it is recomputed. */
export const headlineKey = (id: string, updatedAt: number) => `${id}@${updatedAt}`;

/**
 * A small least-recently-used store of computed values. The log keeps headlines for the rows the
 * user has scrolled past, so scrolling back does not run the engine again, but not for all 1 000.
 */
export class LruCache<V> {
  private readonly map = new Map<string, V>();
  constructor(readonly capacity: number) {
    if (!Number.isInteger(capacity) || capacity < 1) throw new InputError('cache capacity', capacity, 'a whole number, 1 or more');
  }
  get(key: string): V | undefined {
    const v = this.map.get(key);
    if (v !== undefined) {
      // a Map iterates in insertion order: re-inserting makes this the most recent
      this.map.delete(key);
      this.map.set(key, v);
    }
    return v;
  }
  set(key: string, v: V): void {
    this.map.delete(key);
    this.map.set(key, v);
    while (this.map.size > this.capacity) this.map.delete(this.map.keys().next().value!);
  }
  get size(): number {
    return this.map.size;
  }
  has(key: string): boolean {
    return this.map.has(key);
  }
}

export interface TimestampMarks {
  t: number;
  /** What was marked at this timestamp, each kind once, in the order first marked. */
  kinds: MarkKind[];
  /** Names given by whoever marked here, each once; empty when nobody named themselves. */
  by: string[];
}

/** Who marked what at each timestamp, ascending in time (the case view's "marked by" table). */
export function marksByTimestamp(marks: readonly Mark[]): TimestampMarks[] {
  const rows = new Map<number, TimestampMarks>();
  for (const m of marks) {
    let row = rows.get(m.t);
    if (!row) rows.set(m.t, (row = { t: m.t, kinds: [], by: [] }));
    if (!row.kinds.includes(m.kind)) row.kinds.push(m.kind);
    const name = m.by?.trim();
    if (name && !row.by.includes(name)) row.by.push(name);
  }
  return [...rows.values()].sort((a, b) => a.t - b.t);
}

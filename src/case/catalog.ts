import type { CaseListing } from './listing';
import type { CaseRecord } from './schema';

/** The page address's host, for the log's site filter ('' for an address without one). */
export function siteOf(pageUrl: string): string {
  try {
    return new URL(pageUrl).host;
  } catch {
    return '';
  }
}

/** A validated case as one line of the log: everything the list shows and searches, without the marks. */
export function listingOf(c: CaseRecord): CaseListing {
  const timestamps = [...new Set(c.marks.map((m) => m.t))].sort((a, b) => a - b);
  const markedBy = [...new Set(c.marks.flatMap((m) => (m.by ? [m.by] : [])))];
  return {
    id: c.id,
    pageUrl: c.video.pageUrl,
    pageTitle: c.video.pageTitle,
    site: siteOf(c.video.pageUrl),
    createdAt: c.createdAt,
    updatedAt: c.updatedAt,
    status: c.status,
    tags: [...c.tags],
    notes: c.notes,
    markCount: c.marks.length,
    timestamps,
    markedBy,
    historyCount: c.history.length,
  };
}

import { MAX_HISTORY, type CaseRecord, type CaseVersion } from './schema';
import { CaseFormatError } from './format-error';

/*
 * Import and export, the pure part: how a validated file merges into what is stored, and what an
 * exported file is called. The background reads the stored records, calls planImport, checks the
 * quota and writes every changed case in one storage call; a file that fails anywhere changes
 * nothing (parseCaseFileAll validates it whole first).
 */

/** A record's content as canonical JSON (keys sorted), without its history: equal content, equal text. */
export function contentKey(c: CaseRecord | CaseVersion): string {
  const { history: _h, keptAt: _k, ...body } = c as CaseRecord & { keptAt?: number };
  return canonical(body);
}

function canonical(x: unknown): string {
  if (Array.isArray(x)) return `[${x.map(canonical).join(',')}]`;
  if (typeof x === 'object' && x !== null) {
    // own keys only, read as data: a "__proto__" key in a file stays a plain key
    const keys = Object.keys(x).sort();
    return `{${keys
      .filter((k) => (x as Record<string, unknown>)[k] !== undefined)
      .map((k) => `${JSON.stringify(k)}:${canonical((x as Record<string, unknown>)[k])}`)
      .join(',')}}`;
  }
  return JSON.stringify(x) ?? 'null';
}

function asVersion(c: CaseRecord | CaseVersion, keptAt: number): CaseVersion {
  const { history: _h, keptAt: k, ...body } = c as CaseRecord & { keptAt?: number };
  return { ...body, keptAt: k ?? keptAt };
}

/**
 * Merges an incoming record into the stored one of the same id. Nothing is lost: the newer by
 * updatedAt stays in front (on a tie, the stored one: an import never silently replaces what the
 * user sees), the other goes into history, and both sides' histories are kept. A version whose
 * content equals the front record or another version is not repeated. History is ordered newest
 * first (by updatedAt, then by when it was kept). More than MAX_HISTORY versions is refused, not
 * trimmed. Returns the stored record itself when the import adds nothing.
 */
export function mergeCase(stored: CaseRecord, incoming: CaseRecord, now: number): CaseRecord {
  if (stored.id !== incoming.id) throw new Error(`merge: ids differ (${stored.id}, ${incoming.id})`);
  const incomingNewer = incoming.updatedAt > stored.updatedAt;
  const front = incomingNewer ? incoming : stored;
  const back = incomingNewer ? stored : incoming;
  const frontKey = contentKey(front);
  const seen = new Set<string>([frontKey]);
  const versions: CaseVersion[] = [];
  // versions already kept come first, so one seen again keeps its first keptAt
  for (const v of [...front.history, asVersion(back, now), ...back.history]) {
    const k = contentKey(v);
    if (seen.has(k)) continue;
    seen.add(k);
    versions.push(v);
  }
  versions.sort((a, b) => b.updatedAt - a.updatedAt || b.keptAt - a.keptAt);
  if (versions.length > MAX_HISTORY) {
    throw new CaseFormatError(
      `case ${stored.id}.history`,
      `the import would keep ${versions.length} earlier versions of this case, more than the ${MAX_HISTORY} a case holds; nothing was imported`,
    );
  }
  const unchanged = front === stored && versions.length === stored.history.length && versions.every((v, i) => contentKey(v) === contentKey(stored.history[i]!) && v.keptAt === stored.history[i]!.keptAt);
  return unchanged ? stored : { ...front, history: versions };
}

export interface ImportPlan {
  /** Records to write (new or changed), one per id. */
  writes: CaseRecord[];
  /** Ids that were not stored before. */
  added: string[];
  /** Ids that were stored before (merged, whether or not anything changed). */
  merged: string[];
}

/**
 * What importing these validated records into the stored ones does. Several records of one id in
 * a file merge in turn. Pure: the caller writes `writes` (all or nothing) and changes nothing else.
 */
export function planImport(stored: ReadonlyMap<string, CaseRecord>, incoming: readonly CaseRecord[], now: number): ImportPlan {
  const next = new Map<string, CaseRecord>();
  const added: string[] = [];
  const merged: string[] = [];
  for (const c of incoming) {
    const before = next.get(c.id) ?? stored.get(c.id);
    if (!before) {
      // merged with itself: a file's history comes in ordered and without repeats, like any other
      next.set(c.id, mergeCase(c, c, now));
      added.push(c.id);
      continue;
    }
    next.set(c.id, mergeCase(before, c, now));
    if (!added.includes(c.id) && !merged.includes(c.id)) merged.push(c.id);
  }
  const writes = [...next.values()].filter((c) => c !== stored.get(c.id));
  return { writes, added, merged };
}

/** `2026-12-02` for an instant (UTC, so a file's name does not depend on where it was made). */
export function isoDate(t: number): string {
  return new Date(t).toISOString().slice(0, 10);
}

/**
 * Names of exported files, by case and date: `clip-caliper-<first 8 of the id>-<yyyy-mm-dd>.json`
 * for one case, `clip-caliper-<n>-cases-<yyyy-mm-dd>.json` for several. Ids are hex or our own
 * characters; anything else is replaced so the name is safe on every file system.
 */
export function exportFileName(caseIds: readonly string[], now: number, ext: 'json' | 'csv' | 'txt' = 'json'): string {
  const date = isoDate(now);
  if (caseIds.length === 1) return `clip-caliper-${caseIds[0]!.slice(0, 8).replace(/[^A-Za-z0-9-]/g, '_')}-${date}.${ext}`;
  return `clip-caliper-${caseIds.length}-cases-${date}.${ext}`;
}

import type { Page } from 'playwright-core';
import { newCase, upsertMark, withAnnotation } from '../../src/case/marks';
import { CASE_STATUSES, caseKey, type CaseRecord, type Mark } from '../../src/case/schema';

/*
 * Many invented cases for the case log's browser tests and its benchmark, built with the case
 * model's own functions (newCase, upsertMark, withAnnotation) so they have the real stored shape.
 * Every title, address and name here is made up; addresses use the reserved .test domain (RFC 2606).
 */

export const SEED_WORDS = ['ridge', 'harbour', 'motorway', 'meadow', 'viaduct', 'quarry', 'orchard', 'dune'] as const;
export const SEED_SITES = ['clips-a.example.test', 'clips-b.example.test', 'clips-c.example.test'] as const;
export const SEED_TAGS = ['night', 'hover', 'backwards', 'slow pass'] as const;
export const SEED_NAMES = ['Moderator Kestrel', 'Reviewer Wren'] as const;
/** The first case's creation time: 2026-01-01T00:00:00Z; each next case one hour later. */
export const SEED_START = Date.UTC(2026, 0, 1);
export const HOUR = 3_600_000;

const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };
function span(id: string, t: number, x1: number, x2: number, by?: string): Mark {
  return { id, kind: 'object-span', t, points: [{ x: x1, y: 150 }, { x: x2, y: 150 }], edgeSigmaPx: 0.5, mapping, createdAt: SEED_START, ...(by ? { by } : {}) };
}

/**
 * Case i: word i % 8 in its title, site i % 3, status i % 3, tag i % 4 (none when i % 5 == 0), one
 * object span on every third case (so those have a headline), marked by a name on every sixth.
 */
export function seedCase(i: number, pageUrl?: string): CaseRecord {
  const word = SEED_WORDS[i % SEED_WORDS.length]!;
  const site = SEED_SITES[i % SEED_SITES.length]!;
  const n = String(i).padStart(4, '0');
  const created = SEED_START + i * HOUR;
  let c = newCase(`seed${n}`, { pageUrl: pageUrl ?? `https://${site}/watch/${n}`, pageTitle: `Invented clip ${n} over the ${word}`, src: '', width: 640, height: 360, duration: 3.2 }, '0.1.0', created);
  if (i % 3 === 0) c = upsertMark(c, span(`m${n}`, 0.5 + (i % 7) * 0.25, 300, 340, i % 6 === 0 ? SEED_NAMES[(i / 6) % 2]! : undefined), created);
  c = withAnnotation(c, { status: CASE_STATUSES[i % CASE_STATUSES.length]!, tags: i % 5 === 0 ? [] : [SEED_TAGS[i % SEED_TAGS.length]!], notes: `Invented note for case ${n}.` }, created + 1000);
  return c;
}

export function seedCases(count: number): CaseRecord[] {
  return Array.from({ length: count }, (_, i) => seedCase(i));
}

/** Writes records straight into the extension's local storage from one of its pages, one key per case. */
export async function writeCases(extensionPage: Page, cases: CaseRecord[]): Promise<void> {
  const items = Object.fromEntries(cases.map((c) => [caseKey(c.id), c]));
  await extensionPage.evaluate((all) => chrome.storage.local.set(all), items);
}

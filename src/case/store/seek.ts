import { stripFragment } from '../ids';
import { dueSeek, SEEK_PREFIX } from '../store-policy';
import { CaseFormatError } from '../validate';
import { getOne, type StoreCore } from './core';

/*
 * Seeking from the log: the seek waits in the session area, keyed by page address, so it outlives
 * the worker but not the browser, and waits SEEK_WAIT_MS at most (store-policy.ts dueSeek).
 */
const seekKey = (pageUrl: string) => `${SEEK_PREFIX}${stripFragment(pageUrl)}`;

function checkPageUrl(pageUrl: unknown): string {
  if (typeof pageUrl !== 'string' || pageUrl.length > 8192) throw new CaseFormatError('pageUrl', 'expected a page address of at most 8192 characters');
  return pageUrl;
}

export async function requestSeek(core: StoreCore, pageUrl: unknown, t: unknown): Promise<Record<string, never>> {
  const url = checkPageUrl(pageUrl);
  if (typeof t !== 'number' || !Number.isFinite(t) || t < 0 || t > 1e7) throw new CaseFormatError('t', `expected seconds from 0 to 10000000, got ${String(t)}`);
  await core.session.set({ [seekKey(url)]: { t, requestedAt: core.now() } });
  return {};
}

export async function takeSeek(core: StoreCore, pageUrl: unknown): Promise<{ t: number | null }> {
  const key = seekKey(checkPageUrl(pageUrl));
  const got = await getOne(core.session, key);
  if (got === undefined) return { t: null };
  await core.session.remove([key]);
  return { t: dueSeek(got, core.now()) };
}

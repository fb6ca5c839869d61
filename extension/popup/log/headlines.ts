import { headlineKey, LruCache } from '../../../src/case';
import type { CaseListing, Headline, UnitSystem } from '../../../src/case';
import { message as t, send } from '../../shared/browser';

/*
 * The rows' headline figures: computed only for rows in view, one at a time, cached by case id and
 * saved version. The one store of them lives as long as the log's page (the engine runs once per
 * case and version, however often a row scrolls in and out).
 */

/** Headlines kept for rows scrolled past. */
const HEADLINE_CACHE = 300;

export type HeadlineState = { headline: Headline | null; text: (system: UnitSystem) => string } | { error: string };

/*
 * The figure needs the engine and the unit formatter (mathjs), which the list does not: they are
 * loaded with the first headline, so they are not part of what the log evaluates before its rows.
 */
type HeadlineModule = typeof import('../../../src/case/deferred');

class HeadlineStore {
  private module: Promise<HeadlineModule> | null = null;
  private readonly done = new LruCache<HeadlineState>(HEADLINE_CACHE);
  private queue: Promise<void> = Promise.resolve();

  private load(): Promise<HeadlineModule> {
    return (this.module ??= import('../../../src/case/deferred'));
  }

  /** The headline already worked out for this version of the case, if any. */
  cached(c: CaseListing): HeadlineState | undefined {
    return this.done.get(headlineKey(c.id, c.updatedAt));
  }

  /**
   * The engine runs on the page's thread, so jobs run one after another with a yield between them:
   * a fast scroll queues the rows it passes, and a row scrolled away before its turn is skipped.
   */
  request(c: CaseListing, wanted: () => boolean): Promise<HeadlineState> {
    const key = headlineKey(c.id, c.updatedAt);
    const hit = this.done.get(key);
    if (hit) return Promise.resolve(hit);
    const job = this.queue.then(async (): Promise<HeadlineState | null> => {
      const cached = this.done.get(key);
      if (cached) return cached;
      if (!wanted()) return null;
      await new Promise((ok) => setTimeout(ok, 0));
      let state: HeadlineState;
      try {
        const [record, m] = await Promise.all([send('case/get', { caseId: c.id }), this.load()]);
        if (record) {
          const headline = m.caseHeadline(record);
          const text = (system: UnitSystem) => {
            try {
              return m.headlineText(headline, system, t('logNotEnoughMarks'));
            } catch (e) {
              // a figure that cannot be formatted is reported in its row, not allowed to break the list
              return t('logHeadlineFailed', (e as Error).message);
            }
          };
          state = { headline, text };
        } else state = { error: t('logHeadlineGone') };
      } catch (e) {
        state = { error: (e as Error).message };
      }
      this.done.set(key, state);
      return state;
    });
    this.queue = job.then(
      () => undefined,
      () => undefined,
    );
    return job.then((s) => s ?? { error: '' });
  }
}

export const headlines = new HeadlineStore();

import type { CaseListing, UnitSystem } from '../../../src/case';
import { useEffect, useState } from 'preact/hooks';
import { message as t } from '../../shared/browser';
import { headlines, type HeadlineState } from './headlines';

/** A case's headline figure, worked out when its row comes into view (headlines.ts). */
export function HeadlineCell({ c, system }: { c: CaseListing; system: UnitSystem }) {
  const [state, setState] = useState<HeadlineState | null>(() => headlines.cached(c) ?? null);
  useEffect(() => {
    let live = true;
    const cached = headlines.cached(c);
    setState(cached ?? null);
    if (!cached && c.markCount > 0) void headlines.request(c, () => live).then((s) => live && setState(s));
    return () => {
      live = false;
    };
  }, [c.id, c.updatedAt, c.markCount]);
  if (c.markCount === 0) return <span class="muted">{t('logNotEnoughMarks')}</span>;
  if (!state) return <span class="muted">{t('logHeadlineWorking')}</span>;
  if ('error' in state) return <span class="muted">{state.error ? t('logHeadlineFailed', state.error) : t('logHeadlineWorking')}</span>;
  return <span data-testid="headline">{state.text(system)}</span>;
}

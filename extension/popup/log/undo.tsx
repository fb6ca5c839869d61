import { useEffect, useState } from 'preact/hooks';
import { message as t, send } from '../../shared/browser';
import { subscribe } from '../../shared/subscribe';

/** A deleted case this tab offers to bring back. */
export interface Deleted {
  id: string;
  title: string;
}

/**
 * What can still be undone: what the background kept (until the browser closes), whichever tab
 * deleted it; followed as the background announces deletes and restores.
 */
export function useDeleted(): [Deleted[], (update: (list: Deleted[]) => Deleted[]) => void] {
  const [deleted, setDeleted] = useState<Deleted[]>([]);
  useEffect(() => {
    const refresh = () =>
      send('cases/deleted', {}).then(
        (r) => setDeleted(r.cases.map((d) => ({ id: d.id, title: d.title || d.id }))),
        () => undefined,
      );
    const stop = new AbortController();
    void refresh();
    subscribe('deleted/changed', () => void refresh(), stop.signal);
    return () => stop.abort();
  }, []);
  return [deleted, setDeleted];
}

/** The deleted cases, each with its Undo (the first is `log-undo-0`, where the focus goes after a delete). */
export function UndoList({ deleted, onUndo }: { deleted: Deleted[]; onUndo: (d: Deleted) => void }) {
  if (deleted.length === 0) return null;
  return (
    <section class="log-undo" aria-label={t('logUndoLabel')}>
      <ul>
        {deleted.map((d, i) => (
          <li>
            {t('logDeletedItem', d.title)}{' '}
            <button type="button" class="secondary" id={`log-undo-${i}`} data-testid="log-undo" onClick={() => onUndo(d)}>
              {t('logUndo')}
            </button>
          </li>
        ))}
      </ul>
    </section>
  );
}

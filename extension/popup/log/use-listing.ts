import type { CaseListing, QuarantineEntry, StorageUsage } from '../../../src/case';
import { useEffect, useState } from 'preact/hooks';
import { message as t, send } from '../../shared/browser';
import { subscribe } from '../../shared/subscribe';
import { isLogRoute } from './route';

export type Listed = { cases: CaseListing[]; quarantined: QuarantineEntry[]; usage: StorageUsage };

/*
 * The listing is most of the wait before the first rows: on the log's own route it is asked for
 * as soon as this module runs, not after the first (empty) render has been painted. The first
 * listing the view takes is this one.
 */
let early: Promise<Listed> | null = isLogRoute() ? send('cases/list', {}) : null;

function list(): Promise<Listed> {
  const p = early ?? send('cases/list', {});
  early = null;
  return p;
}

/** Saves arrive one key at a time (an import writes many): the changes of this long make one new listing. */
const GATHER_MS = 150;

/** Every stored case as a listing, with the quarantine and the storage in use; listed again as the background announces changes. */
export function useListing(): { data: Listed | null; loadError: string | null } {
  const [data, setData] = useState<Listed | null>(null);
  const [loadError, setLoadError] = useState<string | null>(null);
  useEffect(() => {
    let timer = 0;
    const load = () =>
      list().then(
        (r) => {
          // for the benchmark's breakdown of the first render (test/bench/log.ts); costs nothing otherwise
          performance.mark('log:listed');
          setData(r);
          setLoadError(null);
        },
        (e: Error) => setLoadError(t('logLoadFailed', e.message)),
      );
    const soon = () => {
      clearTimeout(timer);
      timer = window.setTimeout(() => void load(), GATHER_MS);
    };
    const stop = new AbortController();
    void load();
    subscribe('cases/changed', soon, stop.signal);
    subscribe('quarantine/changed', soon, stop.signal);
    return () => {
      stop.abort();
      clearTimeout(timer);
    };
  }, []);
  return { data, loadError };
}

import type { CaseStatus, MarkKind } from '../../../src/case/schema';
import type { SortKey } from '../../../src/case/log';
import { message as t } from '../../shared/browser';

/* The log's words and formats for values: status and kind names, dates, timestamps, sizes. */

const STATUS_KEY: Record<CaseStatus, string> = { open: 'logStatusOpen', explained: 'logStatusExplained', 'second-look': 'logStatusSecondLook' };
export const SORT_LABEL: Record<SortKey, string> = { updated: 'logSortUpdated', created: 'logSortCreated', title: 'logSortTitle', site: 'logSortSite', status: 'logSortStatus' };
export const statusWord = (s: CaseStatus) => t(STATUS_KEY[s]);
export const KIND_KEY: Record<MarkKind, string> = {
  'object-span': 'logKindObject',
  'landmark-span': 'logKindLandmark',
  'frame-edges': 'logKindEdges',
  'lane-dash': 'logKindLane',
  'object-centre': 'logKindCentre',
  'frame-top-bottom': 'logKindEdges',
  horizon: 'logKindHorizon',
  'road-ahead': 'logKindRoadAhead',
};

const when = new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'short' });
export const day = (ms: number) => when.format(new Date(ms));

/** mm:ss.sss, as the case view and summary show a timestamp. */
export function stamp(s: number): string {
  const m = Math.floor(s / 60);
  return `${m}:${(s - 60 * m).toFixed(3).padStart(6, '0')}`;
}

export function kb(bytes: number): string {
  return bytes >= 1024 * 1024 ? `${(bytes / 1024 / 1024).toFixed(1)} MB` : `${Math.ceil(bytes / 1024)} KB`;
}

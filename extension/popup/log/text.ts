import type { CaseStatus } from '../../../src/case';
import { message as t } from '../../shared/browser';

/* The log's words and formats for values: status names, dates, timestamps, sizes. */

const STATUS_KEY: Record<CaseStatus, string> = { open: 'logStatusOpen', explained: 'logStatusExplained', 'second-look': 'logStatusSecondLook' };
export const statusWord = (s: CaseStatus) => t(STATUS_KEY[s]);

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

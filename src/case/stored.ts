import { readCaseRecord } from './migrate';
import { caseKey, type CaseRecord } from './schema';
import { CASE_PREFIX } from './store-policy';
import { CaseFormatError } from './format-error';

/**
 * Reads a record as stored under `key`: migrated and validated (readCaseRecord), and kept under
 * its own id's key. Every edit, delete and quarantine finds a case by `case:<id>`, so a record
 * whose key names another id would be listed yet could be neither changed nor set aside, and it
 * would shadow the case whose id it carries. Such a record fails here, and is quarantined like any
 * other unreadable one, with this reason.
 */
export function readStoredCase(key: string, raw: unknown): CaseRecord {
  const c = readCaseRecord(raw);
  if (key !== caseKey(c.id)) {
    const keyId = key.startsWith(CASE_PREFIX) ? key.slice(CASE_PREFIX.length) : key;
    throw new CaseFormatError('case.id', `expected ${JSON.stringify(keyId)}, the id its storage key ${JSON.stringify(key)} names, got ${JSON.stringify(c.id)}`);
  }
  return c;
}

import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { readCaseRecord } from '../../src/case/migrate';
import { caseKey } from '../../src/case/schema';
import { quarantineEntry, quarantineKeyFor, quarantineRecord } from '../../src/case/store-policy';
import { readStoredCase } from '../../src/case/stored';
import { failure } from './expect-format-error';

/*
 * A stored record must sit under its own id's key (`case:<id>`, schema.ts caseKey): every edit,
 * delete and quarantine finds a case by that key. One under another key was listed in the log
 * yet could be neither edited, deleted nor set aside.
 */
const v2 = () => JSON.parse(readFileSync('test/case/fixtures/v2/logged-case.json', 'utf8')) as Record<string, unknown>;
const ID = '5d2c8e0a41b7f936'; // the fixture's id

describe('readStoredCase: a record under its own key', () => {
  it('reads a record stored under case:<its id> as readCaseRecord does', () => {
    expect(readStoredCase(caseKey(ID), v2())).toStrictEqual(readCaseRecord(v2()));
  });

  it.each([['case:0000000000000000'], ['case:'], [`case:${ID} `], ['other:5d2c8e0a41b7f936']])('refuses it under %j, naming case.id, its key and its id', (key) => {
    const e = failure(() => readStoredCase(key, v2()));
    expect(e.path).toBe('case.id');
    expect(e.message).toContain(JSON.stringify(key));
    expect(e.message).toContain(`got "${ID}"`);
  });

  it('a record that is bad in itself is refused for that first (the first bad field is named)', () => {
    expect(failure(() => readStoredCase('case:another', { ...v2(), notes: 5 })).path).toBe('case.notes');
  });

  it('the reason is what the quarantine keeps and the log shows', () => {
    const key = 'case:0000000000000000';
    const raw = v2();
    const e = failure(() => readStoredCase(key, raw));
    const entry = quarantineEntry(quarantineKeyFor(key), quarantineRecord(key, raw, e, 123));
    expect(entry).toEqual({ key, quarantineKey: `quarantine:${key}`, reason: e.message, quarantinedAt: 123 });
    expect(entry.reason).toMatch(/^case\.id: expected "0000000000000000", the id its storage key "case:0000000000000000" names, got "5d2c8e0a41b7f936"$/);
  });
});

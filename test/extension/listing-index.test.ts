import { beforeEach, describe, expect, it } from 'vitest';
import { applyChange, currentGeneration, drop, indexed, rebuild } from '../../extension/background/listing-index';
import { listingOf } from '../../src/case/catalog';
import { newCase } from '../../src/case/marks';
import { quarantineRecord } from '../../src/case/store-policy';

// invented cases on an invented page
const video = { pageUrl: 'http://127.0.0.1/invented', pageTitle: 'Invented clip', src: '', width: 640, height: 360, duration: 3 };
const record = (id: string, at = 1) => newCase(id, video, '0.1.0', at);

describe('the case log index', () => {
  beforeEach(() => drop());

  it('stays empty until a full read is kept, so the first listing reads everything', () => {
    expect(indexed()).toBeNull();
    applyChange('case:a', record('a'));
    expect(indexed()).toBeNull();
  });

  it('follows writes and removals once built, validating each value as it arrives', () => {
    rebuild([listingOf(record('a'))], [], currentGeneration());
    applyChange('case:b', record('b', 5));
    applyChange('case:a', { ...record('a', 7), notes: 'looked again' });
    expect(indexed()!.cases.map((c) => [c.id, c.notes]).sort()).toEqual([
      ['a', 'looked again'],
      ['b', ''],
    ]);
    applyChange('case:b', undefined);
    expect(indexed()!.cases.map((c) => c.id)).toEqual(['a']);
    // keys that are not cases or quarantine (settings, say) leave it alone
    applyChange('settings', { system: 'metric' });
    expect(indexed()!.cases).toHaveLength(1);
  });

  it('drops itself when a value fails validation, so the next listing quarantines and reports it', () => {
    rebuild([listingOf(record('a'))], [], currentGeneration());
    applyChange('case:b', { ...record('b'), status: 'closed-forever' });
    expect(indexed()).toBeNull();
  });

  it('drops itself when a record arrives under another id\'s key: it would be listed yet not editable, so the full read quarantines it', () => {
    rebuild([listingOf(record('a'))], [], currentGeneration());
    applyChange('case:b', record('a', 5));
    expect(indexed()).toBeNull();
  });

  it('tracks quarantine entries', () => {
    rebuild([], [], currentGeneration());
    applyChange('quarantine:case:x', quarantineRecord('case:x', { junk: true }, new Error('bad'), 9));
    expect(indexed()!.quarantined.map((q) => q.key)).toEqual(['case:x']);
    applyChange('quarantine:case:x', undefined);
    expect(indexed()!.quarantined).toEqual([]);
  });

  it('does not keep a full read that changes overtook (it may miss them)', () => {
    const since = currentGeneration();
    applyChange('case:late', record('late'));
    rebuild([listingOf(record('a'))], [], since);
    expect(indexed()).toBeNull();
  });
});

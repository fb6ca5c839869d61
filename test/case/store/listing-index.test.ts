import { beforeEach, describe, expect, it } from 'vitest';
import { listingOf } from '../../../src/case/catalog';
import { newCase } from '../../../src/case/marks';
import { quarantineRecord } from '../../../src/case/store-policy';
import { ListingIndex } from '../../../src/case/store/listing-index';

// invented cases on an invented page
const video = { pageUrl: 'http://127.0.0.1/invented', pageTitle: 'Invented clip', src: '', width: 640, height: 360, duration: 3 };
const record = (id: string, at = 1) => newCase(id, video, '0.1.0', at);

describe('the case log index', () => {
  let index: ListingIndex;
  beforeEach(() => {
    index = new ListingIndex();
  });

  it('stays empty until a full read is kept, so the first listing reads everything', () => {
    expect(index.indexed()).toBeNull();
    index.applyChange('case:a', record('a'));
    expect(index.indexed()).toBeNull();
  });

  it('follows writes and removals once built, validating each value as it arrives', () => {
    index.rebuild([listingOf(record('a'))], [], index.currentGeneration());
    index.applyChange('case:b', record('b', 5));
    index.applyChange('case:a', { ...record('a', 7), notes: 'looked again' });
    expect(index.indexed()!.cases.map((c) => [c.id, c.notes]).sort()).toEqual([
      ['a', 'looked again'],
      ['b', ''],
    ]);
    index.applyChange('case:b', undefined);
    expect(index.indexed()!.cases.map((c) => c.id)).toEqual(['a']);
    // keys that are not cases or quarantine (settings, say) leave it alone
    index.applyChange('settings', { system: 'metric' });
    expect(index.indexed()!.cases).toHaveLength(1);
  });

  it('drops itself when a value fails validation, so the next listing quarantines and reports it', () => {
    index.rebuild([listingOf(record('a'))], [], index.currentGeneration());
    index.applyChange('case:b', { ...record('b'), status: 'closed-forever' });
    expect(index.indexed()).toBeNull();
  });

  it('drops itself when a record arrives under another id\'s key: it would be listed yet not editable, so the full read quarantines it', () => {
    index.rebuild([listingOf(record('a'))], [], index.currentGeneration());
    index.applyChange('case:b', record('a', 5));
    expect(index.indexed()).toBeNull();
  });

  it('tracks quarantine entries', () => {
    index.rebuild([], [], index.currentGeneration());
    index.applyChange('quarantine:case:x', quarantineRecord('case:x', { junk: true }, new Error('bad'), 9));
    expect(index.indexed()!.quarantined.map((q) => q.key)).toEqual(['case:x']);
    index.applyChange('quarantine:case:x', undefined);
    expect(index.indexed()!.quarantined).toEqual([]);
  });

  it('does not keep a full read that changes overtook (it may miss them)', () => {
    const since = index.currentGeneration();
    index.applyChange('case:late', record('late'));
    index.rebuild([listingOf(record('a'))], [], since);
    expect(index.indexed()).toBeNull();
  });
});

/**
 * The device-side store of drafts (and, later, the outbox): versioned JSON under one key per
 * area, user, job and unit; unreadable or other-version entries are dropped, never half-read.
 */
import { checkDraftKey, clearCheckDraft, draftDiffers, readCheckDraft, writeCheckDraft, type CheckDraft } from '../../components/drafts/checkDraft';
import { clearFindingDrafts, findingDraftKey } from '../../components/drafts/findingDraft';
import { keysUnder, memoryStorage, readEntry, setStorage, storeKey, writeEntry, type KeyValueStorage } from '../../components/drafts/store';

let storage: KeyValueStorage;
beforeEach(() => {
  storage = memoryStorage();
  setStorage(storage);
});
afterAll(() => setStorage(null));

const draft: CheckDraft = {
  unitTag: 'IU-L4-03',
  baseCheckId: null,
  marks: { a: 'ok', b: 'defect' },
  texts: { c: '28 in' },
  logged: { b: ['#214'] },
  openFinding: null,
};

describe('draft store', () => {
  it('keys drafts by area, user, job and unit, so one person never gets another’s marks', () => {
    expect(checkDraftKey('u1', 'j1', 'unit9')).toBe('trimout:v1:check:u1:j1:unit9');
    expect(checkDraftKey('u2', 'j1', 'unit9')).not.toBe(checkDraftKey('u1', 'j1', 'unit9'));
    // a colon inside an id cannot make two keys collide
    expect(storeKey('finding', 'u:1', 'j1')).toBe('trimout:v1:finding:u_1:j1');
  });

  it('writes versioned JSON with the time of the change, and reads it back', () => {
    const key = checkDraftKey('u1', 'j1', 'unit9');
    expect(writeCheckDraft(key, draft)).toBe(true);
    const raw = JSON.parse(storage.getItem(key)!);
    expect(raw).toMatchObject({ v: 1, data: draft });
    expect(Number.isNaN(Date.parse(raw.savedAt))).toBe(false);
    expect(readCheckDraft(key)?.data).toEqual(draft);
    clearCheckDraft(key);
    expect(readCheckDraft(key)).toBeNull();
  });

  it('drops an entry of another version, a malformed one and one that is not JSON', () => {
    const key = checkDraftKey('u1', 'j1', 'unit9');
    storage.setItem(key, JSON.stringify({ v: 2, savedAt: new Date().toISOString(), data: draft }));
    expect(readCheckDraft(key)).toBeNull();
    expect(storage.getItem(key)).toBeNull();
    storage.setItem(key, JSON.stringify({ v: 1, savedAt: new Date().toISOString(), data: { ...draft, marks: { a: 'fine' } } }));
    expect(readCheckDraft(key)).toBeNull();
    storage.setItem(key, '{not json');
    expect(readCheckDraft(key)).toBeNull();
  });

  it('says so when the storage refuses a write (full), instead of throwing at the screen', () => {
    setStorage({ ...memoryStorage(), length: 0, getItem: () => null, setItem: () => { throw new Error('QuotaExceededError'); }, removeItem: () => undefined, key: () => null });
    expect(writeEntry('k', { a: 1 })).toBe(false);
  });

  it('lists the keys under a prefix (a user’s drafts on a job) and no others', () => {
    writeEntry(checkDraftKey('u1', 'j1', 'unit1'), draft);
    writeEntry(checkDraftKey('u1', 'j1', 'unit2'), draft);
    writeEntry(checkDraftKey('u1', 'j10', 'unit3'), draft);
    writeEntry(storeKey('outbox', 'u1', 'j1', 'w1'), { method: 'POST' });
    expect(keysUnder(storeKey('check', 'u1', 'j1')).sort()).toEqual([checkDraftKey('u1', 'j1', 'unit1'), checkDraftKey('u1', 'j1', 'unit2')]);
    expect(readEntry(storeKey('outbox', 'u1', 'j1', 'w1'), (d): d is { method: string } => typeof d === 'object' && d !== null)?.data).toEqual({ method: 'POST' });
  });
});

describe('draftDiffers', () => {
  const base = { marks: { a: 'ok' as const }, texts: { c: '28 in' } };
  it('is false for the saved check itself, true for a changed mark, value or a logged finding', () => {
    expect(draftDiffers({ marks: { a: 'ok' }, texts: { c: '28 in' }, logged: {} }, base)).toBe(false);
    expect(draftDiffers({ marks: { a: 'defect' }, texts: { c: '28 in' }, logged: {} }, base)).toBe(true);
    expect(draftDiffers({ marks: { a: 'ok' }, texts: { c: '30 in' }, logged: {} }, base)).toBe(true);
    expect(draftDiffers({ marks: { a: 'ok' }, texts: { c: '28 in' }, logged: { a: ['#1'] } }, base)).toBe(true);
    // an emptied field is no change
    expect(draftDiffers({ marks: { a: 'ok' }, texts: { c: '28 in', d: '' }, logged: { a: [] } }, base)).toBe(false);
  });
});

describe('finding drafts', () => {
  it('are keyed per unit and item ("other" for one not listed), and a discarded check takes its unit’s finding drafts with it', () => {
    expect(findingDraftKey('u1', 'j1', 'unit9', 'item3')).toBe('trimout:v1:finding:u1:j1:unit9:item3');
    expect(findingDraftKey('u1', 'j1', 'unit9', null)).toBe('trimout:v1:finding:u1:j1:unit9:other');
    writeEntry(findingDraftKey('u1', 'j1', 'unit9', 'item3'), { note: 'half written' });
    writeEntry(findingDraftKey('u1', 'j1', 'unit9', null), { note: 'other' });
    writeEntry(findingDraftKey('u1', 'j1', 'unit10', 'item3'), { note: 'another unit' });
    clearFindingDrafts('u1', 'j1', 'unit9');
    expect(keysUnder(storeKey('finding', 'u1', 'j1'))).toEqual([findingDraftKey('u1', 'j1', 'unit10', 'item3')]);
  });
});

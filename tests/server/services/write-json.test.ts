/**
 * writeJson (server/services/statCache.ts): the JSON of a figure from the exact cache is written
 * once and shared, everything else is written afresh, and both are exactly JSON.stringify's bytes.
 */
import type { Sequelize } from 'sequelize';
import { cachedStat, withoutStatCache, writeJson, type StatVersions } from '../../../server/services/statCache';

// cachedStat reads the versions itself only when none are given: these tests give them.
const noDb = {} as Sequelize;
const versions = (n: number): StatVersions => new Map([['structure', String(n)]]);
const figure = (n: number, compute: () => Promise<object>) => cachedStat(noDb, 'job-json-test', ['structure'], 'figure', compute, versions(n));

it('writes a cached figure once: the same bytes and entity tag for every request until the figure changes', async () => {
  const value = { levels: [{ name: 'Level 1 – east', units: 12 }], note: 'quotes " and \\u2028' };
  const a = await figure(1, async () => value);
  const etag = jest.fn((body: Buffer) => `W/"${body.length}"`);
  const first = writeJson(a, etag);
  expect(first.body.equals(Buffer.from(JSON.stringify(value), 'utf8'))).toBe(true);
  const again = writeJson(await figure(1, async () => ({ other: true })), etag);
  expect(again.body).toBe(first.body); // the very same buffer: not written again
  expect(again.etag).toBe(first.etag);
  expect(etag).toHaveBeenCalledTimes(1);

  // A new version: a new value, written for itself.
  const changed = writeJson(await figure(2, async () => ({ levels: [] })), etag);
  expect(changed.body.toString('utf8')).toBe('{"levels":[]}');
  expect(etag).toHaveBeenCalledTimes(2);
});

it('writes any other value afresh each time (a change to it shows)', () => {
  const mine = { count: 1 };
  expect(writeJson(mine).body.toString()).toBe('{"count":1}');
  mine.count = 2;
  expect(writeJson(mine).body.toString()).toBe('{"count":2}');
  expect(writeJson(null).body.toString()).toBe('null');
  expect(writeJson([1, 'two']).body.toString()).toBe('[1,"two"]');
});

it('does not keep the JSON of a figure computed with the cache bypassed', async () => {
  const fresh = await withoutStatCache(() => figure(3, async () => ({ n: 1 })));
  expect(writeJson(fresh).body.toString()).toBe('{"n":1}');
  (fresh as { n: number }).n = 5;
  expect(writeJson(fresh).body.toString()).toBe('{"n":5}');
});

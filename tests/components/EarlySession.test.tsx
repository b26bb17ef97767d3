/**
 * The page starts the session read before the app's scripts run (public/early-session.js): the
 * app's first GET of that path takes the answer instead of asking again, once; a failed early read
 * counts as no connection like any other; other paths and later asks go to the network.
 */
import { apiGet, takeEarly } from '../../components/api/client';
import { noteReached, serverUnreachable } from '../../components/api/reach';

type Early = { __trimoutEarly?: Record<string, Promise<unknown>> };
const answer = (body: unknown) => ({ ok: true, status: 200, json: async () => body, headers: { get: () => null } });
let calls: string[];

beforeEach(() => {
  calls = [];
  (globalThis as { fetch: unknown }).fetch = jest.fn(async (path: string) => {
    calls.push(path);
    return answer({ from: 'network' });
  });
});
afterEach(() => {
  delete (globalThis as Early).__trimoutEarly;
  noteReached(true);
});

it('the first read of the session takes the answer the page started; the second asks the network', async () => {
  (globalThis as Early).__trimoutEarly = { '/api/session': Promise.resolve(answer({ from: 'page' })) };
  expect(await apiGet('/api/session')).toEqual({ from: 'page' });
  expect(calls).toEqual([]);
  expect(await apiGet('/api/session')).toEqual({ from: 'network' });
  expect(calls).toEqual(['/api/session']);
});

it('only the path the page started is taken', async () => {
  (globalThis as Early).__trimoutEarly = { '/api/session': Promise.resolve(answer({ from: 'page' })) };
  expect(await apiGet('/api/jobs')).toEqual({ from: 'network' });
  expect(takeEarly('/api/jobs')).toBeUndefined();
  expect(takeEarly('/api/session')).toBeDefined();
  expect(takeEarly('/api/session')).toBeUndefined();
});

it('an early read that got no answer is "no connection", as the app\'s own would be', async () => {
  const failed = Promise.reject(new TypeError('Failed to fetch'));
  failed.catch(() => undefined);
  (globalThis as Early).__trimoutEarly = { '/api/session': failed };
  await expect(apiGet('/api/session')).rejects.toMatchObject({ status: 0, id: 'offline' });
  expect(serverUnreachable()).toBe(true);
});

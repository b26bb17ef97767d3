/** The app's QueryClient: a list whose cursor the server refuses (invalid_cursor) starts again from its first page. */
import { InfiniteQueryObserver } from '@tanstack/react-query';
import { ApiError } from '../../components/api/client';
import { makeQueryClient } from '../../components/queries/queryClient';

interface Page {
  items: string[];
  nextCursor: string | null;
}

it('starts a list again from its first page when the server refuses its cursor', async () => {
  const client = makeQueryClient();
  const asked: Array<string | null> = [];
  let secretChanged = false;
  const observer = new InfiniteQueryObserver<Page, Error, { pages: Page[] }, readonly string[], string | null>(client, {
    queryKey: ['list'],
    initialPageParam: null,
    getNextPageParam: (last) => last.nextCursor,
    queryFn: async ({ pageParam }) => {
      asked.push(pageParam);
      if (pageParam && secretChanged) throw new ApiError(400, 'invalid_cursor', 'This list position is not valid any more; start again from the first page.');
      return pageParam ? { items: ['b'], nextCursor: null } : { items: ['a'], nextCursor: 'c1' };
    },
  });
  const unsubscribe = observer.subscribe(() => undefined);
  try {
    // the observer loads the first page
    for (let i = 0; i < 100 && client.getQueryState(['list'])?.status !== 'success'; i++) await new Promise((r) => setTimeout(r, 10));
    secretChanged = true;
    await observer.fetchNextPage();
    // the refused page led to a fresh first page, not to an error left on the screen
    await new Promise((r) => setTimeout(r, 50));
    expect(asked).toEqual([null, 'c1', null]);
    const state = client.getQueryState(['list']);
    expect(state?.status).toBe('success');
    expect((client.getQueryData(['list']) as { pages: Page[] }).pages).toEqual([{ items: ['a'], nextCursor: 'c1' }]);
  } finally {
    unsubscribe();
    client.clear();
  }
});

it('leaves other errors alone', async () => {
  const client = makeQueryClient();
  let calls = 0;
  await client
    .fetchQuery({
      queryKey: ['other'],
      retry: false,
      queryFn: async () => {
        calls += 1;
        throw new ApiError(404, 'not_found', 'Not found');
      },
    })
    .catch(() => undefined);
  await new Promise((r) => setTimeout(r, 50));
  expect(calls).toBe(1);
  expect(client.getQueryState(['other'])?.status).toBe('error');
  client.clear();
});

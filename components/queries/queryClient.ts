/**
 * The app's one QueryClient. A list position (cursor) the server no longer accepts, after a
 * deploy that changed its secret or with filters changed in between, answers 400 invalid_cursor:
 * the list then starts again from its first page instead of showing an error under "Load more".
 */
import { onlineManager, QueryCache, QueryClient } from '@tanstack/react-query';
import { ApiError } from '../api/client';
import { serverUnreachable, subscribeReach } from '../api/reach';

// A request that got no answer makes react-query offline too (components/api/reach.ts).
subscribeReach(() => onlineManager.setOnline(!serverUnreachable()));

export function makeQueryClient(): QueryClient {
  const client: QueryClient = new QueryClient({
    queryCache: new QueryCache({
      onError: (error, query) => {
        if (error instanceof ApiError && error.id === 'invalid_cursor') {
          void client.resetQueries({ queryKey: query.queryKey, exact: true });
        }
      },
    }),
    defaultOptions: {
      queries: {
        // A 4xx will not get better by asking again; network trouble might.
        retry: (count, error) => !(error instanceof ApiError && error.status >= 400 && error.status < 500) && count < 2,
        refetchOnWindowFocus: true,
      },
    },
  });
  return client;
}

import { MutationCache, QueryCache, QueryClient } from '@tanstack/react-query';
import { isApiError } from './http';
import { queryKeys } from './query-keys';
import { sessionMayHaveEnded } from './session';

const MAX_RETRIES = 2;

/** A client error (4xx) will not change by asking again, except a timeout or rate limit. */
function shouldRetry(failureCount: number, error: unknown): boolean {
  if (isApiError(error) && error.status >= 400 && error.status < 500) {
    return error.status === 408 || error.status === 429 ? failureCount < MAX_RETRIES : false;
  }
  return failureCount < MAX_RETRIES;
}

function isUnauthorized(error: unknown): boolean {
  return isApiError(error) && error.status === 401;
}

export function createQueryClient(): QueryClient {
  // Any 401 while someone is signed in means the session ended on the server: check the session,
  // and the signed-in area sends the person to sign in again (see routes/signed-in-area.tsx).
  const queryClient: QueryClient = new QueryClient({
    queryCache: new QueryCache({
      onError: (error, query) => {
        if (isUnauthorized(error) && query.queryKey[0] !== queryKeys.session()[0]) sessionMayHaveEnded(queryClient);
      },
    }),
    mutationCache: new MutationCache({
      onError: (error) => {
        if (isUnauthorized(error)) sessionMayHaveEnded(queryClient);
      },
    }),
    defaultOptions: {
      queries: {
        retry: shouldRetry,
        staleTime: 30_000,
        refetchOnWindowFocus: true,
      },
      mutations: {
        retry: false,
      },
    },
  });
  return queryClient;
}

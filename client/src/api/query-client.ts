import { QueryClient } from '@tanstack/react-query';
import { isApiError } from './http';

const MAX_RETRIES = 2;

/** A client error (4xx) will not change by asking again, except a timeout or rate limit. */
function shouldRetry(failureCount: number, error: unknown): boolean {
  if (isApiError(error) && error.status >= 400 && error.status < 500) {
    return error.status === 408 || error.status === 429 ? failureCount < MAX_RETRIES : false;
  }
  return failureCount < MAX_RETRIES;
}

export function createQueryClient(): QueryClient {
  return new QueryClient({
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
}
